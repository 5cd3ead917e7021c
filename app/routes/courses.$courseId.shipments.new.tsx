import { getFormProps, useForm } from "@conform-to/react";
import { data, Form, redirect, useNavigation, useSearchParams } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.shipments.new";
import { KitStateBadge } from "~/components/kit-state-badge";
import { Button } from "~/components/ui/button";
import { Pager } from "~/components/ui/data-table";
import { SelectField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { tableHeadClass } from "~/components/ui/table-head";
import { entityId } from "~/lib/forms/ids";
import { pagingSearch } from "~/lib/forms/search-params";
import { formList, parseSubmission, replyFor } from "~/lib/forms/submission";
import { kitStateLabels } from "~/lib/kits/kit-states";
import { candidateKitStates } from "~/lib/shipping/shipping-states";
import { recordAudit } from "~/server/audit.server";
import { requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { readSearchParams } from "~/server/http.server";
import {
  commitKitAssignment,
  listCandidates,
  planKitAssignment,
  shippingChoices,
  type CandidateKey,
} from "~/server/shipping/kit-assignment.server";
import { createShipment } from "~/server/shipping/shipments.server";
import { counted, plural } from "~/lib/plural";

const candidateKey = z.string().regex(/^[mi]:[0-9a-f-]{36}$/i, "Choose students from the list.") as z.ZodType<CandidateKey>;
const selection = {
  cohortId: entityId.optional(),
  kitState: z.enum(candidateKitStates).default("none"),
  keys: formList(candidateKey),
};

const preview = z.object({ intent: z.literal("preview"), labId: z.uuid({ error: "Choose the lab the kits are for." }), ...selection });
const pack = z.object({
  intent: z.literal("pack"),
  labId: entityId,
  plan: z
    .string()
    .transform((text, context) => {
      try {
        return JSON.parse(text) as unknown;
      } catch {
        context.addIssue({ code: "custom", message: "The plan did not arrive whole; preview it again." });
        return z.NEVER;
      }
    })
    .pipe(
      z
        .array(
          z.object({
            key: candidateKey,
            kitId: entityId.nullable(),
            number: z.string().min(1).max(20),
            partIds: z.array(entityId).length(3),
          }),
        )
        .min(1, "The plan has no kit to pack."),
    ),
});
const buy = z.object({ intent: z.literal("buy"), requestKey: entityId, kitIds: formList(entityId), ...selection });
const shipForm = z.discriminatedUnion("intent", [preview, pack, buy]);

const candidateSearch = z.object({
  cohort: entityId.optional().catch(undefined),
  state: z.enum(candidateKitStates).default("none"),
  ...pagingSearch(50),
});

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const { cohort, state, page, size } = readSearchParams(request, candidateSearch);
  const [choices, candidates] = await Promise.all([
    shippingChoices(db, access.course.id),
    listCandidates(db, access.course.id, { cohortId: cohort, kitState: state }, { page, pageSize: size }),
  ]);
  return {
    courseId: access.course.id,
    ...choices,
    candidates: candidates.rows,
    pageInfo: { page, pageSize: size, total: candidates.total },
    filter: { cohortId: cohort ?? "", kitState: state },
    // Names this page's "Buy labels": sending it twice (a double click, a resent form) makes one shipment.
    requestKey: crypto.randomUUID(),
  };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const submission = parseSubmission(formData, shipForm);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const input = submission.value;
  const courseId = access.course.id;
  if (input.intent === "preview") {
    const filter = { cohortId: input.cohortId, kitState: input.kitState, keys: input.keys.length ? input.keys : undefined };
    return { plan: await planKitAssignment(db, { courseId, labId: input.labId, filter }) };
  }
  if (input.intent === "pack") {
    const packed = await commitKitAssignment(db, { courseId, actorId: access.user.id, labId: input.labId, kits: input.plan });
    await recordAudit(db, {
      action: "kit.cohort_packed",
      actorId: access.user.id,
      courseId,
      subject: input.labId,
      detail: { packed: packed.packed, made: packed.made },
      request,
    });
    return { packed };
  }
  // Labels for the kits just packed, or for the packed kits of the chosen students.
  const kitIds = input.kitIds.length
    ? input.kitIds
    : (
        await listCandidates(db, courseId, {
          cohortId: input.cohortId,
          kitState: "packed",
          keys: input.keys.length ? input.keys : undefined,
        })
      ).rows.map((candidate) => candidate.kitId!);
  const { shipmentId, created } = await createShipment(db, {
    courseId,
    actorId: access.user.id,
    kind: "outbound",
    requestKey: input.requestKey,
    items: kitIds.map((kitId) => ({ kitId })),
  });
  if (created)
    await recordAudit(db, {
      action: "shipment.created",
      actorId: access.user.id,
      courseId,
      subject: shipmentId,
      detail: { kits: kitIds.length },
      request,
    });
  return redirect(`/courses/${courseId}/shipments/${shipmentId}`);
});

const refusalsOf = (reply: ReturnType<typeof replyFor>) => Object.values(reply?.error ?? {}).flatMap((messages) => messages ?? []);

export default function ShipCohort({ loaderData, actionData }: Route.ComponentProps) {
  const { courseId, labs, cohorts, candidates, pageInfo, filter, requestKey } = loaderData;
  const navigation = useNavigation();
  const [search] = useSearchParams();
  const busy = navigation.state !== "idle";
  const [form, fields] = useForm({
    id: "ship-cohort",
    lastResult: replyFor(actionData, "preview") ?? replyFor(actionData, "buy"),
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, shipForm),
  });
  const plan = actionData && "plan" in actionData ? actionData.plan : null;
  const packed = actionData && "packed" in actionData ? actionData.packed : null;
  const packRefusals = refusalsOf(replyFor(actionData, "pack"));
  return (
    <div className="flex flex-col gap-5">
      <PageHeader title="Ship a cohort" trail={[{ to: `/courses/${courseId}/shipments`, label: "Shipments" }]}>
        Choose the students, by cohort, by the kit they hold or by hand, and the lab their kits are for. The preview shows who gets which
        kit (a kit on the shelf that suits the lab, or a new kit of loose parts) and who cannot get one, and why. Packing changes nothing
        until you confirm it; then buy the labels.
      </PageHeader>

      <Form method="get" className="flex flex-wrap items-end gap-3" role="search">
        <label className="flex flex-col text-sm">
          Cohort
          <select name="cohort" defaultValue={filter.cohortId} className="rounded-md border border-ink-900/20 bg-white px-2 py-1.5">
            <option value="">Every cohort</option>
            {cohorts.map((cohort) => (
              <option key={cohort.id} value={cohort.id}>
                {cohort.name}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col text-sm">
          Kit
          <select name="state" defaultValue={filter.kitState} className="rounded-md border border-ink-900/20 bg-white px-2 py-1.5">
            {candidateKitStates.map((state) => (
              <option key={state} value={state}>
                {state === "none" ? "No kit yet" : `Kit ${kitStateLabels[state].toLowerCase()}`}
              </option>
            ))}
          </select>
        </label>
        {search.get("size") ? <input type="hidden" name="size" value={search.get("size")!} /> : null}
        <Button type="submit" variant="secondary">
          Show
        </Button>
      </Form>

      {packed ? (
        <Notice tone="success">
          {counted(packed.packed, "kit", "kits")} packed ({packed.made} made up from loose parts). Buy{" "}
          {plural(packed.packed, "its label", "their labels")} next.
        </Notice>
      ) : null}
      {packRefusals.length ? <Notice tone="error">{packRefusals.join(" ")}</Notice> : null}
      {form.errors?.length ? <Notice tone="error">{form.errors.join(" ")}</Notice> : null}

      {packed ? (
        <Form method="post">
          <input type="hidden" name="intent" value="buy" />
          <input type="hidden" name="requestKey" value={requestKey} />
          {packed.kitIds.map((kitId) => (
            <input key={kitId} type="hidden" name="kitIds" value={kitId} />
          ))}
          <Button type="submit" disabled={busy}>
            {busy ? "Starting…" : `Buy ${plural(packed.packed, "the label for the kit", `labels for the ${packed.packed} kits`)} packed`}
          </Button>
        </Form>
      ) : null}

      {plan ? <PlanPreview plan={plan} busy={busy} /> : null}

      <Form method="post" className="flex flex-col gap-3" {...getFormProps(form)}>
        <input type="hidden" name="cohortId" value={filter.cohortId} />
        <input type="hidden" name="kitState" value={filter.kitState} />
        <input type="hidden" name="requestKey" value={requestKey} />
        <SelectField label="Lab the kits are for" field={fields.labId} className="max-w-md">
          <option value="">Choose a lab</option>
          {labs.map((lab) => (
            <option key={lab.id} value={lab.id}>
              {lab.title}
            </option>
          ))}
        </SelectField>
        {fields.keys.errors?.length ? <Notice tone="error">{fields.keys.errors.join(" ")}</Notice> : null}
        <p className="text-sm text-ink-600">
          Tick students to choose them by hand; with none ticked, {plural(pageInfo.total, "the student", `all ${pageInfo.total} students`)}{" "}
          shown by the filter {plural(pageInfo.total, "is", "are")} chosen (every page).
        </p>
        <div
          role="region"
          aria-label="Students"
          tabIndex={0}
          className="overflow-x-auto rounded-lg bg-white shadow-sm ring-1 ring-ink-900/10"
        >
          <table className="min-w-full text-left text-sm">
            <caption className="sr-only">Students who can be shipped a kit</caption>
            <thead className={tableHeadClass}>
              <tr>
                <th scope="col" className="px-3 py-2 font-medium">
                  <span className="sr-only">Choose</span>
                </th>
                <th scope="col" className="px-3 py-2 font-medium">
                  Student
                </th>
                <th scope="col" className="px-3 py-2 font-medium">
                  Cohort
                </th>
                <th scope="col" className="px-3 py-2 font-medium">
                  Kit
                </th>
              </tr>
            </thead>
            <tbody className="divide-y divide-ink-900/5">
              {candidates.length === 0 ? (
                <tr>
                  <td colSpan={4} className="px-3 py-6 text-center text-ink-600">
                    No student matches.
                  </td>
                </tr>
              ) : (
                candidates.map((candidate) => (
                  <tr key={candidate.key}>
                    <td className="px-3 py-2">
                      <input type="checkbox" name="keys" value={candidate.key} className="size-5" aria-label={`Choose ${candidate.name}`} />
                    </td>
                    <td className="px-3 py-2">
                      {candidate.name}
                      <span className="block text-xs text-ink-600">
                        {candidate.email}
                        {candidate.invited ? " · invited, not yet accepted" : ""}
                      </span>
                    </td>
                    <td className="px-3 py-2">{candidate.cohortName ?? "—"}</td>
                    <td className="px-3 py-2">
                      {candidate.kitNumber && candidate.kitState ? (
                        <span className="flex items-center gap-2">
                          {candidate.kitNumber} <KitStateBadge state={candidate.kitState} />
                        </span>
                      ) : (
                        <span className="text-ink-600">None yet</span>
                      )}
                    </td>
                  </tr>
                ))
              )}
            </tbody>
          </table>
        </div>
        <Pager pageInfo={pageInfo} />
        <div className="flex flex-wrap gap-3">
          <Button type="submit" name="intent" value="preview" disabled={busy}>
            Preview kits
          </Button>
          {filter.kitState === "packed" ? (
            <Button type="submit" name="intent" value="buy" variant="secondary" disabled={busy}>
              Buy labels for their packed kits
            </Button>
          ) : null}
        </div>
      </Form>
    </div>
  );
}

type Plan = Awaited<ReturnType<typeof planKitAssignment>>;

function PlanPreview({ plan, busy }: { plan: Plan; busy: boolean }) {
  return (
    <section aria-labelledby="plan-title" className="flex flex-col gap-3 rounded-lg bg-white p-4 shadow-sm ring-1 ring-ink-900/10">
      <h2 id="plan-title" className="text-lg font-medium">
        The plan: {counted(plan.kits.length, "kit", "kits")}
        {plan.refused.length ? `, ${counted(plan.refused.length, "student", "students")} without one` : ""}
      </h2>
      {plan.kits.length ? (
        <table className="min-w-full text-left text-sm">
          <caption className="sr-only">Who gets which kit</caption>
          <thead className={tableHeadClass}>
            <tr>
              <th scope="col" className="px-3 py-2 font-medium">
                Student
              </th>
              <th scope="col" className="px-3 py-2 font-medium">
                Kit
              </th>
              <th scope="col" className="px-3 py-2 font-medium">
                Parts
              </th>
            </tr>
          </thead>
          <tbody className="divide-y divide-ink-900/5">
            {plan.kits.map((kit) => (
              <tr key={kit.key}>
                <td className="px-3 py-2">{kit.studentName}</td>
                <td className="px-3 py-2">
                  {kit.number} {kit.kitId ? "(on the shelf)" : "(new, from loose parts)"}
                </td>
                <td className="px-3 py-2">{kit.partLabels.join(", ")}</td>
              </tr>
            ))}
          </tbody>
        </table>
      ) : null}
      {plan.refused.length ? (
        <ul className="list-disc pl-5 text-sm">
          {plan.refused.map((refusal) => (
            <li key={refusal.key}>
              {refusal.studentName}: {refusal.reason}
            </li>
          ))}
        </ul>
      ) : null}
      {plan.kits.length ? (
        <Form method="post">
          <input type="hidden" name="intent" value="pack" />
          <input type="hidden" name="labId" value={plan.labId} />
          <input
            type="hidden"
            name="plan"
            value={JSON.stringify(plan.kits.map(({ key, kitId, number, partIds }) => ({ key, kitId, number, partIds })))}
          />
          <Button type="submit" disabled={busy}>
            {busy ? "Packing…" : `Pack ${plural(plan.kits.length, "this kit", `these ${plan.kits.length} kits`)}`}
          </Button>
        </Form>
      ) : null}
    </section>
  );
}

export function meta() {
  return [{ title: "Ship a cohort · Benchpost" }];
}
