import { ViscosityChart } from "~/components/kits/viscosity-chart";
import { Notice } from "~/components/ui/notice";
import type { FluidLotCalibration } from "~/lib/kits/fluid-lot-fit";
import type { CalibrationFinding } from "~/lib/kits/glycerol-water";
import { formatNumber } from "~/lib/kits/part-display";
import { counted } from "~/lib/plural";

/** A calibration point's handbook check in words (the warnings above say what to do). */
const calibrationFindingWords: Record<CalibrationFinding["kind"], string> = {
  agrees: "agrees with the handbook",
  "outside-tolerance": "outside the tolerance",
  "unit-slip": "unit slip? (mPa·s vs Pa·s)",
  "not-compared": "within a kit fluid's range",
};

/** A fluid lot's viscosity fit, its chart and its points, checked against the handbook when it is a glycerol–water mix. */
export function CalibrationSection({ calibration, label }: { calibration: FluidLotCalibration; label: string }) {
  const { fit, quoted, points, glycerolMassFraction } = calibration;
  return (
    <section aria-labelledby="fit-heading" className="flex flex-col gap-4">
      <h2 id="fit-heading" className="text-lg font-semibold">
        Viscosity calibration
      </h2>
      <p className="text-sm text-ink-700">
        {fit.kind === "andrade" ? (
          <>
            Andrade fit ln(μ / Pa·s) = A + B/T with T in kelvin, by least squares over {counted(fit.pointCount, "point", "points")} from{" "}
            {fit.temperatureRange[0]} to {fit.temperatureRange[1]} °C: A = {formatNumber(fit.a, 5)}, B = {formatNumber(fit.b, 5)} K. The
            largest residual is {formatNumber(fit.maxRelativeResidual * 100, 2)} %.
          </>
        ) : (
          <>A constant viscosity of {formatNumber(Math.exp(fit.a))} Pa·s.</>
        )}{" "}
        Every reduction with this lot uses this fit at the drop's temperature.
      </p>
      {fit.warning ? <Notice tone="warning">{fit.warning}</Notice> : null}
      {/* Focusable, so a keyboard can scroll the table when it is wider than a phone. */}
      <div className="overflow-x-auto" tabIndex={0} role="region" aria-label="Fitted viscosity at room temperatures">
        <table className="text-sm">
          <caption className="mb-1 text-left font-medium">Fitted viscosity at room temperatures</caption>
          <thead>
            <tr className="text-left text-ink-600">
              <th scope="col" className="pr-6">
                Temperature (°C)
              </th>
              <th scope="col" className="pr-6">
                μ (Pa·s)
              </th>
              <th scope="col" />
            </tr>
          </thead>
          <tbody>
            {quoted.map((row) => (
              <tr key={row.temperatureC}>
                <td className="pr-6">{row.temperatureC}</td>
                <td className="pr-6">{formatNumber(row.viscosityPaS)}</td>
                <td className="text-ink-600">{row.extrapolated ? "outside the calibrated range" : ""}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <figure className="flex flex-col gap-2">
        <ViscosityChart calibration={calibration} title={`Viscosity against temperature for fluid lot ${label}`} />
        <figcaption className="text-sm text-ink-700">
          Dots: calibration points; line: the fitted curve (log axis). Below: each point's residual, measured ÷ fitted − 1, in per cent.
        </figcaption>
      </figure>
      {glycerolMassFraction !== null ? (
        <p className="text-sm text-ink-700">
          Declared a glycerol–water mix with a glycerol mass fraction of {glycerolMassFraction}: each point is compared with the handbook
          correlation of Cheng (2008) for 0–100 °C. The tolerance combines the correlation's own spread with half a per cent of glycerol and
          half a kelvin, so it is wider for strong mixes.
        </p>
      ) : null}
      <div className="overflow-x-auto" tabIndex={0} role="region" aria-label="Calibration points">
        <table className="text-sm">
          <caption className="mb-1 text-left font-medium">
            {glycerolMassFraction !== null ? "Calibration points, residuals and handbook values" : "Calibration points and residuals"}
          </caption>
          <thead>
            <tr className="text-left text-ink-600">
              <th scope="col" className="pr-6">
                Temperature (°C)
              </th>
              <th scope="col" className="pr-6">
                Measured μ (Pa·s)
              </th>
              <th scope="col" className="pr-6">
                Fitted μ (Pa·s)
              </th>
              <th scope="col" className="pr-6">
                Residual (%)
              </th>
              {glycerolMassFraction !== null ? (
                <>
                  <th scope="col" className="pr-6">
                    Handbook μ (Pa·s)
                  </th>
                  <th scope="col" className="pr-6">
                    Measured vs handbook (%)
                  </th>
                </>
              ) : null}
              <th scope="col">Check</th>
            </tr>
          </thead>
          <tbody>
            {points.map((point) => (
              <tr key={point.temperatureC}>
                <td className="pr-6">{point.temperatureC}</td>
                <td className="pr-6">{formatNumber(point.viscosityPaS)}</td>
                <td className="pr-6">{formatNumber(point.fittedPaS)}</td>
                <td className="pr-6">{formatNumber(point.residualPercent, 2)}</td>
                {glycerolMassFraction !== null ? (
                  <>
                    <td className="pr-6">{formatNumber(point.handbookPaS)}</td>
                    <td className="pr-6">
                      {"differencePercent" in point.finding
                        ? `${formatNumber(point.finding.differencePercent, 2)} (±${formatNumber(point.finding.tolerancePercent, 2)})`
                        : "—"}
                    </td>
                  </>
                ) : null}
                <td>
                  {point.finding.kind === "not-compared" && glycerolMassFraction !== null
                    ? "outside the handbook's 0–100 °C"
                    : calibrationFindingWords[point.finding.kind]}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </section>
  );
}
