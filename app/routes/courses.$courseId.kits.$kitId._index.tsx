import { data, Form, Link, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.kits.$kitId._index";
import { KitStateBadge } from "~/components/kit-state-badge";
import { SafetyCautions } from "~/components/safety-cautions";
import { SelectField, TextField } from "~/components/ui/field";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { formatDateTime } from "~/lib/format-date";
import { describePart } from "~/lib/kits/describe-part";
import { kitStateLabels, nextKitStates, partConditions, type KitState } from "~/lib/kits/kit-states";
import { fieldErrors, formFailure, formValues } from "~/lib/forms/parse-form";
import { canOpenKit, requireCourseRole, staffRoles, type CourseAccess } from "~/server/auth/access.server";
import { AppError } from "~/lib/app-error";
import { db } from "~/server/db.server";
import { checkInKit, getKit, listStudentsWithoutKit, moveKits } from "~/server/kits/kits.server";

const note = z.string().trim().max(500).optional();
const kitAction = z.discriminatedUnion("intent", [
  z.object({ intent: z.literal("pack"), holderMembershipId: z.uuid({ error: "Choose the student the kit is packed for." }), note }),
  z.object({
    intent: z.literal("ship"),
    carrier: z.string().trim().min(1, "Name the carrier.").max(60),
    trackingNumber: z.string().trim().min(3, "Enter the tracking number.").max(60),
    shippedOn: z.iso.date({ error: "Enter the date the parcel left." }),
    note,
  }),
  z.object({ intent: z.literal("move"), to: z.enum(["at_home", "coming_back", "on_shelf", "retired"]), note }),
  z.object({
    intent: z.literal("check-in"),
    conditions: z.record(z.uuid(), z.enum(partConditions)),
    remeasure: z.array(z.uuid()),
    note,
  }),
]);

async function loadKitFor(access: CourseAccess, kitId: string | undefined) {
  const kit = kitId && z.uuid().safeParse(kitId).success ? await getKit(db, access.course.id, kitId) : null;
  if (!kit) throw data("Not found", { status: 404 });
  if (!canOpenKit(access, kit.holder?.cohortId)) throw data("Forbidden", { status: 403 });
  return kit;
}

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, staffRoles);
  const kit = await loadKitFor(access, params.kitId);
  const canChange = access.membership.role === "instructor";
  const students = canChange && kit.state === "on_shelf" ? await listStudentsWithoutKit(db, access.course.id) : [];
  return { kit, canChange, students, timeZone: access.course.timeZone, today: new Date().toISOString().slice(0, 10) };
}

export async function action({ request, context, params }: Route.ActionArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const kit = await loadKitFor(access, params.kitId);
  const form = await request.formData();
  const values = formValues(form);
  const conditions = Object.fromEntries(
    [...form.entries()].filter(([key]) => key.startsWith("condition:")).map(([key, value]) => [key.slice(10), value]),
  );
  const parsed = kitAction.safeParse({ ...values, conditions, remeasure: form.getAll("remeasure") });
  if (!parsed.success) return formFailure(values, fieldErrors(parsed.error), { intent: values.intent });
  const base = { courseId: access.course.id, actorId: access.user.id };
  const input = parsed.data;
  try {
    if (input.intent === "pack")
      await moveKits(db, {
        ...base,
        kitIds: [kit.id],
        move: { to: "packed", holderMembershipId: input.holderMembershipId, note: input.note },
      });
    else if (input.intent === "ship") {
      const { carrier, trackingNumber, shippedOn } = input;
      await moveKits(db, {
        ...base,
        kitIds: [kit.id],
        move: { to: "in_transit", shipping: { carrier, trackingNumber, shippedOn }, note: input.note },
      });
    } else if (input.intent === "move") await moveKits(db, { ...base, kitIds: [kit.id], move: { to: input.to, note: input.note } });
    else await checkInKit(db, { ...base, kitId: kit.id, conditions: input.conditions, remeasure: input.remeasure, note: input.note });
    return { intent: input.intent, saved: true as const };
  } catch (error) {
    if (!(error instanceof AppError)) throw error;
    return formFailure(values, { form: [error.message] }, { intent: values.intent });
    throw error;
  }
}

export default function KitPage({ loaderData, actionData }: Route.ComponentProps) {
  const { kit, canChange, students, timeZone, today } = loaderData;
  const failure = actionData && "errors" in actionData ? actionData : null;
  const next = nextKitStates(kit.state);
  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        title={`Kit ${kit.number}`}
        trail={[{ to: `/courses/${kit.courseId}/kits`, label: "Kits" }]}
        actions={
          // The packing slip is the instructors' (they pack); a TA would only meet a refusal there.
          canChange ? (
            <Link to="packing-slip" className="rounded-md px-4 py-2 text-sm ring-1 ring-ink-900/20">
              Packing slip
            </Link>
          ) : undefined
        }
      >
        <KitStateBadge state={kit.state} />
        {kit.holder ? (
          <span className="ml-2">
            for {kit.holder.user.name} ({kit.holder.cohort?.name ?? "no cohort"})
          </span>
        ) : null}
        {kit.trackingNumber ? (
          <span className="ml-2 text-sm">
            · {kit.carrier} {kit.trackingNumber}, sent {kit.shippedOn}
          </span>
        ) : null}
      </PageHeader>

      {failure?.errors.form ? <Notice tone="error">{failure.errors.form.join(" ")}</Notice> : null}
      {actionData && "saved" in actionData ? <Notice tone="success">Saved.</Notice> : null}

      <section aria-labelledby="parts-heading">
        <h2 id="parts-heading" className="mb-2 text-lg font-semibold">
          What is in it
        </h2>
        <ul className="divide-y divide-ink-900/5 rounded-lg bg-white ring-1 ring-ink-900/10">
          {kit.parts.map(({ part }) => (
            <PartLine key={part.id} part={part} />
          ))}
        </ul>
      </section>

      {canChange && next.length > 0 ? (
        <section aria-labelledby="move-heading" className="flex flex-col gap-4">
          <h2 id="move-heading" className="text-lg font-semibold">
            Next step
          </h2>
          {next.includes("packed") ? <PackForm students={students} failure={failure?.intent === "pack" ? failure : null} /> : null}
          {next.includes("in_transit") ? <ShipForm today={today} failure={failure?.intent === "ship" ? failure : null} /> : null}
          {next.includes("checked_in") ? <CheckInForm parts={kit.parts.map(({ part }) => part)} /> : null}
          <SimpleMoves next={next} />
        </section>
      ) : null}

      <section aria-labelledby="history-heading">
        <h2 id="history-heading" className="mb-2 text-lg font-semibold">
          History
        </h2>
        <ol className="flex flex-col gap-2 text-sm">
          {kit.events.map((event) => (
            <li key={event.id} className="rounded-md bg-white px-3 py-2 ring-1 ring-ink-900/10">
              <time dateTime={new Date(event.createdAt).toISOString()} className="text-ink-600">
                {formatDateTime(event.createdAt, timeZone)}
              </time>{" "}
              · {event.actor?.name ?? "someone"} · <EventWords event={event} />
              {event.note ? <span className="block text-ink-700">“{event.note}”</span> : null}
            </li>
          ))}
        </ol>
      </section>

      <SafetyCautions compact />
    </div>
  );
}

type KitPart = Route.ComponentProps["loaderData"]["kit"]["parts"][number]["part"];
type Failure = { errors: Record<string, string[] | undefined>; values: Record<string, string> } | null;

function PartLine({ part }: { part: KitPart }) {
  const { kind, values } = describePart(part);
  return (
    <li className="flex flex-wrap gap-x-3 px-3 py-2 text-sm">
      <strong className="min-w-20">{part.label}</strong>
      <span className="min-w-24 text-ink-600">{kind}</span>
      <span>{values}</span>
      {part.status !== "in_service" ? (
        <span className="font-medium text-outlier">{part.status === "remeasure" ? "needs re-measuring" : "retired"}</span>
      ) : null}
    </li>
  );
}

function EventWords({
  event,
}: {
  event: { action: string; fromState: KitState | null; toState: KitState | null; detail: Record<string, unknown> };
}) {
  if (event.action === "moved" && event.fromState && event.toState) {
    return (
      <span>
        {kitStateLabels[event.fromState]} → <strong>{kitStateLabels[event.toState]}</strong>
      </span>
    );
  }
  if (event.action === "reported") return <strong className="text-outlier">Problem reported: {String(event.detail.problem ?? "")}</strong>;
  if (event.action === "checked_in") return <span>Parts' condition recorded</span>;
  return <span>{event.action === "created" ? "Made up and put on the shelf" : event.action}</span>;
}

function PackForm({
  students,
  failure,
}: {
  students: { membershipId: string; name: string; email: string; cohortName: string | null }[];
  failure: Failure;
}) {
  return (
    <Form method="post" className="flex flex-wrap items-end gap-3 rounded-lg bg-white p-4 ring-1 ring-ink-900/10">
      <input type="hidden" name="intent" value="pack" />
      <div className="min-w-72 flex-1">
        <SelectField
          label="Pack for"
          name="holderMembershipId"
          required
          defaultValue={failure?.values.holderMembershipId ?? ""}
          error={failure?.errors.holderMembershipId}
        >
          <option value="">Choose a student without a kit…</option>
          {students.map((student) => (
            <option key={student.membershipId} value={student.membershipId}>
              {student.name} — {student.cohortName ?? "no cohort"} ({student.email})
            </option>
          ))}
        </SelectField>
      </div>
      <Button type="submit">Mark packed</Button>
    </Form>
  );
}

function ShipForm({ today, failure }: { today: string; failure: Failure }) {
  const navigation = useNavigation();
  return (
    <Form method="post" className="grid gap-3 rounded-lg bg-white p-4 ring-1 ring-ink-900/10 sm:grid-cols-4 sm:items-end">
      <input type="hidden" name="intent" value="ship" />
      <TextField label="Carrier" name="carrier" required defaultValue={failure?.values.carrier ?? ""} error={failure?.errors.carrier} />
      <TextField
        label="Tracking number"
        name="trackingNumber"
        required
        defaultValue={failure?.values.trackingNumber ?? ""}
        error={failure?.errors.trackingNumber}
      />
      <TextField
        label="Sent on"
        name="shippedOn"
        type="date"
        required
        defaultValue={failure?.values.shippedOn ?? today}
        error={failure?.errors.shippedOn}
      />
      <Button type="submit" disabled={navigation.state === "submitting"}>
        Mark in transit and tell the student
      </Button>
    </Form>
  );
}

function CheckInForm({ parts }: { parts: KitPart[] }) {
  return (
    <Form method="post" className="flex flex-col gap-3 rounded-lg bg-white p-4 ring-1 ring-ink-900/10">
      <input type="hidden" name="intent" value="check-in" />
      <p className="text-sm text-ink-700">
        Record each part's condition. Damaged or missing parts are retired; tick a part to send it for re-measurement.
      </p>
      <table className="text-sm">
        <caption className="sr-only">Condition of each part</caption>
        <thead>
          <tr className="text-left text-ink-600">
            <th scope="col">Part</th>
            <th scope="col">Condition</th>
            <th scope="col">Re-measure</th>
          </tr>
        </thead>
        <tbody>
          {parts.map((part) => (
            <tr key={part.id}>
              <td className="py-1 pr-3">{part.label}</td>
              <td className="py-1 pr-3">
                <select
                  name={`condition:${part.id}`}
                  defaultValue="fine"
                  aria-label={`Condition of ${part.label}`}
                  className="rounded border border-ink-900/20 px-2 py-1"
                >
                  {partConditions.map((condition) => (
                    <option key={condition} value={condition}>
                      {condition}
                    </option>
                  ))}
                </select>
              </td>
              <td className="py-1">
                <input type="checkbox" name="remeasure" value={part.id} aria-label={`Send ${part.label} for re-measurement`} />
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      <TextField label="Note" name="note" />
      <Button type="submit">Check the kit in</Button>
    </Form>
  );
}

function SimpleMoves({ next }: { next: readonly KitState[] }) {
  const simple = next.filter((state): state is "at_home" | "coming_back" | "on_shelf" | "retired" =>
    ["at_home", "coming_back", "on_shelf", "retired"].includes(state),
  );
  if (!simple.length) return null;
  return (
    <Form method="post" className="flex flex-wrap items-end gap-3">
      <input type="hidden" name="intent" value="move" />
      <TextField label="Note (optional)" name="note" />
      {simple.map((state) => (
        <Button key={state} type="submit" name="to" value={state} variant={state === "retired" ? "danger" : "secondary"}>
          {state === "retired" ? "Retire the kit" : `Mark ${kitStateLabels[state].toLowerCase()}`}
        </Button>
      ))}
    </Form>
  );
}

export function meta({ data: loaderData }: Route.MetaArgs) {
  return [{ title: `Kit ${loaderData?.kit.number ?? ""} · Benchpost` }];
}
