import type { Route } from "./+types/courses.$courseId.audit";
import { formatDateTime } from "~/lib/format-date";
import { PageHeader } from "~/components/ui/page-header";
import { requireCourseRole } from "~/server/auth/access.server";
import { listCourseAudit } from "~/server/audit.server";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  return { course: access.course, events: await listCourseAudit(access.course.id) };
}

/** Plain words for the trail's dotted action names; unknown ones are shown as they are. */
const actionWords: Record<string, string> = {
  "access.denied": "was refused access",
  "course.invitation_sent": "sent an invitation",
  "course.invitation_accepted": "accepted an invitation",
  "course.member_role_changed": "changed a member's role",
  "course.member_moved": "moved a student to another cohort",
  "course.member_removed": "removed a member",
  "course.created": "created the course",
  "course.settings_changed": "changed the course settings",
  "lab.extension_set": "gave students a later due time",
  "lab.extension_removed": "removed an extension",
  "address.viewed": "saw a shipping address",
  "address.changed": "entered or changed a shipping address",
  "address.deleted": "deleted a shipping address",
  "address.exported": "downloaded a shipping address",
  "address.imported": "imported a shipping address",
  "markbook.settings_changed": "changed the mark book's weights",
  "markbook.exported": "downloaded the mark book",
};

export default function CourseAudit({ loaderData }: Route.ComponentProps) {
  const { course, events } = loaderData;
  return (
    <div className="space-y-6">
      <PageHeader id="audit-title" title="Audit log">
        {`${course.code} ${course.title}: ${events.length === 1 ? "the latest event" : `the latest ${events.length} events, newest first`}. Times in ${course.timeZone}.`}
      </PageHeader>
      {/* Focusable so that a keyboard can scroll the table sideways on a phone. */}
      <div
        role="region"
        aria-labelledby="audit-title"
        tabIndex={0}
        className="overflow-x-auto rounded-lg bg-white shadow-sm ring-1 ring-ink-900/10 focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-ink-700"
      >
        <table className="w-full text-left text-sm">
          <caption className="sr-only">Audit events, newest first</caption>
          <thead className="bg-paper-100 text-ink-700">
            <tr>
              <th scope="col" className="px-3 py-2 font-medium">
                When
              </th>
              <th scope="col" className="px-3 py-2 font-medium">
                Who
              </th>
              <th scope="col" className="px-3 py-2 font-medium">
                What
              </th>
              <th scope="col" className="min-w-64 px-3 py-2 font-medium">
                Details
              </th>
              <th scope="col" className="px-3 py-2 font-medium">
                From
              </th>
            </tr>
          </thead>
          <tbody className="divide-y divide-ink-900/10">
            {events.map((event) => (
              <tr key={event.id} className="align-top">
                <td className="whitespace-nowrap px-3 py-2">
                  <time dateTime={new Date(event.createdAt).toISOString()}>
                    {formatDateTime(event.createdAt, course.timeZone, "seconds")}
                  </time>
                </td>
                <td className="px-3 py-2">{event.actorName ?? "—"}</td>
                <td className="px-3 py-2">{actionWords[event.action] ?? event.action}</td>
                <td className="px-3 py-2 font-mono text-xs break-all text-ink-700">
                  {[event.subject, Object.keys(event.detail).length ? JSON.stringify(event.detail) : null].filter(Boolean).join(" ")}
                </td>
                <td className="px-3 py-2 text-ink-700">{event.ip ?? "—"}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}

export function meta({ data }: Route.MetaArgs) {
  return [{ title: data ? `Audit log · ${data.course.code} · Benchpost` : "Audit log · Benchpost" }];
}
