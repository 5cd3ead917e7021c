/**
 * A kit's journey: on shelf → packed → in transit → at home → coming back → checked in → on shelf,
 * or retired. The table below is the whole rule; everything else asks it.
 */
export const kitStates = ["on_shelf", "packed", "in_transit", "at_home", "coming_back", "checked_in", "retired"] as const;
export type KitState = (typeof kitStates)[number];

export const kitStateLabels: Record<KitState, string> = {
  on_shelf: "On shelf",
  packed: "Packed",
  in_transit: "In transit",
  at_home: "At home",
  coming_back: "Coming back",
  checked_in: "Checked in",
  retired: "Retired",
};

/**
 * Which moves are allowed from each state. Going back a step covers the everyday corrections:
 * unpacking a kit that was packed for the wrong student, or a parcel returned to sender.
 */
const allowedMoves: Record<KitState, readonly KitState[]> = {
  on_shelf: ["packed", "retired"],
  packed: ["in_transit", "on_shelf"],
  in_transit: ["at_home", "coming_back"],
  at_home: ["coming_back"],
  coming_back: ["checked_in"],
  checked_in: ["on_shelf", "retired"],
  retired: [],
};

export function nextKitStates(from: KitState): readonly KitState[] {
  return allowedMoves[from];
}

export function canMoveKit(from: KitState, to: KitState): boolean {
  return allowedMoves[from].includes(to);
}

/** States in which the kit is with, or on its way to or from, one student. */
export const kitStatesWithHolder: readonly KitState[] = ["packed", "in_transit", "at_home", "coming_back"];

export const partConditions = ["fine", "damaged", "missing"] as const;
export type PartCondition = (typeof partConditions)[number];
