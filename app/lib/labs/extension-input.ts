/**
 * What an instructor types to give students a later due time: for students (one picked on the
 * extensions page, or those ticked on the hand-in dashboard), for a whole cohort, or to remove an
 * extension. One schema for the forms and the server. Times are wall-clock times in the course's zone,
 * turned into instants exactly as the lab form does it.
 */
import { z } from "zod";
import { formList } from "~/lib/forms/submission";
import { blankToUndefined, wallClock } from "./lab-input";

/** More than any class; a larger selection is a mistake. */
export const MAX_EXTENDED_STUDENTS = 2000;

const windowFields = (timeZone: string) => ({
  dueAt: wallClock(timeZone, "new due time"),
  lateCutoffAt: z.preprocess(blankToUndefined, wallClock(timeZone, "new late cut-off").optional()),
  reason: z
    .string({ error: "Say why the due time moves; staff see the reason, students never do." })
    .trim()
    .min(3, "Say why the due time moves; staff see the reason, students never do.")
    .max(500, "Keep the reason under 500 characters."),
});

/** The extension forms' schema for a lab opening at `opensAt` in a course in `timeZone`; `intent` tells the forms apart. */
export function extensionInputFor(lab: { timeZone: string; opensAt: Date }) {
  const checkWindow = (window: { dueAt: Date; lateCutoffAt?: Date }, context: z.RefinementCtx) => {
    if (window.dueAt.getTime() <= lab.opensAt.getTime()) {
      context.addIssue({ code: "custom", path: ["dueAt"], message: "The new due time must come after the lab opens." });
    }
    if (window.lateCutoffAt && window.lateCutoffAt.getTime() < window.dueAt.getTime()) {
      context.addIssue({
        code: "custom",
        path: ["lateCutoffAt"],
        message: "The late cut-off cannot come before the new due time; give it the new due time for no late hand-ins.",
      });
    }
  };
  return z.discriminatedUnion(
    "intent",
    [
      z
        .object({
          intent: z.literal("extend-students"),
          membershipIds: formList(z.uuid("Choose students from the list.")).pipe(
            z
              .array(z.string())
              .min(1, "Choose at least one student.")
              .max(MAX_EXTENDED_STUDENTS, `Choose at most ${MAX_EXTENDED_STUDENTS} students at once.`)
              .transform((ids) => [...new Set(ids)]),
          ),
          ...windowFields(lab.timeZone),
        })
        .superRefine(checkWindow),
      z
        .object({ intent: z.literal("extend-cohort"), cohortId: z.uuid("Choose a cohort."), ...windowFields(lab.timeZone) })
        .superRefine(checkWindow),
      z.object({ intent: z.literal("remove"), extensionId: z.uuid("Choose an extension to remove.") }),
    ],
    { error: "Choose what to do: extend students, extend a cohort, or remove an extension." },
  );
}
export type ExtensionInput = z.output<ReturnType<typeof extensionInputFor>>;
/** The times and reason every extension carries. */
export type ExtensionWindowInput = { dueAt: Date; lateCutoffAt?: Date; reason: string };
