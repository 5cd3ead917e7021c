/**
 * A student's kit problem, followed to the end: received → replacement sent → resolved, or straight
 * from received to resolved (nothing had to be sent). The table below is the whole rule.
 */
export const kitProblemStatuses = ["received", "replacement_sent", "resolved"] as const;
export type KitProblemStatus = (typeof kitProblemStatuses)[number];

export const kitProblemStatusLabels: Record<KitProblemStatus, string> = {
  received: "Received",
  replacement_sent: "Replacement sent",
  resolved: "Resolved",
};

/**
 * Which changes an instructor may make from each status. "Replacement sent" is reached only by sending
 * one (with the part, from the problem's page), so it is no choice in the status form; a resolved
 * problem stays resolved: a new fault is a new report.
 */
const allowedChanges: Record<KitProblemStatus, readonly KitProblemStatus[]> = {
  received: ["replacement_sent", "resolved"],
  replacement_sent: ["resolved"],
  resolved: [],
};

export function canChangeProblem(from: KitProblemStatus, to: KitProblemStatus): boolean {
  return allowedChanges[from].includes(to);
}

/** Statuses an instructor can set by hand (without sending a part) from this one. */
export function nextProblemStatusesByHand(from: KitProblemStatus): readonly KitProblemStatus[] {
  return allowedChanges[from].filter((to) => to !== "replacement_sent");
}

/** A problem is open until it is resolved: it counts on the kits list and the course overview. */
export const openProblemStatuses: readonly KitProblemStatus[] = ["received", "replacement_sent"];

export const kitProblemKindLabels = { missing: "Missing part", damaged: "Damaged part", incomplete: "Incomplete parcel" } as const;
export type KitProblemKind = keyof typeof kitProblemKindLabels;
