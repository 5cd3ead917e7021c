import { describe, expect, it } from "vitest";
import { parseFeed } from "../../../tests/support/calendar-feed";
import { buildCalendarFeed, type CalendarFeedRow } from "./calendar-feed";

const course = { courseId: "c1", courseCode: "ME 2140", courseTitle: "Settling Spheres", timeZone: "Europe/Lisbon" };
const none = {
  labId: null,
  kitId: null,
  title: null,
  cohortId: null,
  cohortName: null,
  dueAt: null,
  lateCutoffAt: null,
  classDueAt: null,
  classLateCutoffAt: null,
  extendedBy: null,
  returnBy: null,
};
const row = (values: Partial<CalendarFeedRow>): CalendarFeedRow => ({ kind: "lab", ...course, ...none, ...values });

const feed = (rows: CalendarFeedRow[]) =>
  parseFeed(buildCalendarFeed(rows, { ownerName: "Ana Lima", baseUrl: "http://127.0.0.1:3000", now: new Date("2027-03-01T12:00:00Z") }));

describe("buildCalendarFeed", () => {
  it("writes a lab's due time and cut-off as two events with stable UIDs, in UTC, linking to the lab", () => {
    const { name, events } = feed([
      row({ labId: "lab-1", title: "Drag on a sphere", dueAt: "2027-03-10T17:00:00+00:00", lateCutoffAt: "2027-03-12T17:00:00+00:00" }),
    ]);
    expect(name).toBe("Benchpost: Ana Lima");
    expect(events.map((event) => [event.uid, event.summary, event.start])).toEqual([
      ["lab-1-due@benchpost", "Due: Drag on a sphere (ME 2140)", "2027-03-10T17:00:00.000Z"],
      ["lab-1-cutoff@benchpost", "Cut-off: Drag on a sphere (ME 2140)", "2027-03-12T17:00:00.000Z"],
    ]);
    expect(events[0].url).toBe("http://127.0.0.1:3000/courses/c1/labs/lab-1");
    // Lisbon is on UTC in March before the clocks change (27 March 2027): 17:00 there.
    expect(events[0].description).toContain("Due Wed, 10 Mar 2027, 17:00 WET.");
    expect(events[0].description).not.toContain("extension");
  });

  it("says in the description that a due time is the student's own extension, and gives the class's", () => {
    const { events } = feed([
      row({
        labId: "lab-1",
        title: "Drag",
        dueAt: "2027-03-14T17:00:00+00:00",
        classDueAt: "2027-03-10T17:00:00+00:00",
        extendedBy: "student",
      }),
    ]);
    expect(events).toHaveLength(1);
    expect(events[0].start).toBe("2027-03-14T17:00:00.000Z");
    expect(events[0].description).toContain("This is your extension; the class is due Wed, 10 Mar 2027, 17:00 WET.");
    expect(events[0].description).toContain("No hand-ins are taken after the due time.");
  });

  it("writes a cohort's extension as an event of its own, named after the cohort", () => {
    const { events } = feed([
      row({
        kind: "cohort-extension",
        labId: "lab-1",
        cohortId: "co-2",
        cohortName: "Cohort two",
        title: "Drag",
        dueAt: "2027-03-11T17:00:00+00:00",
        classDueAt: "2027-03-10T17:00:00+00:00",
        extendedBy: "cohort",
      }),
    ]);
    expect(events.map((event) => [event.uid, event.summary])).toEqual([
      ["lab-1-co-2-due@benchpost", "Due (Cohort two, extended): Drag (ME 2140)"],
    ]);
    expect(events[0].description).toContain("Cohort two's extension; the class is due");
  });

  it("writes a return-by date as an all-day event on that day, whatever the zone", () => {
    const { events } = feed([
      row({ kind: "kit-return", kitId: "kit-1", title: "K-07", returnBy: "2027-05-28" }),
      row({ kind: "course-kit-return", returnBy: "2027-05-28" }),
    ]);
    expect(events.map((event) => [event.uid, event.summary, event.start, event.end, event.allDay])).toEqual([
      ["kit-1-return@benchpost", "Kit back by: K-07 (ME 2140)", "2027-05-28", "2027-05-29", true],
      ["c1-kits-return@benchpost", "Kits back by (ME 2140)", "2027-05-28", "2027-05-29", true],
    ]);
    expect(events[0].description).toContain("Your kit K-07 must be back by the end of Fri, 28 May 2027.");
    expect(events[1].url).toBe("http://127.0.0.1:3000/courses/c1/kits/overdue");
  });

  it("escapes commas, semicolons and line breaks in titles so that the text reads back unchanged", () => {
    const title = "Drag; part 1, with a\\backslash";
    const { events } = feed([row({ labId: "lab-1", title, dueAt: "2027-03-10T17:00:00+00:00" })]);
    expect(events[0].summary).toBe(`Due: ${title} (ME 2140)`);
  });
});
