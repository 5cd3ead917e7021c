/**
 * One student's hand-in as staff read it: every version with its reduction, warnings, drop times and
 * photos, and the counted version's class label with its reason. The marking desk's side panel loads
 * this route's data with a fetcher, so it shows the same thing.
 */
import { data, Link } from "react-router";
import type { Route } from "./+types/courses.$courseId.labs.$labId.hand-ins.$dropLogId";
import { HandInDetail, type HandInDetailData } from "~/components/drop-logs/hand-in-detail";
import { LabStaffNav } from "~/components/labs/lab-staff-nav";
import { PageHeader } from "~/components/ui/page-header";
import { photoView, versionView } from "~/lib/drop-logs/version-view";
import { requireStudentAccess } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { findDropLogOwner } from "~/server/drop-logs/drop-log-list.server";
import { getDropLogForStudent } from "~/server/drop-logs/hand-in.server";
import { loadClassLabels } from "~/server/marking/mark-rows.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";
import { loadMarkingLab } from "~/server/marking/marking-lab.server";
import { staffRoles } from "~/server/auth/access.server";
import { isEntityId } from "~/lib/forms/ids";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const { access, lab } = await requireLabAccess({ request, context }, params, staffRoles, loadMarkingLab);
  const owner = isEntityId(params.dropLogId) ? await findDropLogOwner(db, lab.id, params.dropLogId) : null;
  if (!owner) throw data("Not found", { status: 404 });
  // A TA of another cohort is refused here, and the refusal recorded, before anything is read.
  await requireStudentAccess({ request, context }, access.course.id, owner);
  const [dropLog, labels] = await Promise.all([
    getDropLogForStudent(db, { labId: lab.id, membershipId: owner.membershipId }),
    loadClassLabels(db, lab),
  ]);
  if (!dropLog) throw data("Not found", { status: 404 });
  const detail: HandInDetailData = {
    courseId: access.course.id,
    timeZone: access.course.timeZone,
    lab: { id: lab.id, title: lab.title, kind: lab.kind },
    studentName: owner.studentName,
    classLabel: labels.get(dropLog.id) ?? null,
    latestVersionId: dropLog.latestVersionId,
    versions: dropLog.versions.map(versionView),
    photos: dropLog.photos.map(photoView),
  };
  return { ...detail, instructor: access.membership.role === "instructor", membershipId: owner.membershipId };
}

export default function HandInPage({ loaderData }: Route.ComponentProps) {
  const { courseId, lab, studentName, instructor, membershipId } = loaderData;
  return (
    <div>
      <PageHeader
        title={studentName}
        trail={[
          { to: `/courses/${courseId}/labs`, label: "Labs" },
          { to: `/courses/${courseId}/labs/${lab.id}/dashboard`, label: lab.title },
        ]}
        tabs={<LabStaffNav courseId={courseId} labId={lab.id} instructor={instructor} />}
        actions={
          <Link to={`/courses/${courseId}/members/${membershipId}/record`} className="rounded-md px-4 py-2 text-sm ring-1 ring-ink-900/20">
            Student record
          </Link>
        }
      >
        Hand-in for {lab.title}
      </PageHeader>
      <HandInDetail handIn={loaderData} />
    </div>
  );
}

export function meta({ data: loaderData }: Route.MetaArgs) {
  return [{ title: `${loaderData?.studentName ?? "Hand-in"} · Benchpost` }];
}
