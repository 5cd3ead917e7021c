import { Link } from "react-router";
import type { Route } from "./+types/courses.$courseId.labs._index";
import { LabTime } from "~/components/drop-logs/lab-time";
import { ButtonLink } from "~/components/ui/button";
import { PageHeader } from "~/components/ui/page-header";
import { dropLogStatus, dropLogStatusLabels, type DropLogStatus } from "~/lib/drop-logs/hand-in-window";
import { anyRole, isStaff, requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { listLabsForMember } from "~/server/drop-logs/lab-list.server";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, anyRole);
  const labs = await listLabsForMember(db, access);
  return {
    courseId: access.course.id,
    timeZone: access.course.timeZone,
    staff: isStaff(access),
    instructor: access.membership.role === "instructor",
    labs,
  };
}

const statusStyles: Record<DropLogStatus, string> = {
  "not-started": "ring-ink-400 text-ink-800",
  draft: "ring-amber-500 text-amber-800",
  "handed-in": "ring-consistent text-consistent",
  late: "ring-outlier text-outlier",
};

export default function Labs({ loaderData }: Route.ComponentProps) {
  const { courseId, timeZone, staff, instructor, labs } = loaderData;
  return (
    <div>
      <PageHeader title="Labs" actions={instructor ? <ButtonLink to={`/courses/${courseId}/labs/new`}>New lab</ButtonLink> : null} />
      {labs.length === 0 ? <p>{staff ? "No labs in this course yet." : "No labs have been set for your cohort yet."}</p> : null}
      <ul className="flex flex-col gap-3">
        {labs.map((lab) => {
          const status = dropLogStatus({ hasDraft: lab.hasDraft, latestLate: lab.latestLate });
          const to = staff ? `/courses/${courseId}/labs/${lab.id}/dashboard` : `/courses/${courseId}/labs/${lab.id}`;
          return (
            <li key={lab.id} className="rounded-lg bg-white p-4 shadow-sm ring-1 ring-ink-900/10">
              <div className="flex flex-wrap items-baseline justify-between gap-2">
                <Link to={to} className="text-lg font-medium underline-offset-2 hover:underline">
                  {lab.title}
                </Link>
                {staff ? (
                  <span className="text-sm text-ink-700">
                    {lab.status === "draft" ? "Not published" : lab.status === "closed" ? "Closed" : "Published"}
                  </span>
                ) : (
                  <span className={`rounded px-2 py-0.5 text-sm ring-1 ${statusStyles[status]}`}>
                    {dropLogStatusLabels[status]}
                    {lab.versionCount > 1 ? ` (version ${lab.versionCount})` : ""}
                  </span>
                )}
              </div>
              <p className="text-sm text-ink-700">{lab.kind === "drag" ? "Drag on a settling sphere" : "Falling-ball viscometry"}</p>
              <p className="mt-1 text-sm">
                Due <LabTime at={lab.dueAt} courseTimeZone={timeZone} />
              </p>
              {staff ? (
                <p className="mt-1 flex flex-wrap gap-x-4 text-sm">
                  <Link to={`/courses/${courseId}/labs/${lab.id}/comparison`} className="underline">
                    Class comparison
                  </Link>
                  {instructor ? (
                    <Link to={`/courses/${courseId}/labs/${lab.id}/edit`} className="underline">
                      Settings
                    </Link>
                  ) : null}
                </p>
              ) : null}
            </li>
          );
        })}
      </ul>
    </div>
  );
}

export function meta() {
  return [{ title: "Labs · Benchpost" }];
}
