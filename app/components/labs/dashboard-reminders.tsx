/** The dashboard's deadline reminders: those waiting to be sent, and those sent with their e-mail's state. */
import { LabTime } from "~/components/drop-logs/lab-time";
import type { LabDashboard } from "~/server/labs/lab-dashboard.server";

export function DeadlineReminders({
  lab,
  timeZone,
  scheduledReminders,
  sentReminders,
}: Pick<LabDashboard, "scheduledReminders" | "sentReminders"> & { lab: { dueAt: string }; timeZone: string }) {
  return (
    <section aria-labelledby="reminders-heading">
      <h2 id="reminders-heading" className="mb-2 text-lg font-semibold">
        Deadline reminders
      </h2>
      {scheduledReminders.length ? (
        <ul className="mb-3 text-sm">
          {scheduledReminders.map((job) => (
            <li key={`${job.offsetHours}-${job.dueAt}`}>
              {job.extension ? (
                <>
                  {job.offsetHours} h before the extended due time <LabTime at={job.dueAt} courseTimeZone={timeZone} />, to the students
                  extended to it who have not handed in by then:{" "}
                </>
              ) : (
                <>{job.offsetHours} h before the due time, to whoever it is still due for and has not handed in by then: </>
              )}
              <LabTime at={job.startAfter} courseTimeZone={timeZone} />
            </li>
          ))}
        </ul>
      ) : (
        <p className="mb-3 text-sm text-ink-700">No reminders are waiting to go out.</p>
      )}
      {sentReminders.length === 0 ? (
        <p className="text-sm text-ink-700">None sent yet.</p>
      ) : (
        <table className="w-full max-w-3xl text-left text-sm">
          <thead>
            <tr className="border-b border-ink-900/20">
              <th scope="col" className="py-1 pr-3">
                To
              </th>
              <th scope="col" className="py-1 pr-3">
                Reminder
              </th>
              <th scope="col" className="py-1 pr-3">
                Sent
              </th>
              <th scope="col" className="py-1">
                E-mail
              </th>
            </tr>
          </thead>
          <tbody>
            {sentReminders.map((reminder) => (
              <tr key={`${reminder.membershipId}-${reminder.dueAt}-${reminder.offsetHours}`} className="border-b border-ink-900/10">
                <td className="py-1 pr-3">
                  {reminder.studentName} <span className="text-ink-600">({reminder.cohortName})</span>
                </td>
                <td className="py-1 pr-3">
                  {reminder.offsetHours} h before
                  {/* Reminded of another due time than the lab's: an extension's (or one the lab had before). */}
                  {Date.parse(reminder.dueAt) !== Date.parse(lab.dueAt) ? (
                    <span className="block text-xs text-ink-600">
                      of the due time <LabTime at={reminder.dueAt} courseTimeZone={timeZone} />
                    </span>
                  ) : null}
                </td>
                <td className="py-1 pr-3">
                  <LabTime at={reminder.sentAt} courseTimeZone={timeZone} />
                </td>
                <td className="py-1">{reminder.emailStatus ?? "not queued"}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </section>
  );
}
