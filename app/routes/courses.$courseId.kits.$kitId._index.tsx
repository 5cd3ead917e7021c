import { data, Link } from "react-router";
import type { Route } from "./+types/courses.$courseId.kits.$kitId._index";
import { KitStateBadge } from "~/components/kit-state-badge";
import { CheckInForm } from "~/components/kits/check-in-form";
import { KitHistory } from "~/components/kits/kit-history";
import { KitProblemList } from "~/components/kits/kit-problems";
import { kitInput } from "~/components/kits/kit-input";
import { PackForm, ShipForm, SimpleMoves } from "~/components/kits/kit-moves";
import { KitParts } from "~/components/kits/kit-parts";
import { SafetyCautions } from "~/components/safety-cautions";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { parseSubmission, replyFor } from "~/lib/forms/submission";
import { nextKitStates } from "~/lib/kits/kit-states";
import { canOpenKit, requireCourseRole, staffRoles, type CourseAccess } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { listKitProblems } from "~/server/kits/kit-problems.server";
import { checkInKits, getKit, listStudentsWithoutKit, moveKits } from "~/server/kits/kits.server";
import { isEntityId } from "~/lib/forms/ids";
import { calendarDayIn, formatCalendarDay } from "~/lib/format-date";

async function loadKitFor(access: CourseAccess, kitId: string | undefined) {
  const kit = kitId && isEntityId(kitId) ? await getKit(db, access.course.id, kitId) : null;
  if (!kit) throw data("Not found", { status: 404 });
  if (!canOpenKit(access, kit.holder?.cohortId)) throw data("Forbidden", { status: 403 });
  return kit;
}

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, staffRoles);
  const kit = await loadKitFor(access, params.kitId);
  const canChange = access.membership.role === "instructor";
  const [students, problems] = await Promise.all([
    canChange && kit.state === "on_shelf" ? listStudentsWithoutKit(db, access.course.id) : [],
    listKitProblems(db, access.course.id, { kitId: kit.id, openOnly: true }),
  ]);
  return { kit, canChange, students, problems, timeZone: access.course.timeZone, today: calendarDayIn(new Date(), access.course.timeZone) };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const kit = await loadKitFor(access, params.kitId);
  const submission = parseSubmission(formData, kitInput);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const base = { courseId: access.course.id, actorId: access.user.id, kitIds: [kit.id] };
  const input = submission.value;
  if (input.intent === "pack")
    await moveKits(db, { ...base, move: { to: "packed", holderMembershipId: input.holderMembershipId, note: input.note } });
  else if (input.intent === "ship") {
    const { carrier, trackingNumber, shippedOn, note } = input;
    await moveKits(db, { ...base, move: { to: "in_transit", shipping: { carrier, trackingNumber, shippedOn }, note } });
  } else if (input.intent === "move") await moveKits(db, { ...base, move: { to: input.to, note: input.note } });
  else {
    const conditions = Object.fromEntries(input.parts.map((part) => [part.partId, part.condition]));
    const remeasure = input.parts.filter((part) => part.remeasure).map((part) => part.partId);
    await checkInKits(db, {
      courseId: base.courseId,
      actorId: base.actorId,
      kits: [{ kitId: kit.id, conditions, remeasure }],
      note: input.note,
    });
  }
  return { intent: input.intent, saved: true as const };
});

export default function KitPage({ loaderData, actionData }: Route.ComponentProps) {
  const { kit, canChange, students, problems, timeZone, today } = loaderData;
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
            for{" "}
            <Link to={`/courses/${kit.courseId}/members/${kit.holder.id}/record`} className="underline">
              {kit.holder.user.name}
            </Link>{" "}
            ({kit.holder.cohort?.name ?? "no cohort"})
          </span>
        ) : null}
        {kit.trackingNumber ? (
          <span className="ml-2 text-sm">
            · {kit.carrier} {kit.trackingNumber}, sent {kit.shippedOn && formatCalendarDay(kit.shippedOn)}
          </span>
        ) : null}
        {kit.returnTrackingNumber ? (
          <span className="ml-2 text-sm">
            · back with {kit.returnCarrier} {kit.returnTrackingNumber}, sent {kit.returnShippedOn && formatCalendarDay(kit.returnShippedOn)}
          </span>
        ) : null}
      </PageHeader>

      {actionData && "saved" in actionData ? <Notice tone="success">Saved.</Notice> : null}

      <KitProblemList
        problems={problems}
        timeZone={timeZone}
        heading="Open problems"
        linkToProblem={(id) => `/courses/${kit.courseId}/kits/problems/${id}`}
      />

      <KitParts parts={kit.parts.map(({ part }) => part)} />

      {canChange && next.length > 0 ? (
        <section aria-labelledby="move-heading" className="flex flex-col gap-4">
          <h2 id="move-heading" className="text-lg font-semibold">
            Next step
          </h2>
          {next.includes("packed") ? <PackForm students={students} lastResult={replyFor(actionData, "pack")} /> : null}
          {next.includes("in_transit") ? <ShipForm today={today} lastResult={replyFor(actionData, "ship")} /> : null}
          {next.includes("checked_in") ? (
            <CheckInForm parts={kit.parts.map(({ part }) => part)} lastResult={replyFor(actionData, "check-in")} />
          ) : null}
          <SimpleMoves next={next} lastResult={replyFor(actionData, "move")} />
        </section>
      ) : null}

      <KitHistory events={kit.events} timeZone={timeZone} />

      <SafetyCautions compact />
    </div>
  );
}

export function meta({ data: loaderData }: Route.MetaArgs) {
  return [{ title: `Kit ${loaderData?.kit.number ?? ""} · Benchpost` }];
}
