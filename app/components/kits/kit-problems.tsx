/** A kit problem's status, history and replacement parcel, as the student and the staff see them. */
import { Link } from "react-router";
import { formatDateTime } from "~/lib/format-date";
import { kitProblemKindLabels, kitProblemStatusLabels, type KitProblemKind, type KitProblemStatus } from "~/lib/kits/kit-problem-states";

type ProblemUpdate = {
  id: string;
  createdAt: Date | string;
  fromStatus: KitProblemStatus | null;
  toStatus: KitProblemStatus;
  note: string | null;
  actor: { name: string } | null;
};
type Parcel = { status: string; carrier: string | null; trackingNumber: string | null } | null;
type Problem = {
  id: string;
  kind: KitProblemKind;
  status: KitProblemStatus;
  note: string;
  createdAt: Date | string;
  partLabel: string | null;
  replacementLabel: string | null;
  updates: ProblemUpdate[];
  parcel: Parcel;
};

const tints: Record<KitProblemStatus, string> = {
  received: "bg-red-50 text-outlier ring-1 ring-outlier/30",
  replacement_sent: "bg-amber-300/40 text-amber-700",
  resolved: "bg-paper-100 text-ink-800",
};

export function ProblemStatusBadge({ status }: { status: KitProblemStatus }) {
  return (
    <span className={`inline-block whitespace-nowrap rounded-full px-2.5 py-0.5 text-xs font-medium ${tints[status]}`}>
      {kitProblemStatusLabels[status]}
    </span>
  );
}

/** The replacement parcel's tracking, or why there is none yet (the label is still being bought). */
export function ReplacementParcel({ replacementLabel, parcel }: { replacementLabel: string | null; parcel: Parcel }) {
  if (!replacementLabel && !parcel) return null;
  return (
    <p className="text-sm">
      Replacement{replacementLabel ? ` ${replacementLabel}` : ""}:{" "}
      {parcel?.trackingNumber
        ? `sent with ${parcel.carrier}, tracking number ${parcel.trackingNumber}`
        : "the parcel's tracking number follows soon"}
    </p>
  );
}

/** Each change of the problem, oldest first, with the note the student was sent. */
export function ProblemHistory({ updates, timeZone }: { updates: ProblemUpdate[]; timeZone: string }) {
  return (
    <ol className="flex flex-col gap-1 text-sm">
      {updates.map((update) => (
        <li key={update.id}>
          <time dateTime={new Date(update.createdAt).toISOString()} className="text-ink-600">
            {formatDateTime(update.createdAt, timeZone)}
          </time>{" "}
          · {update.fromStatus ? `${update.actor?.name ?? "someone"} · ` : ""}
          <strong>{update.fromStatus ? kitProblemStatusLabels[update.toStatus] : "Reported"}</strong>
          {update.note ? <span className="block text-ink-700">“{update.note}”</span> : null}
        </li>
      ))}
    </ol>
  );
}

/** Problems of one kit (or one student), newest first; staff get a link to each problem's page. */
export function KitProblemList({
  problems,
  timeZone,
  heading,
  linkToProblem,
}: {
  problems: Problem[];
  timeZone: string;
  heading: string;
  linkToProblem?: (id: string) => string;
}) {
  if (problems.length === 0) return null;
  return (
    <section aria-labelledby="kit-problems-heading">
      <h2 id="kit-problems-heading" className="mb-2 text-lg font-semibold">
        {heading}
      </h2>
      <ul className="flex flex-col gap-3">
        {problems.map((problem) => (
          <li key={problem.id} className="flex flex-col gap-2 rounded-lg bg-white p-3 ring-1 ring-ink-900/10">
            <div className="flex flex-wrap items-center gap-2">
              <ProblemStatusBadge status={problem.status} />
              <strong>
                {linkToProblem ? (
                  <Link to={linkToProblem(problem.id)} className="underline">
                    {kitProblemKindLabels[problem.kind]}
                  </Link>
                ) : (
                  kitProblemKindLabels[problem.kind]
                )}
                {problem.partLabel ? `: ${problem.partLabel}` : ""}
              </strong>
            </div>
            <p className="text-sm text-ink-700">“{problem.note}”</p>
            <ReplacementParcel replacementLabel={problem.replacementLabel} parcel={problem.parcel} />
            <ProblemHistory updates={problem.updates} timeZone={timeZone} />
          </li>
        ))}
      </ul>
    </section>
  );
}
