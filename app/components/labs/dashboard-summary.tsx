/** The lab dashboard's summary: its times, and the hand-ins of each cohort by how they stand. */
import { LabTime } from "~/components/drop-logs/lab-time";
import { StateMark } from "~/components/marking/state-mark";
import type { CohortProgress } from "~/server/labs/lab-dashboard.server";

type LabTimes = { opensAt: string; dueAt: string; lateCutoffAt: string | null };

export function LabTimesList({ lab, timeZone }: { lab: LabTimes; timeZone: string }) {
  return (
    <dl className="grid gap-4 sm:grid-cols-3">
      <TimeTerm label="Opens" at={lab.opensAt} timeZone={timeZone} />
      <TimeTerm label="Due" at={lab.dueAt} timeZone={timeZone} />
      {lab.lateCutoffAt ? (
        <TimeTerm label="Late cut-off" at={lab.lateCutoffAt} timeZone={timeZone} />
      ) : (
        <div>
          <dt className="text-sm text-ink-600">Late cut-off</dt>
          <dd>None: nothing after the due time</dd>
        </div>
      )}
    </dl>
  );
}

export function CohortProgressTable({ cohorts }: { cohorts: CohortProgress[] }) {
  return (
    <section aria-labelledby="progress-heading">
      <h2 id="progress-heading" className="mb-2 text-lg font-semibold">
        Hand-ins by cohort
      </h2>
      {cohorts.length === 0 ? <p className="text-ink-700">No students in the cohorts you see.</p> : null}
      {/* Six columns of words do not fit a phone: the table scrolls in its own box, not the page. */}
      <div className="max-w-2xl overflow-x-auto">
        <table className="w-full text-left text-sm">
          <thead>
            <tr className="border-b border-ink-900/20">
              <th scope="col" className="py-1">
                Cohort
              </th>
              <th scope="col" className="py-1 text-right">
                Students
              </th>
              <th scope="col" className="py-1 text-right">
                On time
              </th>
              <th scope="col" className="py-1 text-right">
                <StateMark state="after-due" explain />
              </th>
              <th scope="col" className="py-1 text-right">
                <StateMark state="awaited" explain />
              </th>
              <th scope="col" className="py-1 text-right">
                <StateMark state="absent" explain />
              </th>
            </tr>
          </thead>
          <tbody>
            {cohorts.map((cohort) => (
              <tr key={cohort.cohortId} className="border-b border-ink-900/10">
                <th scope="row" className="py-1 font-medium">
                  {cohort.name}
                </th>
                <td className="py-1 text-right tabular-nums">{cohort.students}</td>
                <td className="py-1 text-right tabular-nums">{cohort.onTime}</td>
                <td className="py-1 text-right tabular-nums">{cohort.late}</td>
                <td className="py-1 text-right tabular-nums">{cohort.notDue}</td>
                <td className="py-1 text-right tabular-nums">{cohort.missing}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p className="mt-1 text-xs text-ink-700">
        Each student counts against their own due time: an extension&apos;s, else the lab&apos;s. No drop log: nothing handed in by then.
      </p>
    </section>
  );
}

function TimeTerm({ label, at, timeZone }: { label: string; at: string; timeZone: string }) {
  return (
    <div>
      <dt className="text-sm text-ink-600">{label}</dt>
      <dd>
        <LabTime at={at} courseTimeZone={timeZone} />
      </dd>
    </div>
  );
}
