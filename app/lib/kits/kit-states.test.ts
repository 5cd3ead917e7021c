import { describe, expect, it } from "vitest";
import { canMoveKit, kitStates, nextKitStates, type KitState } from "./kit-states";

// The product brief's journey, written out as pairs: every one must be allowed, and nothing else.
const legal: [KitState, KitState][] = [
  ["on_shelf", "packed"],
  ["packed", "in_transit"],
  ["in_transit", "at_home"],
  ["at_home", "coming_back"],
  ["coming_back", "checked_in"],
  ["checked_in", "on_shelf"],
  ["on_shelf", "retired"],
  ["checked_in", "retired"],
  ["packed", "on_shelf"],
  ["in_transit", "coming_back"],
];

describe("kit state machine", () => {
  it.each(legal)("allows %s → %s", (from, to) => {
    expect(canMoveKit(from, to)).toBe(true);
  });

  const illegal = kitStates.flatMap((from) =>
    kitStates.filter((to) => !legal.some(([a, b]) => a === from && b === to)).map((to) => [from, to] as [KitState, KitState]),
  );

  it.each(illegal)("refuses %s → %s", (from, to) => {
    expect(canMoveKit(from, to)).toBe(false);
  });

  it("lists exactly the legal moves from each state, and none out of retirement", () => {
    for (const from of kitStates) {
      expect([...nextKitStates(from)].sort()).toEqual(
        legal
          .filter(([a]) => a === from)
          .map(([, b]) => b)
          .sort(),
      );
    }
    expect(nextKitStates("retired")).toEqual([]);
    expect(illegal.length).toBe(kitStates.length ** 2 - legal.length);
  });
});
