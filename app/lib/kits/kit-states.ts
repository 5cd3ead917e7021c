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

/** States in which a kit has not reached its student yet: a hand-in then is taken, and flagged for staff. */
export const kitStatesBeforeHome: readonly KitState[] = ["on_shelf", "packed", "in_transit"];

/** The state's label when a hand-in was made with the kit not yet at home ("Packed"); null otherwise or when not recorded. */
export function kitNotAtHomeLabel(state: string | null | undefined): string | null {
  return state && (kitStatesBeforeHome as readonly string[]).includes(state) ? kitStateLabels[state as KitState] : null;
}

export const partConditions = ["fine", "damaged", "missing"] as const;
export type PartCondition = (typeof partConditions)[number];
