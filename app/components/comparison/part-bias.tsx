/**
 * Kit-part quality on the inventory screens: a badge for a part whose hand-ins are biased, and the
 * evidence behind it (the t-test and the hand-ins it read).
 */
import { handInHref } from "~/lib/comparison/links";
import { MINIMUM_HAND_INS_FOR_BIAS } from "~/lib/comparison/part-bias";
import { formatNumber } from "~/lib/kits/part-display";

export function PartBiasBadge() {
  return (
    <span className="ml-2 inline-flex items-center rounded border border-outlier px-1.5 text-xs font-medium text-outlier" title="Results with this part are biased: re-measure it">
      re-measure: biased results
    </span>
  );
}

type Evidence = {
  n: number;
  meanBias: number;
  t: number | null;
  criticalT: number | null;
  alpha: number;
  flagged: boolean;
  handIns: { dropLogId: string; labId: string; labTitle: string; studentName: string; figure: number }[];
};

const percent = (fraction: number) => `${fraction >= 0 ? "+" : "−"}${formatNumber(Math.abs(fraction) * 100, 2)} %`;

export function PartBiasEvidence({ bias, courseId }: { bias: Evidence; courseId: string }) {
  return (
    <section aria-labelledby="bias-heading" className="flex flex-col gap-3">
      <h2 id="bias-heading" className="text-lg font-semibold">
        Results with this part {bias.flagged ? <PartBiasBadge /> : null}
      </h2>
      <p className="text-sm text-ink-700">
        {bias.n} counted hand-in{bias.n === 1 ? "" : "s"} used this part; their normalised figures are {percent(bias.meanBias)} from the reference on
        average (geometric mean).{" "}
        {bias.t !== null && bias.criticalT !== null
          ? `One-sample t-test on ln figure against 0: t = ${formatNumber(bias.t, 3)}, critical t = ${formatNumber(bias.criticalT, 3)} at α = ${formatNumber(bias.alpha, 2)} (two-sided, ${bias.n - 1} degrees of freedom): ${bias.flagged ? "biased — re-measure the part." : "no evidence of bias."}`
          : `A bias test needs at least ${MINIMUM_HAND_INS_FOR_BIAS} hand-ins whose figures vary.`}
      </p>
      <div className="overflow-x-auto">
        <table className="text-sm [&_td]:pr-6 [&_th]:pr-6 [&_th]:text-left [&_th]:font-medium">
          <caption className="mb-1 text-left font-medium">Hand-ins read by the test</caption>
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
