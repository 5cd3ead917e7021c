/** Each marker's totals side by side (count, mean, spread and a histogram on shared bins), and everyone's. */
import { TableHead } from "~/components/ui/table-head";
import type { TotalsSummary } from "~/server/marking/moderation.server";

type Bins = { from: number; to: number }[];

const round = (value: number | null, digits = 1) => (value === null ? "—" : value.toFixed(digits));

export function MarkerTotals({
  markers,
  overall,
  bins,
  maxTotal,
}: {
  markers: ({ marker: { id: string; name: string } | null } & TotalsSummary)[];
  overall: TotalsSummary;
  bins: Bins;
  maxTotal: number;
}) {
  const tallest = Math.max(1, ...markers.flatMap((marker) => marker.histogram), ...overall.histogram);
  return (
    <section aria-labelledby="markers-heading">
      <h2 id="markers-heading" className="mb-2 text-lg font-semibold">
        Each marker&apos;s totals, out of {maxTotal}
      </h2>
      <div className="overflow-x-auto rounded-lg bg-white shadow-sm ring-1 ring-ink-900/10">
        <table className="min-w-full text-left text-sm">
          <TableHead
            headers={[
              "Marker",
              "Marks",
              "Mean",
              "Std. dev.",
              "Median",
              "Range",
              `Distribution (${bins.length} bins from 0 to ${maxTotal})`,
            ]}
          />
          <tbody className="divide-y divide-ink-900/5 tabular-nums">
            {[
              ...markers.map((entry) => ({ ...entry, name: entry.marker?.name ?? "A removed account" })),
              { ...overall, name: "Everyone" },
            ].map((entry) => (
              <tr key={entry.name} className={entry.name === "Everyone" ? "font-medium" : undefined}>
                <th scope="row" className="px-3 py-2 text-left font-medium">
                  {entry.name}
                </th>
                <td className="px-3 py-2">{entry.count}</td>
                <td className="px-3 py-2">{round(entry.mean)}</td>
                <td className="px-3 py-2">{round(entry.standardDeviation)}</td>
                <td className="px-3 py-2">{round(entry.median)}</td>
                <td className="px-3 py-2">{entry.min === null ? "—" : `${entry.min}–${entry.max}`}</td>
                <td className="px-3 py-1">
                  <Histogram counts={entry.histogram} bins={bins} tallest={tallest} label={`Totals marked by ${entry.name}`} />
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p className="mt-1 text-xs text-ink-700">
        A marker whose mean or spread sits apart from the others is worth a look at a few of their marks; the desk filters by cohort.
      </p>
    </section>
  );
}

/** A small histogram of totals; every marker's uses the same bins and height so they compare at a glance. */
function Histogram({ counts, bins, tallest, label }: { counts: number[]; bins: Bins; tallest: number; label: string }) {
  const width = 160;
  const height = 36;
  const bar = width / Math.max(counts.length, 1);
  return (
    <svg
      viewBox={`0 0 ${width} ${height}`}
      className="h-9 w-40"
      role="img"
      aria-label={`${label}: ${counts.map((count, index) => `${count} between ${bins[index].from} and ${bins[index].to}`).join(", ")}`}
    >
      <line x1={0} x2={width} y1={height - 0.5} y2={height - 0.5} stroke="currentColor" strokeOpacity={0.3} />
      {counts.map((count, index) => {
        const barHeight = tallest ? ((height - 2) * count) / tallest : 0;
        return (
          <rect key={index} x={index * bar + 1} width={bar - 2} y={height - 1 - barHeight} height={barHeight} fill="var(--color-ink-500)" />
        );
      })}
    </svg>
  );
}
