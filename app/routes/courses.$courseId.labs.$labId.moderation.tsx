/**
 * Moderation, for a lab's instructors: each marker's totals side by side (count, mean, spread and a
 * histogram on shared bins), adjusting a mark with a reason, closing the marking to TAs, releasing the
 * marks (students are e-mailed through the outbox), and every change of every mark.
 */
import { data, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.labs.$labId.moderation";
import { LabStaffNav } from "~/components/labs/lab-staff-nav";
import { AdjustMark } from "~/components/moderation/adjust-mark";
import { MarkChanges } from "~/components/moderation/mark-changes";
import { MarkerTotals } from "~/components/moderation/marker-totals";
import { MarkingState } from "~/components/moderation/marking-state";
import { ResultChanged } from "~/components/moderation/result-changed";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { parseSubmission, replyFor } from "~/lib/forms/submission";
import { markAdjustment } from "~/lib/marking/mark-adjustment";
import { releaseChoice } from "~/lib/marking/release";
import type { MarkChange } from "~/lib/marking/marks";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { saveMark } from "~/server/marking/marks.server";
import { listMarkChanges, loadModeration, markLabReady, releaseMarks } from "~/server/marking/moderation.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";
import { loadMarkingLab } from "~/server/marking/marking-lab.server";
import { releasedSentence } from "~/lib/marking/moderation-words";
import { counted } from "~/lib/plural";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const { access, lab } = await requireLabAccess({ request, context }, params, ["instructor"], loadMarkingLab);
  const [moderation, changes] = await Promise.all([
    loadModeration(db, { access, lab }),
    listMarkChanges(db, { access, labId: lab.id, limit: 100 }),
  ]);
  return {
    courseId: access.course.id,
    timeZone: access.course.timeZone,
    lab: {
      id: lab.id,
      title: lab.title,
      rubric: lab.rubric,
      readyAt: lab.marking.readyAt?.toISOString() ?? null,
      releasedAt: lab.marking.releasedAt?.toISOString() ?? null,
    },
    maxTotal: moderation.maxTotal,
    bins: moderation.bins,
    markers: moderation.markers,
    overall: moderation.overall,
    students: moderation.students,
    progress: moderation.progress,
    released: moderation.released,
    changedAfterRelease: moderation.changedAfterRelease,
    needsRemarking: moderation.needsRemarking,
    release: moderation.release,
    resultChanged: moderation.resultChanged,
    marked: moderation.rows
      .filter((row) => row.mark)
      .map((row) => ({
        membershipId: row.membershipId,
        name: row.studentName,
        total: row.total,
        version: row.expectedVersion,
        markedBy: row.mark!.markedBy?.name ?? null,
      })),
    changes: changes.map((change) => ({ ...change, changedAt: change.changedAt.toISOString() })),
  };
}

const moderationAction = z.discriminatedUnion("intent", [
  z.object({ intent: z.literal("ready") }),
  z.object({ intent: z.literal("reopen") }),
  releaseChoice.extend({ intent: z.literal("release") }),
  markAdjustment,
]);

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const { access, lab } = await requireLabAccess({ request, context }, params, ["instructor"], loadMarkingLab);
  const submission = parseSubmission(formData, moderationAction);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const input = submission.value;
  if (input.intent === "ready" || input.intent === "reopen") {
    await markLabReady(db, { access, lab, ready: input.intent === "ready", request });
    return {
      done: input.intent === "ready" ? "Marking is closed to TAs: marks can now be checked and released." : "Marking is open to TAs again.",
    };
  }
  if (input.intent === "release") {
    const { intent: _intent, ...choice } = input;
    const outcome = await releaseMarks(db, { access, lab, choice, request });
    return {
      done: releasedSentence(outcome),
    };
  }
  const criterion = lab.rubric.find((entry) => `criterion:${entry.id}` === input.target);
  const change: MarkChange =
    input.target === "penalty"
      ? { kind: "latePenalty", points: input.value }
      : criterion?.kind === "levels"
        ? { kind: "score", criterionId: criterion.id, level: input.value, points: null }
        : { kind: "score", criterionId: criterion?.id ?? "", points: input.value, level: null, overrideReason: input.reason };
  const result = await saveMark(db, {
    access,
    labId: lab.id,
    membershipId: input.membershipId,
    expectedVersion: input.expectedVersion,
    change,
    source: "moderation",
    reason: input.reason,
  });
  if (result.status === "conflict")
    return data(submission.reply({ formErrors: ["Someone changed this mark while you were adjusting it: check it again."] }), {
      status: 409,
    });
  return { done: `${result.row.studentName}'s mark is now ${result.row.total}.` };
});

export default function ModerationPage({ loaderData, actionData }: Route.ComponentProps) {
  const { courseId, timeZone, lab, students, progress, resultChanged, marked, changes } = loaderData;
  const busy = useNavigation().state === "submitting";
  const refusal = actionData && "status" in actionData ? actionData : undefined;
  const typed = refusal?.initialValue as Record<string, string> | undefined;
  return (
    <div className="flex flex-col gap-8">
      <PageHeader
        title={lab.title}
        trail={[{ to: `/courses/${courseId}/labs`, label: "Labs" }]}
        tabs={<LabStaffNav courseId={courseId} labId={lab.id} instructor />}
      >
        Moderation · {counted(students, "student", "students")} · {progress.marked} fully marked, {progress.partial} partly,{" "}
        {progress.unmarked} not yet
      </PageHeader>
      {actionData && "done" in actionData ? <Notice tone="success">{actionData.done}</Notice> : null}
      {refusal && typed?.intent !== "adjust" ? (
        <Notice tone="error">
          {Object.values(refusal.error ?? {})
            .flat()
            .join(" ")}
        </Notice>
      ) : null}
      {resultChanged.length ? <ResultChanged entries={resultChanged} /> : null}
      <MarkingState lab={lab} standing={loaderData} timeZone={timeZone} busy={busy} typed={typed} />
      <MarkerTotals markers={loaderData.markers} overall={loaderData.overall} bins={loaderData.bins} maxTotal={loaderData.maxTotal} />
      {marked.length ? <AdjustMark marked={marked} rubric={lab.rubric} lastResult={replyFor(actionData, "adjust")} busy={busy} /> : null}
      <MarkChanges
        changes={changes}
        criterionNames={new Map(lab.rubric.map((criterion) => [criterion.id, criterion.title]))}
        timeZone={timeZone}
      />
    </div>
  );
}

export function meta({ data: loaderData }: Route.MetaArgs) {
  return [{ title: `Moderation: ${loaderData?.lab.title ?? "lab"} · Benchpost` }];
}
