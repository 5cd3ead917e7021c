import { redirect, type ShouldRevalidateFunctionArgs } from "react-router";
import type { Route } from "./+types/courses.$courseId.labs.$labId._index";
import { DropLogForm } from "~/components/drop-logs/drop-log-form";
import { HandInNotices } from "~/components/drop-logs/hand-in-notices";
import { HandInReceipt } from "~/components/drop-logs/hand-in-receipt";
import { LabTime } from "~/components/drop-logs/lab-time";
import { PhotoUpload } from "~/components/drop-logs/photo-upload";
import { VersionHistory } from "~/components/drop-logs/version-history";
import { StudentMarkView } from "~/components/marking/student-mark";
import { SafetyCautions } from "~/components/safety-cautions";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { draftFromInput, dropLogDraft, dropLogDraftFromForm, dropLogInputFromForm } from "~/lib/drop-logs/drop-log-input";
import { handInTiming } from "~/lib/drop-logs/hand-in-window";
import { kitStateLabels, kitStatesBeforeHome } from "~/lib/kits/kit-states";
import { photoView, versionView } from "~/lib/drop-logs/version-view";
import { anyRole, isStaff, requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { formAction, throwAsResponse } from "~/server/errors.server";
import { loadStudentMark } from "~/server/marking/student-mark.server";
import {
  getDropLogForStudent,
  handInDropLog,
  handInRefusal,
  loadStudentLab,
  markReleasedMessage,
  saveDraft,
} from "~/server/drop-logs/hand-in.server";

export async function loader({ request, params, context: routerContext }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context: routerContext }, params.courseId, anyRole);
  // This page is the student's bench; staff follow a lab from its hand-in dashboard.
  if (isStaff(access)) throw redirect(`/courses/${access.course.id}/labs/${params.labId}/dashboard`);
  const [context, dropLog, mark] = await Promise.all([
    loadStudentLab(db, access, params.labId).catch(throwAsResponse(request)),
    getDropLogForStudent(db, { labId: params.labId, membershipId: access.membership.id }),
    loadStudentMark(db, { access, labId: params.labId }),
  ]);
  const { lab } = context;
  const usable = (kind: "sphere" | "fluid_lot" | "column") => context.usableParts.filter((part) => part.kind === kind);
  const kitsNotHome = [
    ...new Map(
      context.kitParts.filter((part) => kitStatesBeforeHome.includes(part.kitState)).map((part) => [part.kitNumber, part.kitState]),
    ).entries(),
  ];
  const versions = dropLog?.versions ?? [];
  const draft = dropLog && Object.keys(dropLog.draft).length ? dropLog.draft : versions[0] ? draftFromInput(versions[0].input) : {};
  return {
    courseId: access.course.id,
    timeZone: access.course.timeZone,
    lab: {
      id: lab.id,
      title: lab.title,
      kind: lab.kind,
      status: lab.status,
      instructions: lab.instructions,
      requiredDrops: lab.requiredDrops,
      opensAt: lab.opensAt.toISOString(),
      // The student's own times (an extension's, when they have one); the reason is never sent to them.
      dueAt: context.window.dueAt.toISOString(),
      lateCutoffAt: context.window.lateCutoffAt?.toISOString() ?? null,
    },
    timing: lab.status === "published" ? handInTiming(context.window, new Date()) : "closed",
    /** Set when the student's mark is released: what a hand-in now does, by the lab's policy. */
    afterRelease: context.afterRelease,
    hasKit: context.kitParts.length > 0,
    spheres: usable("sphere").map(({ id, label, material, diameterMm, massG }) => ({ id, label, material, diameterMm, massG })),
    fluidLots: usable("fluid_lot").map(({ id, label, fluidName, densityKgM3 }) => ({ id, label, fluidName, densityKgM3 })),
    columns: usable("column").map(({ id, label, innerDiameterMm, timedDistanceMm }) => ({ id, label, innerDiameterMm, timedDistanceMm })),
    kitsNotHome: kitsNotHome.map(([number, state]) => ({ number, state: kitStateLabels[state] })),
    draft,
    latestVersionId: dropLog?.latestVersionId ?? null,
    /** The next hand-in's idempotency key: new with each load of the page, so with each version handed in. */
    attemptKey: crypto.randomUUID(),
    versions: versions.map(versionView),
    photos: dropLog?.photos.map(photoView) ?? [],
    mark,
    releasedMessage: markReleasedMessage,
  };
}

/** The draft the form's script sends as JSON as it saves while the student types. */
function readDraft(raw: FormDataEntryValue | null): unknown {
  try {
    return typeof raw === "string" ? JSON.parse(raw) : null;
  } catch {
    throw handInRefusal("invalid_input", "The draft could not be read.");
  }
}

/** The row buttons of the drop-times table, for a browser without JavaScript: the draft is saved with the row changed. */
function changedRows(intent: string, drops: string[]): string[] | null {
  if (intent === "add-drop") return [...drops, ""];
  const removed = /^remove-drop-(\d+)$/.exec(intent);
  if (!removed) return null;
  const kept = drops.filter((_, row) => row !== Number(removed[1]));
  return kept.length ? kept : [""];
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, ["student"]);
  const intent = String(formData.get("intent") ?? "");
  if (intent === "save-draft") {
    const { savedAt } = await saveDraft(db, { access, labId: params.labId, draft: readDraft(formData.get("draft")) });
    return { draftSavedAt: savedAt.toISOString() };
  }
  if (intent === "hand-in") {
    const { version, duplicate } = await handInDropLog(db, {
      access,
      labId: params.labId,
      input: dropLogInputFromForm(formData),
      idempotencyKey: String(formData.get("idempotencyKey") ?? ""),
    });
    return { handedIn: { version: version.version, late: version.late, submittedAt: version.submittedAt.toISOString(), duplicate } };
  }
  const typed = dropLogDraftFromForm(formData);
  const drops = changedRows(intent, typed.drops ?? []);
  if (drops) {
    await saveDraft(db, { access, labId: params.labId, draft: { ...typed, drops } });
    return { rowsChanged: true };
  }
  // An unknown form still answers only to those who may use this lab.
  await loadStudentLab(db, access, params.labId);
  throw handInRefusal("invalid_input", "This form is not one the lab page knows.");
});

/** A draft save changes nothing the page shows; skipping the reload keeps typing smooth on a phone. */
export function shouldRevalidate({ formData, defaultShouldRevalidate }: ShouldRevalidateFunctionArgs) {
  return formData?.get("intent") === "save-draft" ? false : defaultShouldRevalidate;
}

export default function LabPage({ loaderData, actionData }: Route.ComponentProps) {
  const {
    courseId,
    timeZone,
    lab,
    timing,
    hasKit,
    spheres,
    fluidLots,
    columns,
    kitsNotHome,
    draft,
    versions,
    photos,
    latestVersionId,
    attemptKey,
    mark,
    afterRelease,
    releasedMessage,
  } = loaderData;
  const open = timing === "on-time" || timing === "late";
  const handedIn = (actionData && "handedIn" in actionData && actionData.handedIn) || null;
  // A refused hand-in: the errors at their fields, and what was sent, for the form to start from (without JavaScript, a new page).
  const refused = actionData && "status" in actionData && actionData.status === "error" ? actionData : null;
  const typed = refused
    ? dropLogDraft.safeParse({ ...refused.initialValue, useOwnMeasurements: refused.initialValue?.useOwnMeasurements === "on" })
    : null;
  const draftPhotos = photos.filter((photo) => photo.versionId === null);
  // The hand-in's own answer first: the receipt shows before the page's data is read again.
  const counted = handedIn ?? versions.find((version) => version.id === latestVersionId);
  return (
    <div className="flex flex-col gap-6">
      <PageHeader title={lab.title} trail={[{ to: `/courses/${courseId}/labs`, label: "Labs" }]}>
        {/* Spans, not paragraphs: the page header already sets its lead in a <p>, and a <p> inside one breaks hydration. */}
        <span className="block text-sm">
          Due <LabTime at={lab.dueAt} courseTimeZone={timeZone} />
        </span>
        {lab.lateCutoffAt ? (
          <span className="block text-sm">
            Late hand-ins until <LabTime at={lab.lateCutoffAt} courseTimeZone={timeZone} />
          </span>
        ) : (
          <span className="block text-sm">No late hand-ins after the due time.</span>
        )}
      </PageHeader>
      {mark ? <StudentMarkView mark={mark} timeZone={timeZone} /> : null}

      <HandInNotices handedIn={handedIn} timing={timing} afterRelease={afterRelease} releasedMessage={releasedMessage} />
      {counted ? <HandInReceipt version={counted} timeZone={timeZone} /> : null}

      {lab.instructions ? (
        <section aria-labelledby="instructions-heading">
          <h2 id="instructions-heading" className="mb-1 text-lg font-semibold">
            Instructions
          </h2>
          <p className="whitespace-pre-line">{lab.instructions}</p>
        </section>
      ) : null}
      <SafetyCautions compact />

      {kitsNotHome.length ? (
        <Notice tone="warning">
          {kitsNotHome.map((kit) => `Kit ${kit.number} is recorded as “${kit.state}”, not yet at home.`).join(" ")} You can still hand in;
          your hand-in will say so, so that staff can check the parts it names are the ones you used.
        </Notice>
      ) : null}
      {hasKit && spheres.length ? (
        <div className="rounded-lg bg-white p-4 shadow-sm ring-1 ring-ink-900/10">
          <DropLogForm
            key={latestVersionId ?? "new"}
            labId={lab.id}
            kind={lab.kind}
            requiredDrops={lab.requiredDrops}
            spheres={spheres}
            fluidLots={fluidLots}
            columns={columns}
            draft={typed?.success ? typed.data : draft}
            attemptKey={attemptKey}
            timeZone={timeZone}
            canHandIn={open && afterRelease !== "refuse"}
            serverErrors={refused?.error ?? null}
          />
        </div>
      ) : (
        <Notice tone="warning">You need your kit for this lab. Once it is packed for you, its sphere, fluid and column appear here.</Notice>
      )}

      {/* Photos go with the next hand-in, so they are taken only while one still is. */}
      {timing !== "closed" && afterRelease !== "refuse" ? (
        <PhotoUpload courseId={courseId} labId={lab.id} draftPhotos={draftPhotos} />
      ) : null}

      <section aria-labelledby="versions-heading">
        <h2 id="versions-heading" className="mb-2 text-lg font-semibold">
          What you handed in
        </h2>
        {versions.length === 0 ? (
          <p className="text-ink-700">Nothing yet. Each hand-in is kept as a version; the latest one counts.</p>
        ) : null}
        <VersionHistory courseId={courseId} timeZone={timeZone} versions={versions} latestVersionId={latestVersionId} photos={photos} />
      </section>
    </div>
  );
}

export function meta({ data: loaderData }: Route.MetaArgs) {
  return [{ title: `${loaderData?.lab.title ?? "Lab"} · Benchpost` }];
}
