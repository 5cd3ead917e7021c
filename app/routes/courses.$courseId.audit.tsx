import type { Route } from "./+types/courses.$courseId.audit";
import { formatDateTime } from "~/lib/format-date";
import { counted, plural } from "~/lib/plural";
import { PageHeader } from "~/components/ui/page-header";
import { requireCourseRole } from "~/server/auth/access.server";
import { listCourseAudit } from "~/server/audit.server";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  return { course: access.course, events: await listCourseAudit(access.course.id) };
}

export default function CourseAudit({ loaderData }: Route.ComponentProps) {
  const { course, events } = loaderData;
  return (
    <div className="space-y-6">
      <PageHeader id="audit-title" title="Audit log">
        {`${course.code} ${course.title}: ${plural(events.length, "the latest event", `the latest ${counted(events.length, "event", "events")}, newest first`)}.`}
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
              <th scope="col" className="min-w-64 px-3 py-2 font-medium">
                What happened
              </th>
              <th scope="col" className="px-3 py-2 font-medium">
                From
              </th>
            </tr>
          </thead>
          <tbody className="divide-y divide-ink-900/10">
            {events.map((event, index) => (
              // The list is read once, newest first, and never reordered: its position is its key.
              <tr key={index} className="align-top">
                <td className="whitespace-nowrap px-3 py-2">
                  <time dateTime={new Date(event.createdAt).toISOString()}>
                    {formatDateTime(event.createdAt, course.timeZone, "seconds")}
                  </time>
                </td>
                <td className="px-3 py-2">{event.sentence}</td>
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
