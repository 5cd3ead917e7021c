import { describe, expect, it } from "vitest";
import { labInputFor, newLabFormValues } from "./lab-input";

const [a, b, c] = ["8d0c4c52-4d1e-4f8e-9d55-0f6f3b1c2a01", "8d0c4c52-4d1e-4f8e-9d55-0f6f3b1c2a02", "8d0c4c52-4d1e-4f8e-9d55-0f6f3b1c2a03"];
const form = (allowedSphereIds: unknown) => ({
  ...newLabFormValues("drag"),
  title: "Settling",
  opensAt: "2026-11-02T09:00",
  dueAt: "2026-11-16T23:59",
  allowedSphereIds,
});

describe("the lab form's spheres", () => {
  it("starts with no cohort ticked", () => {
    expect(newLabFormValues("drag").cohortIds).toEqual([]);
  });

  it("reads an 'all of this size' box (a group's ids in one value) beside single boxes, each id once", () => {
    const parsed = labInputFor("Europe/Dublin").parse(form([`${a} ${b}`, a, c]));
    expect(parsed.allowedSphereIds).toEqual([a, b, c]);
  });

  it("names the field when a value is not an id", () => {
    const parsed = labInputFor("Europe/Dublin").safeParse(form([`${a} not-an-id`]));
    expect(parsed.error?.issues[0]).toMatchObject({ message: "Choose spheres from the list." });
  });
});
