import { describe, expect, it } from "vitest";
import { markTotals } from "./marks";
import { emptyReleaseCounts, releaseAction, releaseChoice, releasedCount, releaseStanding, zeroMark } from "./release";
import type { RubricCriterion } from "./rubric";

const mark = (complete: boolean, onCountedVersion = true, released = false) => ({ released, complete, onCountedVersion });

describe("releaseStanding", () => {
  it("tells apart the marked, the partly marked, the stale, the unmarked and those with nothing handed in", () => {
    expect(releaseStanding({ handedIn: true, stillOpen: false, mark: mark(true) })).toBe("fully-marked");
    expect(releaseStanding({ handedIn: true, stillOpen: false, mark: mark(false) })).toBe("partly-marked");
    expect(releaseStanding({ handedIn: true, stillOpen: false, mark: mark(true, false) })).toBe("marked-on-earlier-version");
    expect(releaseStanding({ handedIn: true, stillOpen: true, mark: null })).toBe("not-marked");
    expect(releaseStanding({ handedIn: false, stillOpen: false, mark: mark(true) })).toBe("no-hand-in");
    expect(releaseStanding({ handedIn: false, stillOpen: true, mark: null })).toBe("no-hand-in-still-open");
    expect(releaseStanding({ handedIn: true, stillOpen: false, mark: mark(false, true, true) })).toBe("released");
  });
});

describe("releaseAction", () => {
  it("releases partly marked students only when all are chosen, and a zero only when chosen and the window has closed", () => {
    const marked = { scope: "marked", zeroForNoHandIn: false } as const;
    const everyone = { scope: "all", zeroForNoHandIn: true } as const;
    expect(releaseAction("fully-marked", true, marked)).toBe("mark");
    expect(releaseAction("partly-marked", true, marked)).toBeNull();
    expect(releaseAction("partly-marked", true, everyone)).toBe("mark");
    expect(releaseAction("marked-on-earlier-version", true, everyone)).toBe("mark");
    expect(releaseAction("not-marked", false, everyone)).toBeNull();
    expect(releaseAction("no-hand-in", false, marked)).toBeNull();
    expect(releaseAction("no-hand-in", false, everyone)).toBe("zero");
    expect(releaseAction("no-hand-in", true, everyone)).toBe("mark");
    expect(releaseAction("no-hand-in-still-open", false, everyone)).toBeNull();
    expect(releaseAction("released", true, everyone)).toBeNull();
  });

  it("counts what each choice releases", () => {
    const counts = {
      ...emptyReleaseCounts(),
      "fully-marked": 5,
      "partly-marked": 2,
      "marked-on-earlier-version": 1,
      "no-hand-in": 3,
      "no-hand-in-still-open": 4,
      "not-marked": 6,
    };
    expect(releasedCount(counts, { scope: "marked", zeroForNoHandIn: false })).toBe(5);
    expect(releasedCount(counts, { scope: "all", zeroForNoHandIn: false })).toBe(8);
    expect(releasedCount(counts, { scope: "all", zeroForNoHandIn: true })).toBe(11);
  });
});

describe("releaseChoice", () => {
  it("needs a scope, and reads unticked boxes as no", () => {
    expect(releaseChoice.safeParse({}).success).toBe(false);
    expect(releaseChoice.parse({ scope: "all" })).toEqual({ scope: "all", zeroForNoHandIn: false, whileOpen: false });
    expect(releaseChoice.parse({ scope: "marked", zeroForNoHandIn: "on", whileOpen: "on" })).toEqual({
      scope: "marked",
      zeroForNoHandIn: true,
      whileOpen: true,
    });
  });
});

describe("zeroMark", () => {
  it("scores every criterion, totals 0, and picks a levels criterion's zero-point level", () => {
    const rubric = [
      {
        id: "a",
        kind: "levels",
        title: "Set-up",
        levels: [
          { points: 0, description: "None" },
          { points: 2, description: "Full" },
        ],
        minPoints: 0,
        maxPoints: 2,
      },
      { id: "b", kind: "range", title: "Discussion", minPoints: 0, maxPoints: 4 },
      { id: "c", kind: "auto", title: "On time", autoRule: "on_time", minPoints: 0, maxPoints: 1, autoParams: {} },
    ] as unknown as RubricCriterion[];
    const zero = zeroMark(rubric);
    expect(zero.scores).toEqual({ a: { points: 0, level: 1 }, b: { points: 0 }, c: { points: 0, frozen: true } });
    expect(markTotals(rubric, zero, {})).toMatchObject({ total: 0, complete: true });
  });
});
