/**
 * A student's record: everything the course knows about one student, each history newest first. For
 * the course's instructors and the TAs of the student's cohort; the audit section is the instructors'.
 */
import type { ReactNode } from "react";
import { data, Link } from "react-router";
import type { Route } from "./+types/courses.$courseId.members.$membershipId.record";
import { figure } from "~/components/drop-logs/reduction-summary";
import { KitStateBadge } from "~/components/kit-state-badge";
import { KitEventWords } from "~/components/kits/kit-history";
import { TableHead } from "~/components/ui/table-head";
import { PageHeader } from "~/components/ui/page-header";
import { actionWords } from "~/lib/audit/action-words";
import { formatDateTime } from "~/lib/format-date";
import { isEntityId } from "~/lib/forms/ids";
import { canOpenKit, requireCourseRole, requireStudentAccess, staffRoles } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { findRecordMember, loadStudentRecord } from "~/server/members/student-record.server";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const scope = { request, context };
  const staff = await requireCourseRole(scope, params.courseId, staffRoles);
  const member = isEntityId(params.membershipId) ? await findRecordMember(db, staff.course.id, params.membershipId) : null;
  if (!member || member.role !== "student") throw data("Not found", { status: 404 });
  // A TA of another cohort is refused here, and the refusal recorded, before anything of the student is read.
  const access = await requireStudentAccess(scope, staff.course.id, member);
  const record = await loadStudentRecord(db, { access, member, request });
  const kitLinks = Object.fromEntries(record.kitEvents.rows.map((event) => [event.kitId, canOpenKit(access, event.holderCohortId)]));
  return { course: access.course, member, record, kitLinks };
}

type RecordData = Route.ComponentProps["loaderData"]["record"];

export default function StudentRecordPage({ loaderData }: Route.ComponentProps) {
  const { course, member, record, kitLinks } = loaderData;
  const at = (value: Date | string, style: "medium" | "short" = "medium") => (
    <time dateTime={new Date(value).toISOString()}>{formatDateTime(value, course.timeZone, style)}</time>
  );
  return (
    <div className="mx-auto flex max-w-4xl flex-col gap-6">
      <PageHeader
        id="record-title"
        title={member.name}
        trail={[{ to: `/courses/${course.id}/members/${member.membershipId}`, label: member.name }]}
      >
        {`Student record in ${course.code} ${course.title}.`}
      </PageHeader>

      <Section id="who" title="Who">
        <dl className="grid grid-cols-[max-content_1fr] gap-x-6 gap-y-2 text-sm">
          <dt className="text-ink-600">Name</dt>
          <dd>{member.name}</dd>
          <dt className="text-ink-600">E-mail</dt>
          <dd className="break-all">{member.email}</dd>
          <dt className="text-ink-600">Student number</dt>
          <dd>{member.studentNumber ?? "—"}</dd>
          <dt className="text-ink-600">Cohort</dt>
          <dd>{member.cohortName ?? "—"}</dd>
          <dt className="text-ink-600">State</dt>
          <dd>
            {member.removedAt ? (
              <strong>Removed from the course on {at(member.removedAt)}; their record is kept.</strong>
            ) : (
              <>Student since {at(member.joinedAt)}</>
            )}
          </dd>
        </dl>
      </Section>

      <Section id="kits" title="Kits" more={record.kitEvents.more} limit={record.limit} what="kit moves">
        <KitSection events={record.kitEvents.rows} courseId={course.id} kitLinks={kitLinks} at={at} />
      </Section>

      <Section id="hand-ins" title="Hand-ins" more={record.versions.more} limit={record.limit} what="versions">
        <HandInSection versions={record.versions.rows} courseId={course.id} at={at} />
      </Section>

      <Section id="marks" title="Marks" more={record.marks.more} limit={record.limit} what="marks">
        <MarkSection marks={record.marks.rows} limit={record.limit} at={at} />
      </Section>

      <Section id="extensions" title="Extensions" more={record.extensions.more} limit={record.limit} what="extensions">
        {record.extensions.rows.length === 0 ? (
          <Empty>No extension for them or their cohort.</Empty>
        ) : (
          <Table headers={["Lab", "For", "Due", "Cut-off", "Reason", "Set by"]}>
            {record.extensions.rows.map((extension) => (
              <tr key={extension.id} className="align-top">
                <td className="px-3 py-2">{extension.labTitle}</td>
                <td className="px-3 py-2">{extension.forCohort ? `Their cohort (${member.cohortName ?? "—"})` : "Them"}</td>
                <td className="px-3 py-2 whitespace-nowrap">{at(extension.dueAt, "short")}</td>
                <td className="px-3 py-2 whitespace-nowrap">{extension.lateCutoffAt ? at(extension.lateCutoffAt, "short") : "none"}</td>
                <td className="px-3 py-2">{extension.reason}</td>
                <td className="px-3 py-2">
                  {extension.setByName ?? "—"}, {at(extension.updatedAt, "short")}
                </td>
              </tr>
            ))}
          </Table>
        )}
      </Section>

      <Section id="emails" title="E-mails sent to them" more={record.emails.more} limit={record.limit} what="e-mails">
        {record.emails.rows.length === 0 ? (
          <Empty>The course has sent them no e-mail.</Empty>
        ) : (
          <Table headers={["Queued", "Subject", "Status"]}>
            {record.emails.rows.map((email) => (
              <tr key={email.id} className="align-top">
                <td className="px-3 py-2 whitespace-nowrap">{at(email.createdAt, "short")}</td>
                <td className="px-3 py-2">
                  {email.subject} <span className="text-xs text-ink-600">({email.template})</span>
                </td>
                <td className="px-3 py-2">
                  {email.status === "sent" && email.sentAt ? (
                    <>Sent {at(email.sentAt, "short")}</>
                  ) : email.status === "failed" ? (
                    <strong className="text-outlier">Not delivered{email.failedAt ? <> ({at(email.failedAt, "short")})</> : null}</strong>
                  ) : (
                    "Waiting to be sent"
                  )}
                </td>
              </tr>
            ))}
          </Table>
        )}
      </Section>

      <Section id="messages" title="Messages to them" more={record.messages.more} limit={record.limit} what="messages">
        {record.messages.rows.length === 0 ? (
          <Empty>No course message has gone to them.</Empty>
        ) : (
          <ol className="flex flex-col gap-2 text-sm">
            {record.messages.rows.map((message) => (
              <li key={message.id} className="rounded-md bg-white px-3 py-2 ring-1 ring-ink-900/10">
                <span className="text-ink-600">{at(message.createdAt)}</span> · {message.authorName ?? "someone"} to {message.audienceLabel}{" "}
                · <strong>{message.subject}</strong>
                <span className="text-ink-600"> · {message.status ? deliveryWords[message.status] : "no copy in the outbox"}</span>
                <span className="block whitespace-pre-line text-ink-700">{message.body}</span>
              </li>
            ))}
          </ol>
        )}
      </Section>

      {record.audit ? (
        <Section id="audit" title="Audit entries about them" more={record.audit.more} limit={record.limit} what="entries">
          {record.audit.rows.length === 0 ? (
            <Empty>Nothing recorded about them yet.</Empty>
          ) : (
            <Table headers={["When", "Who", "What", "Details"]}>
              {record.audit.rows.map((event) => (
                <tr key={event.id} className="align-top">
                  <td className="px-3 py-2 whitespace-nowrap">{at(event.createdAt)}</td>
                  <td className="px-3 py-2">{event.actorName ?? "—"}</td>
                  <td className="px-3 py-2">{actionWords[event.action] ?? event.action}</td>
                  <td className="px-3 py-2 font-mono text-xs break-all text-ink-700">
                    {[event.subject, Object.keys(event.detail).length ? JSON.stringify(event.detail) : null].filter(Boolean).join(" ")}
                  </td>
                </tr>
              ))}
            </Table>
          )}
        </Section>
      ) : null}
    </div>
  );
}

const deliveryWords = { queued: "waiting to be sent", sent: "sent", failed: "not delivered" } as const;

type At = (value: Date | string, style?: "medium" | "short") => ReactNode;

function Section({
  id,
  title,
  more = false,
  limit,
  what,
  children,
}: {
  id: string;
  title: string;
  more?: boolean;
  limit?: number;
  what?: string;
  children: ReactNode;
}) {
  return (
    <section aria-labelledby={`${id}-heading`} className="rounded-lg bg-white p-5 shadow-sm ring-1 ring-ink-900/10">
      <h2 id={`${id}-heading`} className="mb-3 text-lg font-medium">
        {title}
      </h2>
      {more ? <p className="mb-2 text-sm text-ink-600">{`Showing the latest ${limit} ${what}.`}</p> : null}
      {children}
    </section>
  );
}

function Empty({ children }: { children: ReactNode }) {
  return <p className="text-sm text-ink-600">{children}</p>;
}

function Table({ headers, children }: { headers: string[]; children: ReactNode }) {
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-left text-sm">
        <TableHead headers={headers} />
        <tbody className="divide-y divide-ink-900/10">{children}</tbody>
      </table>
    </div>
  );
}

/** Rows of one list grouped by a key, in the order each key first appears (newest first, as the rows are). */
function groupBy<T>(rows: T[], key: (row: T) => string): T[][] {
  const groups = new Map<string, T[]>();
  for (const row of rows) groups.set(key(row), [...(groups.get(key(row)) ?? []), row]);
  return [...groups.values()];
}

function KitSection({
  events,
  courseId,
  kitLinks,
  at,
}: {
  events: RecordData["kitEvents"]["rows"];
  courseId: string;
  kitLinks: { [kitId: string]: boolean };
  at: At;
}) {
  if (events.length === 0) return <Empty>They have held no kit.</Empty>;
  return (
    <div className="flex flex-col gap-4">
      {groupBy(events, (event) => event.kitId).map((kitEvents) => {
        const kit = kitEvents[0];
        return (
          <div key={kit.kitId}>
            <h3 className="mb-1 font-medium">
              {kitLinks[kit.kitId] ? (
                <Link to={`/courses/${courseId}/kits/${kit.kitId}`} className="underline">
                  Kit {kit.kitNumber}
                </Link>
              ) : (
                `Kit ${kit.kitNumber}`
              )}{" "}
              <KitStateBadge state={kit.kitState} />
            </h3>
            <ol className="flex flex-col gap-1 text-sm">
              {kitEvents.map((event) => (
                <li key={event.id}>
                  <span className="text-ink-600">{at(event.createdAt)}</span> · {event.actorName ?? "someone"} ·{" "}
                  <KitEventWords event={event} />
                  {event.note ? <span className="block text-ink-700">“{event.note}”</span> : null}
                </li>
              ))}
            </ol>
          </div>
        );
      })}
    </div>
  );
}

function HandInSection({ versions, courseId, at }: { versions: RecordData["versions"]["rows"]; courseId: string; at: At }) {
  if (versions.length === 0) return <Empty>Nothing handed in yet.</Empty>;
  return (
    <div className="flex flex-col gap-4">
      {groupBy(versions, (version) => version.labId).map((labVersions) => {
        const lab = labVersions[0];
        return (
          <div key={lab.labId}>
            <h3 className="mb-1 font-medium">
              <Link to={`/courses/${courseId}/labs/${lab.labId}/hand-ins/${lab.dropLogId}`} className="underline">
                {lab.labTitle}
              </Link>
            </h3>
            <ol className="flex flex-col gap-1 text-sm">
              {labVersions.map((version) => (
                <li key={version.id}>
                  Version {version.version} · {at(version.submittedAt)}
                  {version.late ? <strong className="text-outlier"> · late</strong> : null}
                  {version.reductionMode === "drag"
                    ? ` · C_D ${figure(version.dragCoefficient, 3)} at Re ${figure(version.reynolds, 2)}`
                    : version.reductionMode === "viscometry"
                      ? ` · μ ${figure(version.viscosityPaS, 3)} Pa·s`
                      : null}
                  {version.normalisedFigure !== null ? `, ${figure(version.normalisedFigure, 3)} × the reference` : null}
                  {version.counts ? <span className="text-ink-600"> · counts</span> : null}
                </li>
              ))}
            </ol>
          </div>
        );
      })}
    </div>
  );
}

function MarkSection({ marks, limit, at }: { marks: RecordData["marks"]["rows"]; limit: number; at: At }) {
  if (marks.length === 0) return <Empty>No marks yet.</Empty>;
  return (
    <div className="flex flex-col gap-4">
      {marks.map((mark) => (
        <div key={mark.id}>
          <h3 className="mb-1 font-medium">
            {mark.labTitle}: {figure(mark.total)}
            {mark.maxPoints ? ` of ${figure(mark.maxPoints)} (${figure((mark.total / mark.maxPoints) * 100, 3)} %)` : null}
            <span className="font-normal text-ink-600">
              {" "}
              · {mark.releasedAt ? <>released {at(mark.releasedAt, "short")}</> : "not released"}
              {mark.reopenedAt ? " · reopened for re-marking" : null}
            </span>
          </h3>
          {mark.changes.more ? <p className="text-sm text-ink-600">{`Showing the latest ${limit} changes.`}</p> : null}
          <ol className="flex flex-col gap-1 text-sm">
            {mark.changes.rows.map((change) => (
              <li key={change.id}>
                <span className="text-ink-600">{at(change.changedAt)}</span> · {change.changedBy?.name ?? "someone"} ·{" "}
                {change.oldTotal === null ? `marked ${figure(change.newTotal)}` : `${figure(change.oldTotal)} → ${figure(change.newTotal)}`}
                {change.afterRelease ? <strong> · after release</strong> : null}
                {change.reason ? <span className="block text-ink-700">“{change.reason}”</span> : null}
              </li>
            ))}
          </ol>
        </div>
      ))}
    </div>
  );
}

export function meta({ data: loaderData }: Route.MetaArgs) {
  return [
    { title: loaderData ? `${loaderData.member.name}'s record · ${loaderData.course.code} · Benchpost` : "Student record · Benchpost" },
  ];
}
