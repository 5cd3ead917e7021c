/**
 * The form of a message to a cohort, read on the server and in the browser: who it goes to (cohorts,
 * optionally narrowed by a lab and where each student's hand-in of it stands) and what it says.
 */
import { z } from "zod";
import { storableText } from "~/lib/forms/storable-text";
import { formList } from "~/lib/forms/submission";

/** Where a student's hand-in of the chosen lab stands; a small set, each a plain SQL test. */
export const handInStates = ["not-handed-in", "handed-in", "handed-in-late", "not-marked"] as const;
export type HandInState = (typeof handInStates)[number];

/** As the form's choices say them. */
export const handInStateLabels: Record<HandInState, string> = {
  "not-handed-in": "Not handed in",
  "handed-in": "Handed in",
  "handed-in-late": "Handed in late",
  "not-marked": "Handed in, not marked yet",
};

/** As the audience's words say them: "Students of Cohort one who have not handed in “Drag”". */
const handInStateWords: Record<HandInState, string> = {
  "not-handed-in": "who have not handed in",
  "handed-in": "who have handed in",
  "handed-in-late": "who handed in late",
  "not-marked": "who handed in and are not marked yet",
};

export const SUBJECT_MAX = 150;
export const BODY_MAX = 5000;

const blankAsUndefined = (value: unknown) => (value === "" ? undefined : value);

const audienceFields = {
  cohortIds: formList(z.uuid()).pipe(z.array(z.uuid()).min(1, "Choose at least one cohort.").max(100)),
  labId: z.preprocess(blankAsUndefined, z.uuid("Choose a lab of this course.").optional()),
  handInState: z.preprocess(blankAsUndefined, z.enum(handInStates, "Choose one of the hand-in states.").optional()),
};
export type Audience = { cohortIds: string[]; labId?: string; handInState?: HandInState };

const messageFields = {
  subject: storableText
    .trim()
    .min(1, "Write a subject.")
    .max(SUBJECT_MAX, `Keep the subject to ${SUBJECT_MAX} characters.`)
    // It becomes the e-mail's subject line.
    .refine((value) => !/[\r\n\t]/.test(value), "Keep the subject on one line."),
  body: storableText.trim().min(1, "Write the message.").max(BODY_MAX, `Keep the message to ${BODY_MAX} characters.`),
};

const sendKey = z.string().regex(/^[a-z2-7]{16,64}$/, "Preview the message again before sending it.");

/** `preview` counts and shows; `send` sends what the preview counted (`expectedCount`), once per `sendKey`. */
export const messageInput = z
  .discriminatedUnion("intent", [
    z.object({ intent: z.literal("preview"), ...audienceFields, ...messageFields }),
    z.object({
      intent: z.literal("send"),
      ...audienceFields,
      ...messageFields,
      sendKey,
      expectedCount: z.coerce.number<string>().int().min(1),
    }),
  ])
  .refine((form) => !form.handInState || form.labId, {
    path: ["labId"],
    message: "A hand-in state needs a lab: choose the lab it is about.",
  });
export type MessageInput = z.output<typeof messageInput>;

/** The audience in words, as the preview, the list and the record show it. */
export function audienceLabel(cohortNames: string[], lab: { title: string } | null, state: HandInState | undefined): string {
  const cohorts =
    cohortNames.length <= 1 ? (cohortNames[0] ?? "") : `${cohortNames.slice(0, -1).join(", ")} and ${cohortNames[cohortNames.length - 1]}`;
  if (!lab) return `Students of ${cohorts}`;
  return state ? `Students of ${cohorts} ${handInStateWords[state]} “${lab.title}”` : `Students of ${cohorts} set “${lab.title}”`;
}

/** The form's fields as the page holds them (text, and the ticked cohorts). */
export type MessageForm = {
  intent: string;
  cohortIds: string[];
  labId: string;
  handInState: string;
  subject: string;
  body: string;
  sendKey: string;
  expectedCount: string;
};
