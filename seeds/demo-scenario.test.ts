import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { buildDemoScenario, demoCohortNames, termOf } from "./demo-scenario";

describe("demo scenario", () => {
  it("names the term after the month its labs are held in, in the course's zone", () => {
    expect(termOf(new Date("2026-11-18T09:00:00Z"), "Europe/Dublin")).toBe("2026 Autumn");
    expect(termOf(new Date("2026-05-20T09:00:00Z"), "Europe/Dublin")).toBe("2026 Spring");
    expect(termOf(new Date("2026-07-01T09:00:00Z"), "Europe/Dublin")).toBe("2026 Summer");
    // 31 July, 23:30 UTC is already 1 August in Dublin.
    expect(termOf(new Date("2026-07-31T23:30:00Z"), "Europe/Dublin")).toBe("2026 Autumn");
  });

  it("is the same on every run (one seeded generator)", () => {
    expect(buildDemoScenario()).toEqual(buildDemoScenario());
    expect(buildDemoScenario(1)).not.toEqual(buildDemoScenario());
  });

  it("has one instructor, four TAs covering every cohort and 45 students with unique addresses", () => {
    const scenario = buildDemoScenario();
    expect(scenario.tas).toHaveLength(4);
    expect(scenario.students).toHaveLength(45);
    expect(new Set(scenario.tas.flatMap((ta) => ta.cohorts))).toEqual(new Set(demoCohortNames.map((_, index) => index)));
    const emails = [scenario.instructor, ...scenario.tas, ...scenario.students].map((person) => person.email);
    expect(new Set(emails).size).toBe(emails.length);
    expect(emails.every((email) => /^[a-z0-9.-]+@[a-z.]+\.example$/.test(email))).toBe(true);
  });

  it("matches the demo sign-ins the README lists", () => {
    const scenario = buildDemoScenario();
    const known = new Set([scenario.instructor, ...scenario.tas, ...scenario.students].map((person) => person.email));
    const listed = [...readFileSync("README.md", "utf8").matchAll(/`([^`\s]+@[^`\s]*harrowgate\.example)`/g)].map((match) => match[1]);
    expect(listed.length).toBeGreaterThanOrEqual(6);
    expect(listed.filter((email) => !known.has(email))).toEqual([]);
  });
});
