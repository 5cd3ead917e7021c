/**
 * A lab's rubric, for its instructors: criteria scored by levels, by points in a range, or
 * automatically from the hand-in and the class comparison. The form sends its criteria as a field list;
 * the server checks it with the same schema and answers with the problems at their fields, and the
 * form keeps everything typed. A rubric can also be copied from another lab of the course.
 */
import { data, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.labs.$labId.rubric";
import { CopyRubricForm } from "~/components/rubric/copy-rubric-form";
import { RubricEditor } from "~/components/rubric/rubric-editor";
import { Notice } from "~/components/ui/notice";
import { parseSubmission, replyFor } from "~/lib/forms/submission";
import { criterionToInput, rubricFormInput } from "~/lib/marking/rubric";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { copyRubric, listRubricSources, saveRubric } from "~/server/marking/rubrics.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";
import { loadMarkingLab } from "~/server/marking/marking-lab.server";
import { counted } from "~/lib/plural";

const rubricAction = z.discriminatedUnion("intent", [
  rubricFormInput,
  z.object({ intent: z.literal("copy"), fromLabId: z.uuid("Choose a lab to copy from.") }),
]);

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const { access, lab } = await requireLabAccess({ request, context }, params, ["instructor"], loadMarkingLab);
  const sources = await listRubricSources(db, { access, labId: lab.id });
  return {
    courseId: access.course.id,
    lab: { id: lab.id, title: lab.title, requiredDrops: lab.requiredDrops, releasedAt: lab.marking.releasedAt?.toISOString() ?? null },
    criteria: lab.rubric.map((criterion) => criterionToInput(criterion)),
    sources,
  };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const { access, lab } = await requireLabAccess({ request, context }, params, ["instructor"], loadMarkingLab);
  const submission = parseSubmission(formData, rubricAction);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const input = submission.value;
  if (input.intent === "copy") {
    const copied = await copyRubric(db, { access, lab, fromLabId: input.fromLabId, request });
    return { done: `Copied ${counted(copied.length, "criterion", "criteria")}.` };
  }
  const saved = await saveRubric(db, { access, lab, input: { criteria: input.criteria }, request });
  return { done: `The rubric is saved: ${counted(saved.length, "criterion", "criteria")}.` };
});

export default function RubricPage({ loaderData, actionData }: Route.ComponentProps) {
  const { courseId, lab, criteria, sources } = loaderData;
  const navigation = useNavigation();
  const copyReply = replyFor(actionData, "copy");
  // A reply that is not the copy form's is the rubric form's (a refused save, or an added criterion without JavaScript).
  const reply = copyReply || !actionData || "done" in actionData ? undefined : actionData;
  // A refused copy that names no field (the lab already marked) is told above; one about the chosen lab, at its field.
  const copyErrors = copyReply?.error?.[""] ?? [];
  return (
    // Keyed on what is stored, so that once saved the form starts again from it and new criteria carry their ids.
    <RubricEditor
      key={JSON.stringify(criteria)}
      courseId={courseId}
      lab={lab}
      criteria={criteria}
      reply={reply}
      notices={
        <>
          {actionData && "done" in actionData ? <Notice tone="success">{actionData.done}</Notice> : null}
          {copyErrors.length ? <Notice tone="error">{copyErrors.join(" ")}</Notice> : null}
          {sources.length && lab.releasedAt === null ? (
            <CopyRubricForm sources={sources} reply={copyReply} busy={navigation.state === "submitting"} />
          ) : null}
        </>
      }
    />
  );
}

export function meta({ data: loaderData }: Route.MetaArgs) {
  return [{ title: `Rubric: ${loaderData?.lab.title ?? "lab"} · Benchpost` }];
}
