import type { Route } from "./+types/courses.$courseId.labs.$labId.dashboard";
import { DashboardStudents } from "~/components/labs/dashboard-students";
import { DeadlineReminders } from "~/components/labs/dashboard-reminders";
import { CohortProgressTable, LabTimesList } from "~/components/labs/dashboard-summary";
import { LabStaffNav } from "~/components/labs/lab-staff-nav";
import { PageHeader } from "~/components/ui/page-header";
import { experimentKindNames } from "~/lib/labs/lab-input";
import { staffRoles } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { getLabDashboard } from "~/server/labs/lab-dashboard.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";
import { getLab } from "~/server/labs/labs.server";
import { counted } from "~/lib/plural";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  // Instructors, and the TAs of a cohort the lab is set for: the same people as its class comparison.
  const { access, lab } = await requireLabAccess({ request, context }, params, staffRoles, getLab);
  const dashboard = await getLabDashboard(db, access, lab);
  return {
    courseId: access.course.id,
    timeZone: access.course.timeZone,
    instructor: access.membership.role === "instructor",
    lab: {
      id: lab.id,
      title: lab.title,
      kind: lab.kind,
      status: lab.status,
      opensAt: lab.opensAt.toISOString(),
      dueAt: lab.dueAt.toISOString(),
      lateCutoffAt: lab.lateCutoffAt?.toISOString() ?? null,
      requiredDrops: lab.requiredDrops,
    },
    ...dashboard,
  };
}

export default function LabDashboard({ loaderData }: Route.ComponentProps) {
  const { courseId, timeZone, instructor, lab, cohorts, students, sentReminders, scheduledReminders } = loaderData;
  return (
    <div className="flex flex-col gap-8">
      <PageHeader
        title={lab.title}
        trail={[{ to: `/courses/${courseId}/labs`, label: "Labs" }]}
        tabs={<LabStaffNav courseId={courseId} labId={lab.id} instructor={instructor} />}
      >
        {experimentKindNames[lab.kind]} · {lab.status === "draft" ? "draft, not published" : lab.status} ·{" "}
        {counted(lab.requiredDrops, "drop", "drops")}
      </PageHeader>

      <LabTimesList lab={lab} timeZone={timeZone} />
      <CohortProgressTable cohorts={cohorts} />
      <DashboardStudents courseId={courseId} timeZone={timeZone} instructor={instructor} lab={lab} students={students} />
      <DeadlineReminders lab={lab} timeZone={timeZone} scheduledReminders={scheduledReminders} sentReminders={sentReminders} />
    </div>
  );
}

export function meta({ loaderData }: Route.MetaArgs) {
  return [{ title: `${loaderData?.lab.title ?? "Lab"} · hand-ins · Benchpost` }];
}
