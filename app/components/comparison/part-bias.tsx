/**
 * Kit-part quality on the inventory screens: a badge for a part whose hand-ins differ from those made
 * with its peers, and the evidence behind it (the Welch tests per lab and the hand-ins they read).
 */
import { handInHref } from "~/lib/comparison/links";
import { MINIMUM_HAND_INS_FOR_BIAS, MINIMUM_PEER_PARTS } from "~/lib/comparison/part-bias-thresholds";
import { formatNumber } from "~/lib/kits/part-display";
import type { PartBiasView } from "~/server/comparison/part-quality.server";
import { counted, plural } from "~/lib/plural";

export function PartBiasBadge() {
  return (
    <span
      className="ml-2 inline-flex items-center rounded border border-outlier px-1.5 text-xs font-medium text-outlier"
      title="Results with this part differ from those with other parts of its kind: re-measure it"
    >
      re-measure: differs from peers
    </span>
  );
}

/** What the part pages pass in: the report's verdict and its evidence, as the viewer may read it. */
type Evidence = Pick<PartBiasView, "alpha" | "flagged" | "testsInFamily" | "comparisons" | "handIns" | "otherHandIns">;

const percent = (fraction: number) => `${fraction >= 0 ? "+" : "−"}${formatNumber(Math.abs(fraction) * 100, 2)} %`;

/** One sentence per lab: the Welch test against the peers and Holm's verdict, or why there was no test. */
export function comparisonText(comparison: Evidence["comparisons"][number], alpha: number, testsInFamily: number): string {
  const used = `${counted(comparison.n, "hand-in", "hand-ins")} with this part`;
  if (comparison.t === null || comparison.pValue === null || comparison.degreesOfFreedom === null || comparison.relativeToPeers === null) {
    return `${used}; no test: it needs at least ${MINIMUM_HAND_INS_FOR_BIAS} hand-ins with this part and ${MINIMUM_HAND_INS_FOR_BIAS} with at least ${MINIMUM_PEER_PARTS} other parts of its kind in the lab, with some spread.`;
  }
  const verdict = comparison.flagged
    ? "differs from its peers — re-measure the part."
    : comparison.holmLevel === null
      ? "not reached by Holm's procedure: no evidence of a difference."
      : "no evidence of a difference.";
  return `${used}, ${percent(comparison.relativeToPeers)} from the ${counted(comparison.peerCount, "hand-in", "hand-ins")} with ${comparison.peerParts} other ${plural(comparison.peerParts, "part", "parts")} of its kind (geometric means). Welch's t = ${formatNumber(comparison.t, 3)}, ${formatNumber(comparison.degreesOfFreedom, 3)} degrees of freedom, p = ${formatNumber(comparison.pValue, 2)}${comparison.holmLevel !== null ? ` against Holm's level ${formatNumber(comparison.holmLevel, 2)}` : ""} (α = ${formatNumber(alpha, 2)} over the course's ${counted(testsInFamily, "test", "tests")}): ${verdict}`;
}

export function PartBiasEvidence({ bias, courseId }: { bias: Evidence; courseId: string }) {
  return (
    <section aria-labelledby="bias-heading" className="flex flex-col gap-3">
      <h2 id="bias-heading" className="text-lg font-semibold">
        Results with this part {bias.flagged ? <PartBiasBadge /> : null}
      </h2>
      <p className="text-sm text-ink-700">
        Each lab's hand-ins with this part are compared with the hand-ins of the same lab that used other parts of the same kind (Welch's
        two-sample t test on ln figure, Holm's correction over every part tested in the course), not with the reference: a bias of the
        reference model moves every part alike.
      </p>
      <ul className="list-disc pl-5 text-sm text-ink-700">
        {bias.comparisons.map((comparison) => (
          <li key={comparison.labId}>
            {comparison.mayOpenComparison ? (
              <a href={`/courses/${courseId}/labs/${comparison.labId}/comparison`} className="underline">
                {comparison.labTitle}
              </a>
            ) : (
              comparison.labTitle
            )}
            : {comparisonText(comparison, bias.alpha, bias.testsInFamily)}
          </li>
        ))}
      </ul>
      <div className="overflow-x-auto">
        <table className="text-sm [&_td]:pr-6 [&_th]:pr-6 [&_th]:text-left [&_th]:font-medium">
          <caption className="mb-1 text-left font-medium">
            Hand-ins read by the test
            {bias.otherHandIns ? (
              <span className="block font-normal text-ink-700">{`Not listed: ${bias.otherHandIns} from students of cohorts you do not mark.`}</span>
            ) : null}
          </caption>
          <thead>
            <tr>
              <th scope="col">Lab</th>
              <th scope="col">Student</th>
              <th scope="col">Figure</th>
            </tr>
          </thead>
          <tbody>
            {bias.handIns.map((handIn) => (
              <tr key={handIn.dropLogId}>
                <td>
                  <a href={`/courses/${courseId}/labs/${handIn.labId}/comparison`} className="underline">
                    {handIn.labTitle}
                  </a>
                </td>
                <td>
                  <a href={handInHref(courseId, handIn.labId, handIn.dropLogId)} className="underline">
                    {handIn.studentName}
                  </a>
                </td>
                <td>{formatNumber(handIn.figure)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </section>
  );
}
