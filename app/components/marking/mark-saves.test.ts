import { describe, expect, it } from "vitest";
import type { RubricCriterion } from "~/lib/marking/rubric";
import type { MarkingDeskRow } from "~/server/marking/mark-rows.server";
import { markSaves, rowView, withChange, type MarkSaves, type SaveResponse } from "./mark-saves";

const discussion: RubricCriterion = {
  id: "00000000-0000-4000-8000-000000000002",
  position: 0,
  title: "Discussion",
  description: "",
  kind: "range",
  levels: null,
  minPoints: 0,
  maxPoints: 5,
  autoRule: null,
  autoParams: {},
};
const rubric = [discussion];
const membershipId = "00000000-0000-4000-8000-0000000000aa";
const base: MarkingDeskRow = {
  membershipId,
  userId: "00000000-0000-4000-8000-0000000000bb",
  studentName: "Ada Student",
  email: "ada@example.test",
  studentNumber: null,
  cohortId: "00000000-0000-4000-8000-0000000000cc",
  cohortName: "Monday",
  handIn: null,
  markedHandIn: null,
  mark: null,
  deadline: { dueAt: "2026-11-01T12:00:00.000Z", lateCutoffAt: null, extendedBy: null, extensionReason: null },
  status: "missing",
  classLabel: null,
  flagged: false,
  suggestions: {},
  cells: {},
  subtotal: 0,
  total: 0,
  maxTotal: 5,
  complete: false,
  progress: "unmarked",
  expectedVersion: 0,
  handInChangedSinceMarked: false,
  needsRemarking: false,
  resultChangedSinceMarked: null,
};
const score = (points: number | null) => ({ kind: "score" as const, criterionId: discussion.id, points, level: null });
/** The row as the server answers once `points` is saved at `version`, by `marker`. */
const stored = (points: number, version: number, marker = "Tess Assistant"): MarkingDeskRow => {
  const row = withChange(rubric, base, score(points));
  return {
    ...row,
    expectedVersion: version,
    mark: { ...row.mark!, version, markedBy: { id: "00000000-0000-4000-8000-0000000000dd", name: marker } },
  };
};
const pointsShown = (saves: MarkSaves) => rowView(saves[membershipId], base).row.cells[discussion.id]?.points;
const typed = (saves: MarkSaves, points: number | null) =>
  markSaves(saves, { type: "changed", rubric, base, change: score(points), reason: null });
const answered = (saves: MarkSaves, response: SaveResponse) => markSaves(saves, { type: "answered", membershipId, rubric, response });

describe("the marking desk's saves", () => {
  it("show a change at once and put it in flight from the version the loader read", () => {
    const saves = typed({}, 3);
    expect(pointsShown(saves)).toBe(3);
    expect(saves[membershipId]).toMatchObject({
      save: { status: "saving" },
      inFlight: { change: score(3), expectedVersion: 0 },
      queue: [],
    });
  });

  it("queue changes made while a save is in flight and send the next from the version the server returns", () => {
    let saves = typed({}, 3);
    const first = saves[membershipId].inFlight;
    saves = typed(typed(saves, 4), 5);
    // Still the first save on its way; the newest value is what the marker sees.
    expect(saves[membershipId].inFlight).toBe(first);
    expect(saves[membershipId].queue).toHaveLength(2);
    expect(pointsShown(saves)).toBe(5);

    saves = answered(saves, { intent: "save", status: "saved", row: stored(3, 1) });
    expect(saves[membershipId]).toMatchObject({
      save: { status: "saving" },
      inFlight: { change: score(4), expectedVersion: 1 },
      queue: [{ change: score(5) }],
    });
    expect(pointsShown(saves)).toBe(5);
    saves = answered(saves, { intent: "save", status: "saved", row: stored(4, 2) });
    expect(saves[membershipId]).toMatchObject({ inFlight: { change: score(5), expectedVersion: 2 }, queue: [] });
  });

  it("clear the save when the server's reply says saved, and show the server's row", () => {
    const saves = answered(typed({}, 3), { intent: "save", status: "saved", row: stored(3, 1) });
    expect(saves[membershipId]).toMatchObject({ save: { status: "saved" }, inFlight: null, queue: [], confirmed: { expectedVersion: 1 } });
    // The loader's next read of that version takes over the row.
    expect(markSaves(saves, { type: "loaded", row: stored(3, 1) })).toEqual({});
  });

  it("on a conflict show the other marker's mark, name them, and drop the changes waiting", () => {
    let saves = typed(typed({}, 3), 4);
    saves = answered(saves, { intent: "save", status: "conflict", row: stored(1, 7, "Olu Moderator") });
    expect(pointsShown(saves)).toBe(1);
    expect(saves[membershipId]).toMatchObject({ inFlight: null, queue: [], confirmed: { expectedVersion: 7 } });
    expect(saves[membershipId].save).toMatchObject({
      status: "conflict",
      message: expect.stringMatching(/^Olu Moderator changed this mark meanwhile/),
    });
    // The next change starts from their version.
    expect(typed(saves, 2)[membershipId].inFlight).toMatchObject({ expectedVersion: 7 });
  });

  it("keep a change lost to the network on screen, and retry it from the confirmed version", () => {
    let saves = answered(typed({}, 3), { status: "failed", message: "The connection failed; nothing was saved." });
    expect(pointsShown(saves)).toBe(3);
    expect(saves[membershipId]).toMatchObject({
      inFlight: null,
      save: { status: "failed", message: "The connection failed; nothing was saved.", retryable: true, change: score(3) },
    });
    // A fresh read by the loader does not throw the unsaved change away.
    expect(markSaves(saves, { type: "loaded", row: base })).toBe(saves);

    saves = markSaves(saves, { type: "retried", membershipId, rubric });
    expect(saves[membershipId]).toMatchObject({
      save: { status: "saving" },
      inFlight: { change: score(3), expectedVersion: 0 },
      retries: 1,
    });
    saves = answered(saves, { intent: "save", status: "saved", row: stored(3, 1) });
    expect(saves[membershipId]).toMatchObject({ save: { status: "saved" }, retries: 0 });
  });

  it("refuse a value the rubric does not take before sending anything", () => {
    const saves = typed({}, 9);
    expect(saves[membershipId]).toMatchObject({
      inFlight: null,
      // Sending it again could only be refused again: no retry is offered.
      save: { status: "failed", message: "Give between 0 and 5 points.", retryable: false, change: score(9) },
    });
    expect(pointsShown(saves)).toBeUndefined();
  });

  it("ignore an answer when nothing is in flight (a row mounted again after paging away)", () => {
    const saves = answered(typed({}, 3), { intent: "save", status: "saved", row: stored(3, 1) });
    expect(answered(saves, { intent: "save", status: "saved", row: stored(3, 1) })).toBe(saves);
  });
});
