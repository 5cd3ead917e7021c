/**
 * When a lab takes hand-ins: from its opening time, on time up to and including the due instant, late
 * up to and including the cut-off (when there is one), refused after. All comparisons are between
 * instants, so a daylight-saving change in the course's time zone cannot shift them: the local wall
 * times were turned into instants once, when the lab was saved.
 */
export type HandInWindow = { opensAt: Date; dueAt: Date; lateCutoffAt: Date | null };
export type HandInTiming = "not-open" | "on-time" | "late" | "closed";

export function handInTiming(window: HandInWindow, now: Date): HandInTiming {
  const t = now.getTime();
  if (t < window.opensAt.getTime()) return "not-open";
  if (t <= window.dueAt.getTime()) return "on-time";
  if (window.lateCutoffAt && t <= window.lateCutoffAt.getTime()) return "late";
  return "closed";
}

/** A drop log's standing on the student's list of labs. */
export type DropLogStatus = "not-started" | "draft" | "handed-in" | "late";

export function dropLogStatus(dropLog: { hasDraft: boolean; latestLate: boolean | null } | null): DropLogStatus {
  if (!dropLog) return "not-started";
  if (dropLog.latestLate !== null) return dropLog.latestLate ? "late" : "handed-in";
  return dropLog.hasDraft ? "draft" : "not-started";
}

export const dropLogStatusLabels: Record<DropLogStatus, string> = {
  "not-started": "Not started",
  draft: "Draft saved",
  "handed-in": "Handed in",
  late: "Handed in late",
};

/**
 * Where a student's hand-in of a lab stands for staff: handed in on time or late (the counted
 * version's flag, which lateness re-decides when an extension changes), or nothing yet, "missing" only
 * once the student's own due time has passed. Before it they may still hand in on time.
 */
export type HandInStanding = "on-time" | "late" | "not-due" | "missing";

export function handInStanding(latestLate: boolean | null, effectiveDueAt: Date, now: Date): HandInStanding {
  if (latestLate !== null) return latestLate ? "late" : "on-time";
  return now.getTime() <= effectiveDueAt.getTime() ? "not-due" : "missing";
}

/** A student's own deadline as staff pages read it (instants as ISO text): the window above, and why. */
export type StudentDeadline = {
  dueAt: string;
  lateCutoffAt: string | null;
  extendedBy: EffectiveHandInWindow["extendedBy"];
  /** Why staff extended it; null without an extension. Staff only: never sent to a student. */
  extensionReason: string | null;
};

/** An extension's times, as stored in `lab_extensions`. */
export type ExtensionWindow = { dueAt: Date; lateCutoffAt: Date | null };
export type EffectiveHandInWindow = HandInWindow & { extendedBy: "student" | "cohort" | null };

/**
 * The window that decides one student's hand-ins: their own extension, else their cohort's, else the
 * lab's. Every deadline decision (late, cut-off, reminders, the "on time" criterion, "missing") reads it.
 * An extension without a cut-off of its own keeps the class's cut-off when that comes later, so an
 * extended student can never be shut out while the rest of the class may still hand in late; to end
 * late hand-ins at the new due time, give the cut-off that same time.
 */
export function effectiveHandInWindow(
  lab: HandInWindow,
  extensions: { student?: ExtensionWindow | null; cohort?: ExtensionWindow | null },
): EffectiveHandInWindow {
  const chosen = extensions.student ?? extensions.cohort ?? null;
  if (!chosen) return { ...lab, extendedBy: null };
  const classCutoffLater = lab.lateCutoffAt && lab.lateCutoffAt.getTime() > chosen.dueAt.getTime() ? lab.lateCutoffAt : null;
  return {
    opensAt: lab.opensAt,
    dueAt: chosen.dueAt,
    lateCutoffAt: chosen.lateCutoffAt ?? classCutoffLater,
    extendedBy: extensions.student ? "student" : "cohort",
  };
}
