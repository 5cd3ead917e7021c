import { getFormProps, useForm, type FieldMetadata } from "@conform-to/react";
/**
 * Moderation, for a lab's instructors: each marker's totals side by side (count, mean, spread and a
 * histogram on shared bins), adjusting a mark with a reason, closing the marking to TAs, releasing the
 * marks (students are e-mailed through the outbox), and every change of every mark.
 */
import { useState } from "react";
import { data, Form, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.labs.$labId.moderation";
import { LabTime } from "~/components/drop-logs/lab-time";
import { LabStaffNav } from "~/components/labs/lab-staff-nav";
import { Button } from "~/components/ui/button";
import { SelectField, TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { TableHead } from "~/components/ui/table-head";
import { parseSubmission, replyFor } from "~/lib/forms/submission";
import { typedNumber } from "~/lib/forms/typed-number";
import { afterReleaseHandInNames, releaseChoice, releasedCount, type ReleaseCounts } from "~/lib/marking/release";
import type { MarkChange } from "~/lib/marking/marks";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { saveMark } from "~/server/marking/marks.server";
import { listMarkChanges, loadModeration, markLabReady, releaseMarks } from "~/server/marking/moderation.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";
import { loadMarkingLab } from "~/server/marking/marking-lab.server";

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

const adjustment = z.object({
  intent: z.literal("adjust"),
  membershipId: z.uuid("Choose the student."),
  expectedVersion: z.coerce.number().int().min(0),
  target: z.string().min(1, "Choose what to adjust."),
  value: typedNumber(z.number({ error: "Enter a number." }).finite()),
  reason: z.string().trim().min(3, "Say why the mark is adjusted: it is kept with the change.").max(500),
});
const moderationAction = z.discriminatedUnion("intent", [
  z.object({ intent: z.literal("ready") }),
  z.object({ intent: z.literal("reopen") }),
  releaseChoice.extend({ intent: z.literal("release") }),
  adjustment,
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
      done: `Released ${plural(outcome.released, "mark")}${outcome.zeros ? ` (${outcome.zeros} of them zero for no hand-in)` : ""} and queued ${plural(outcome.emailed, "e-mail")}${outcome.withheld ? `; ${plural(outcome.withheld, "student")} see nothing yet` : ""}.`,
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

const plural = (count: number, word: string) => `${count} ${word}${count === 1 ? "" : "s"}`;

const round = (value: number | null, digits = 1) => (value === null ? "—" : value.toFixed(digits));

/** A small histogram of totals; every marker's uses the same bins and height so they compare at a glance. */
function Histogram({
  counts,
  bins,
  tallest,
  label,
}: {
  counts: number[];
  bins: { from: number; to: number }[];
  tallest: number;
  label: string;
}) {
  const width = 160;
  const height = 36;
  const bar = width / Math.max(counts.length, 1);
  return (
    <svg
      viewBox={`0 0 ${width} ${height}`}
      className="h-9 w-40"
      role="img"
      aria-label={`${label}: ${counts.map((count, index) => `${count} between ${bins[index].from} and ${bins[index].to}`).join(", ")}`}
    >
      <line x1={0} x2={width} y1={height - 0.5} y2={height - 0.5} stroke="currentColor" strokeOpacity={0.3} />
      {counts.map((count, index) => {
        const barHeight = tallest ? ((height - 2) * count) / tallest : 0;
        return (
          <rect key={index} x={index * bar + 1} width={bar - 2} y={height - 1 - barHeight} height={barHeight} fill="var(--color-ink-500)" />
        );
      })}
    </svg>
  );
}

export default function ModerationPage({ loaderData, actionData }: Route.ComponentProps) {
  const {
    courseId,
    timeZone,
    lab,
    maxTotal,
    bins,
    markers,
    overall,
    students,
    progress,
    released,
    changedAfterRelease,
    needsRemarking,
    release,
    resultChanged,
    marked,
    changes,
  } = loaderData;
  const busy = useNavigation().state === "submitting";
  const refusal = actionData && "status" in actionData ? actionData : undefined;
  const typed = refusal?.initialValue as Record<string, string> | undefined;
  const [adjustForm, adjustFields] = useForm({
    id: "adjust",
    lastResult: replyFor(actionData, "adjust"),
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, adjustment),
  });
  const tallest = Math.max(1, ...markers.flatMap((marker) => marker.histogram), ...overall.histogram);
  const names = new Map(lab.rubric.map((criterion) => [criterion.id, criterion.title]));
  return (
    <div className="flex flex-col gap-8">
      <PageHeader
        title={lab.title}
        trail={[{ to: `/courses/${courseId}/labs`, label: "Labs" }]}
        tabs={<LabStaffNav courseId={courseId} labId={lab.id} instructor />}
      >
        Moderation · {students} students · {progress.marked} fully marked, {progress.partial} partly, {progress.unmarked} not yet
      </PageHeader>
      {actionData && "done" in actionData ? <Notice tone="success">{actionData.done}</Notice> : null}
      {refusal && typed?.intent !== "adjust" ? (
        <Notice tone="error">
          {Object.values(refusal.error ?? {})
            .flat()
            .join(" ")}
        </Notice>
      ) : null}
      {resultChanged.length ? (
        <Notice tone="warning">
          <p className="font-medium">Result changed since it was marked ({resultChanged.length})</p>
          <p>
            A part these hand-ins used was re-measured and their reduction revised; their marks are unchanged until someone marks them
            again.
          </p>
          <ul className="mt-1 list-disc pl-5" data-testid="result-changed-list">
            {resultChanged.map((entry) => (
              <li key={entry.membershipId}>
                {entry.name}: {entry.oldFigure?.toFixed(3) ?? "—"} → {entry.newFigure?.toFixed(3) ?? "—"} × ref
                {entry.reoffered ? `; ${entry.reoffered} automatic criteria now suggest other points` : ""}
                {entry.released ? " — released: review this mark" : ""}
              </li>
            ))}
          </ul>
        </Notice>
      ) : null}

      <section aria-labelledby="state-heading" className="flex flex-col gap-3 rounded-lg bg-white p-4 shadow-sm ring-1 ring-ink-900/10">
        <h2 id="state-heading" className="text-lg font-semibold">
          Where the marking stands
        </h2>
        <p className="text-sm">
          {lab.readyAt ? (
            <>
              Closed to TAs since <LabTime at={lab.readyAt} courseTimeZone={timeZone} />.
            </>
          ) : (
            "Open: TAs are marking at the desk."
          )}{" "}
          {lab.releasedAt ? (
            <>
              {released} marks released, last on <LabTime at={lab.releasedAt} courseTimeZone={timeZone} />
              {changedAfterRelease ? `; ${changedAfterRelease} changed since, shown to their students with the reason` : ""}
              {needsRemarking ? `; ${needsRemarking} reopened by a hand-in after the release: mark them again at the desk` : ""}.
            </>
          ) : (
            "Nothing released: students see no marks."
          )}
        </p>
        <div className="flex flex-wrap gap-3">
          <Form method="post">
            <input type="hidden" name="intent" value={lab.readyAt ? "reopen" : "ready"} />
            <Button type="submit" variant="secondary" disabled={busy}>
              {lab.readyAt ? "Open the marking to TAs again" : "Close the marking to TAs"}
            </Button>
          </Form>
          {lab.readyAt ? null : (
            <p className="self-center text-sm text-ink-700">Close the marking to TAs before releasing, so nothing changes under you.</p>
          )}
        </div>
        {lab.readyAt ? (
          <ReleaseForm
            release={release}
            timeZone={timeZone}
            busy={busy}
            again={released > 0}
            values={typed?.intent === "release" ? typed : undefined}
          />
        ) : null}
      </section>

      <section aria-labelledby="markers-heading">
        <h2 id="markers-heading" className="mb-2 text-lg font-semibold">
          Each marker&apos;s totals, out of {maxTotal}
        </h2>
        <div className="overflow-x-auto rounded-lg bg-white shadow-sm ring-1 ring-ink-900/10">
          <table className="min-w-full text-left text-sm">
            <TableHead
              headers={[
                "Marker",
                "Marks",
                "Mean",
                "Std. dev.",
                "Median",
                "Range",
                `Distribution (${bins.length} bins from 0 to ${maxTotal})`,
              ]}
            />
            <tbody className="divide-y divide-ink-900/5 tabular-nums">
              {[
                ...markers.map((entry) => ({ ...entry, name: entry.marker?.name ?? "A removed account" })),
                { ...overall, name: "Everyone" },
              ].map((entry) => (
                <tr key={entry.name} className={entry.name === "Everyone" ? "font-medium" : undefined}>
                  <th scope="row" className="px-3 py-2 text-left font-medium">
                    {entry.name}
                  </th>
                  <td className="px-3 py-2">{entry.count}</td>
                  <td className="px-3 py-2">{round(entry.mean)}</td>
                  <td className="px-3 py-2">{round(entry.standardDeviation)}</td>
                  <td className="px-3 py-2">{round(entry.median)}</td>
                  <td className="px-3 py-2">{entry.min === null ? "—" : `${entry.min}–${entry.max}`}</td>
                  <td className="px-3 py-1">
                    <Histogram counts={entry.histogram} bins={bins} tallest={tallest} label={`Totals marked by ${entry.name}`} />
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        <p className="mt-1 text-xs text-ink-700">
          A marker whose mean or spread sits apart from the others is worth a look at a few of their marks; the desk filters by cohort.
        </p>
      </section>

      {marked.length ? (
        <section aria-labelledby="adjust-heading" className="max-w-3xl">
          <h2 id="adjust-heading" className="mb-2 text-lg font-semibold">
            Adjust a mark
          </h2>
          <Form
            method="post"
            className="grid gap-3 rounded-lg bg-white p-4 shadow-sm ring-1 ring-ink-900/10 sm:grid-cols-2"
            {...getFormProps(adjustForm)}
          >
            <input type="hidden" name="intent" value="adjust" />
            {adjustForm.errors?.length ? (
              <div className="sm:col-span-2">
                <Notice tone="error">{adjustForm.errors.join(" ")}</Notice>
              </div>
            ) : null}
            <StudentChoice marked={marked} field={adjustFields.membershipId} />
            <SelectField label="What" field={adjustFields.target} required>
              <option value="">Choose…</option>
              {lab.rubric.map((criterion) => (
                <option key={criterion.id} value={`criterion:${criterion.id}`}>
                  {criterion.title} ({criterion.kind === "levels" ? "level number" : "points"})
                </option>
              ))}
              <option value="penalty">Late penalty (points)</option>
            </SelectField>
            <TextField label="New value" field={adjustFields.value} inputMode="decimal" required hint="A level's number, or points." />
            <TextField
              label="Why"
              field={adjustFields.reason}
              className="sm:col-span-2"
              required
              hint="Kept with the change; a student whose mark is released sees it."
            />
            <div>
              <Button type="submit" disabled={busy}>
                Adjust the mark
              </Button>
            </div>
          </Form>
        </section>
      ) : null}

      <section aria-labelledby="changes-heading">
        <h2 id="changes-heading" className="mb-2 text-lg font-semibold">
          Every change of a mark (latest {changes.length})
        </h2>
        {changes.length === 0 ? (
          <p className="text-ink-700">No mark has been given yet.</p>
        ) : (
          <div className="overflow-x-auto rounded-lg bg-white shadow-sm ring-1 ring-ink-900/10">
            <table className="min-w-full text-left text-sm">
              <TableHead headers={["When", "Student", "By", "From", "Total", "What changed", "Why"]} />
              <tbody className="divide-y divide-ink-900/5">
                {changes.map((change) => (
                  <tr key={change.id}>
                    <td className="whitespace-nowrap px-3 py-2">
                      <LabTime at={change.changedAt} courseTimeZone={timeZone} />
                    </td>
                    <td className="px-3 py-2">{change.studentName}</td>
                    <td className="px-3 py-2">{change.changedBy?.name ?? "—"}</td>
                    <td className="px-3 py-2">
                      {change.source === "desk" ? "desk" : change.source === "bulk" ? "bulk action" : "moderation"}
                      {change.afterRelease ? <span className="ml-1 text-amber-700">after release</span> : null}
                    </td>
                    <td className="px-3 py-2 tabular-nums">
                      {change.old ? `${change.old.total} → ` : ""}
                      {change.new.total}
                    </td>
                    <td className="px-3 py-2">{describeChange(change.old, change.new, names)}</td>
                    <td className="px-3 py-2">{change.reason ?? ""}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </section>
    </div>
  );
}

type Preview = Route.ComponentProps["loaderData"]["release"];

/** Each standing's count, in the words the release form uses. */
const standingWords: [keyof ReleaseCounts, string][] = [
  ["fully-marked", "fully marked"],
  ["partly-marked", "partly marked"],
  ["marked-on-earlier-version", "marked on an earlier version than their latest hand-in"],
  ["not-marked", "handed in, not marked yet (never released)"],
  ["no-hand-in", "handed in nothing, and can no longer"],
  ["no-hand-in-still-open", "handed in nothing yet, and still may (never released)"],
  ["released", "already released"],
];

/** Release, as a choice with its counts: nothing is released before the instructor picks whom. */
function ReleaseForm({
  release,
  timeZone,
  busy,
  again,
  values,
}: {
  release: Preview;
  timeZone: string;
  busy: boolean;
  again: boolean;
  values?: Record<string, string>;
}) {
  const [scope, setScope] = useState(values?.scope ?? "");
  const [zeroForNoHandIn, setZeroForNoHandIn] = useState(values?.zeroForNoHandIn === "on");
  const { counts, stillOpen } = release;
  const count = scope === "marked" || scope === "all" ? releasedCount(counts, { scope, zeroForNoHandIn }) : null;
  return (
    <Form method="post" className="flex flex-col gap-3 border-t border-ink-900/10 pt-3" aria-labelledby="release-heading">
      <input type="hidden" name="intent" value="release" />
      <h3 id="release-heading" className="font-semibold">
        {again ? "Release the marks added since" : "Release the marks"}
      </h3>
      <ul className="text-sm" aria-label="Where the students stand">
        {standingWords.map(([standing, words]) => (
          <li key={standing}>
            <span className="tabular-nums">{counts[standing]}</span> {words}
          </li>
        ))}
      </ul>
      {stillOpen.students ? (
        <Notice tone="warning">
          {stillOpen.students} student{stillOpen.students === 1 ? "" : "s"} may still hand in (extensions counted)
          {stillOpen.until ? (
            <>
              , until <LabTime at={stillOpen.until} courseTimeZone={timeZone} />
            </>
          ) : null}
          . After the release, a hand-in from a student whose mark is released is handled as the lab says:{" "}
          {afterReleaseHandInNames[release.afterReleaseHandIns].toLowerCase()}.
        </Notice>
      ) : null}
      {stillOpen.students ? (
        <label className="flex items-center gap-2 text-sm">
          <input type="checkbox" name="whileOpen" defaultChecked={values?.whileOpen === "on"} /> Release anyway, while hand-ins are still
          possible
        </label>
      ) : null}
      <fieldset className="flex flex-col gap-1 text-sm">
        <legend className="font-medium">Whom to release</legend>
        <label className="flex items-center gap-2">
          <input type="radio" name="scope" value="marked" checked={scope === "marked"} onChange={() => setScope("marked")} required /> Only
          the fully marked students ({counts["fully-marked"]})
        </label>
        <label className="flex items-center gap-2">
          <input type="radio" name="scope" value="all" checked={scope === "all"} onChange={() => setScope("all")} /> Every marked student,
          partly marked included ({counts["fully-marked"] + counts["partly-marked"] + counts["marked-on-earlier-version"]})
        </label>
        <label className="mt-1 flex items-center gap-2">
          <input
            type="checkbox"
            name="zeroForNoHandIn"
            checked={zeroForNoHandIn}
            onChange={(event) => setZeroForNoHandIn(event.target.checked)}
          />{" "}
          Release zero for no hand-in ({counts["no-hand-in"]}; a mark already given to one of them is released as it is)
        </label>
      </fieldset>
      <div>
        <Button type="submit" disabled={busy || count === null}>
          {count === null ? "Choose whom to release" : `Release ${count} mark${count === 1 ? "" : "s"} and e-mail their students`}
        </Button>
      </div>
    </Form>
  );
}

/** The student's select, with the version the adjustment starts from beside it: a mark changed meanwhile is then a conflict, not overwritten. */
function StudentChoice({
  marked,
  field,
}: {
  marked: { membershipId: string; name: string; total: number; version: number; markedBy: string | null }[];
  field: FieldMetadata<string>;
}) {
  // Controlled, so that the version sent beside it is the chosen student's.
  const [membershipId, setMembershipId] = useState(field.initialValue ?? "");
  return (
    <>
      <SelectField label="Student" field={field} value={membershipId} onChange={(event) => setMembershipId(event.target.value)} required>
        <option value="">Choose…</option>
        {marked.map((row) => (
          <option key={row.membershipId} value={row.membershipId}>
            {row.name} — {row.total} ({row.markedBy ?? "no marker"})
          </option>
        ))}
      </SelectField>
      <input type="hidden" name="expectedVersion" value={marked.find((row) => row.membershipId === membershipId)?.version ?? 0} />
    </>
  );
}

type State = Route.ComponentProps["loaderData"]["changes"][number]["new"];

/** In words, which parts of a mark one change touched. */
function describeChange(before: State | null, after: State, names: Map<string, string>): string {
  if (!before) return "first marked";
  const parts: string[] = [];
  for (const id of new Set([...Object.keys(before.scores), ...Object.keys(after.scores)])) {
    const from = before.scores[id]?.points;
    const to = after.scores[id]?.points;
    if (from !== to) parts.push(`${names.get(id) ?? "a removed criterion"} ${from ?? "—"} → ${to ?? "—"}`);
  }
  if (before.latePenaltyPoints !== after.latePenaltyPoints)
    parts.push(`late penalty ${before.latePenaltyPoints} → ${after.latePenaltyPoints}`);
  if (before.feedback !== after.feedback) parts.push("feedback");
  return parts.join("; ") || "released as it was";
}

export function meta({ data: loaderData }: Route.MetaArgs) {
  return [{ title: `Moderation: ${loaderData?.lab.title ?? "lab"} · Benchpost` }];
}
