import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.messages._index";
import { ButtonLink } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { formatDateTime } from "~/lib/format-date";
import { requireCourseRole, staffRoles } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { readSearchParams } from "~/server/http.server";
import { listCourseMessages } from "~/server/messages/course-messages.server";
import { counted } from "~/lib/plural";

/** `?sent=N`: where sending lands, to say to how many it went. */
const messagesSearch = z.object({ sent: z.coerce.number<string>().int().min(0).optional() });

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, staffRoles);
  const { sent } = readSearchParams(request, messagesSearch);
  const messages = await listCourseMessages(db, access);
  return { messages, sent: sent ?? null, courseId: access.course.id, timeZone: access.course.timeZone };
}

export default function CourseMessages({ loaderData }: Route.ComponentProps) {
  const { messages, sent, courseId, timeZone } = loaderData;
  return (
    <div className="space-y-6">
      <PageHeader title="Messages" actions={<ButtonLink to={`/courses/${courseId}/messages/new`}>Write to students</ButtonLink>}>
        Messages to a cohort, or to the students of a lab by where their hand-in stands. Each goes out by e-mail and is kept on each
        student's record.
      </PageHeader>
      {sent !== null ? <Notice tone="success">{`Your message is on its way to ${counted(sent, "student", "students")}.`}</Notice> : null}
      {messages.length === 0 ? (
        <p className="text-sm text-ink-700">No messages sent yet.</p>
      ) : (
        <div className="overflow-x-auto" tabIndex={0} role="region" aria-label="Messages sent">
          <table className="w-full text-left text-sm">
            <thead>
              <tr className="text-ink-600">
                <th className="py-2 pr-3 font-medium">Sent</th>
                <th className="py-2 pr-3 font-medium">Subject</th>
                <th className="py-2 pr-3 font-medium">To</th>
                <th className="py-2 pr-3 text-right font-medium">Students</th>
                <th className="py-2 font-medium">By</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-ink-900/10">
              {messages.map((message) => (
                <tr key={message.id}>
                  <td className="py-2 pr-3 whitespace-nowrap">{formatDateTime(message.sentAt, timeZone, "short")}</td>
                  <td className="py-2 pr-3">{message.subject}</td>
                  <td className="py-2 pr-3">{message.audienceLabel}</td>
                  <td className="py-2 pr-3 text-right tabular-nums">{message.recipientCount}</td>
                  <td className="py-2">{message.authorName ?? "a former member"}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </div>
  );
}

export function meta() {
  return [{ title: "Messages · Benchpost" }];
}
