/**
 * A stored version's result as the student and staff both read it: the key results rounded to their
 * uncertainty (GUM 7.2.6) with U and k, the uncertainty budget as a table, every check (notes too),
 * the results with and without the stray drops saying which one counts, and the parts the reduction
 * used with the values it used, read from the version's own kit records.
 */
import type { ReactNode } from "react";
import type { KitRecords, DropLogWarning } from "~/lib/drop-logs/reduce-drop-log";
import type { Reduction, UncertaintyBudget } from "~/lib/reduction";
import { roundToUncertainty } from "~/lib/round-to-uncertainty";
import { ReductionSummary, WarningList, budgetOf, coverageNote, figure } from "./reduction-summary";

export function ReductionResult({
  reduction,
  normalisedFigure,
  kitRecords,
  warnings,
  temperatureC,
  budgetOpen,
}: {
  reduction: Reduction;
  normalisedFigure: number | null;
  kitRecords: KitRecords;
  warnings: DropLogWarning[];
  temperatureC: number;
  /** Staff read the budget open; the student's page keeps it collapsed until asked for. */
  budgetOpen: boolean;
}) {
  const budget = budgetOf(reduction);
  return (
    <div className="flex flex-col gap-3">
      <ReductionSummary reduction={reduction} normalisedFigure={normalisedFigure} />
      <WarningList warnings={warnings} />
      <StrayDropComparison
        reduction={reduction}
        normalisedFigure={normalisedFigure}
        referenceViscosity={kitRecords.fluidLot.viscosityPaS}
      />
      <details open={budgetOpen} className="rounded ring-1 ring-ink-900/10">
        <summary className="cursor-pointer px-3 py-2 text-sm font-medium">
          Uncertainty budget{budget ? ` (${coverageNote(budget)})` : ""}
        </summary>
        <div className="px-3 pb-3">
          {budget ? (
            <BudgetTable budget={budget} />
          ) : (
            <p className="text-sm text-ink-700">Not computed for this version: it was reduced before budgets were kept.</p>
          )}
        </div>
      </details>
      <PartsUsed kitRecords={kitRecords} temperatureC={temperatureC} />
    </div>
  );
}

/** ∞ arrives as null once a budget has been through JSON. */
function degreesOfFreedom(value: number | null): string {
  return value === null || value === Number.POSITIVE_INFINITY ? "∞" : figure(value, 3);
}

function withUnit(value: string, unit: string): string {
  return unit === "1" ? value : `${value} ${unit}`;
}

export function BudgetTable({ budget }: { budget: UncertaintyBudget }) {
  const resultName = budget.result === "dragCoefficient" ? "C_D" : "μ";
  const rounded = roundToUncertainty(budget.value, budget.expanded);
  // A wide table scrolls on a phone; the scrolling box takes focus so a keyboard can scroll it too.
  return (
    <div className="overflow-x-auto" tabIndex={0} role="region" aria-label={`Uncertainty budget of ${resultName}`}>
      <table className="w-full text-left text-sm tabular-nums">
        <caption className="mb-1 text-left text-ink-700">
          Uncertainty budget of {resultName} (GUM first order): each contribution is the sensitivity times the standard uncertainty, and
          they combine in quadrature.
        </caption>
        <thead>
          <tr className="border-b border-ink-900/10">
            <th scope="col" className="py-1 pr-3 font-medium">
              Input
            </th>
            <th scope="col" className="py-1 pr-3 font-medium">
              Value
            </th>
            <th scope="col" className="py-1 pr-3 font-medium">
              Standard uncertainty u
            </th>
            <th scope="col" className="py-1 pr-3 font-medium">
              Type
            </th>
            <th scope="col" className="py-1 pr-3 font-medium">
              Degrees of freedom ν
            </th>
            <th scope="col" className="py-1 pr-3 font-medium">
              Sensitivity c
            </th>
            <th scope="col" className="py-1 font-medium">
              Contribution c·u
            </th>
          </tr>
        </thead>
        <tbody>
          {budget.rows.map((row) => (
            <tr key={row.input} className="border-b border-ink-900/5">
              <th scope="row" className="py-1 pr-3 font-normal">
                {row.input}
              </th>
              <td className="py-1 pr-3">{withUnit(figure(row.value), row.unit)}</td>
              <td className="py-1 pr-3">{withUnit(figure(row.standardUncertainty, 2), row.unit)}</td>
              <td className="py-1 pr-3">{row.type}</td>
              <td className="py-1 pr-3">{degreesOfFreedom(row.degreesOfFreedom)}</td>
              <td className="py-1 pr-3">{figure(row.sensitivity, 3)}</td>
              <td className="py-1">{withUnit(figure(row.contribution, 2), budget.unit)}</td>
            </tr>
          ))}
        </tbody>
        <tfoot>
          <Total label="Combined standard uncertainty u_c">{withUnit(figure(budget.combined, 2), budget.unit)}</Total>
          <Total label="Effective degrees of freedom ν_eff (Welch–Satterthwaite)">
            {degreesOfFreedom(budget.effectiveDegreesOfFreedom)}
          </Total>
          <Total label={`Coverage factor k (Student t, ${Math.round(budget.coverageProbability * 100)} %)`}>
            {figure(budget.coverageFactor, 3)}
          </Total>
          <Total label="Expanded uncertainty U = k·u_c">{withUnit(figure(budget.expanded, 2), budget.unit)}</Total>
          <Total label="Result">
            {rounded ? withUnit(`${rounded.value} ± ${rounded.uncertainty}`, budget.unit) : withUnit(figure(budget.value), budget.unit)}
          </Total>
        </tfoot>
      </table>
    </div>
  );
}

function Total({ label, children }: { label: string; children: ReactNode }) {
  return (
    <tr>
      <th scope="row" colSpan={6} className="py-1 pr-3 text-right font-medium">
        {label}
      </th>
      <td className="py-1 font-medium">{children}</td>
    </tr>
  );
}

/**
 * Where stray drops were flagged, both results side by side, and which one counts: the one whose
 * normalised figure is the version's stored figure (the one the class comparison and marking use).
 */
export function StrayDropComparison({
  reduction,
  normalisedFigure,
  referenceViscosity,
}: {
  reduction: Reduction;
  normalisedFigure: number | null;
  referenceViscosity: number | null;
}) {
  const without = reduction.withoutStrayDrops;
  if (!without) return null;
  const figureOf = (results: NonNullable<Reduction["withoutStrayDrops"]>) =>
    "referenceDragCoefficient" in results
      ? results.dragCoefficient / results.referenceDragCoefficient
      : referenceViscosity
        ? results.viscosity / referenceViscosity
        : null;
  const all = figureOf(reduction as NonNullable<Reduction["withoutStrayDrops"]>);
  const trimmed = figureOf(without);
  const close = (a: number | null, b: number | null) => a !== null && b !== null && Math.abs(a - b) <= 1e-9 * Math.abs(b);
  const countsWithout = close(normalisedFigure, trimmed) && !close(normalisedFigure, all);
  const stray = reduction.drops.strayDrops.map((index) => index + 1).join(", ");
  const columns = [
    {
      key: "all",
      label: "All drops",
      results: reduction as NonNullable<Reduction["withoutStrayDrops"]>,
      figure: all,
      counts: !countsWithout,
    },
    {
      key: "without",
      label: `Without stray drop${reduction.drops.strayDrops.length > 1 ? "s" : ""} ${stray}`,
      results: without,
      figure: trimmed,
      counts: countsWithout,
    },
  ];
  const rows: [string, (results: (typeof columns)[number]["results"], figureValue: number | null) => string][] = [
    ["Drops", (results) => String(results.drops.n)],
    ["Mean time", (results) => `${figure(results.drops.mean)} s`],
    ["Wall-corrected velocity", (results) => `${figure(results.velocity.corrected * 1000)} mm/s`],
    ["Reynolds number", (results) => figure(results.reynolds, 3)],
    ["Drag coefficient C_D", (results) => figure(results.dragCoefficient)],
  ];
  if (reduction.mode === "viscometry")
    rows.push(["Viscosity μ (Stokes)", (results) => ("viscosity" in results ? `${figure(results.viscosity)} Pa·s` : "—")]);
  rows.push([reduction.mode === "drag" ? "C_D/C_D,ref" : "μ/μ_ref(T)", (_, figureValue) => figure(figureValue, 4)]);
  return (
    <div className="overflow-x-auto" tabIndex={0} role="region" aria-label="Results with and without the stray drops">
      <table className="text-left text-sm tabular-nums">
        <caption className="mb-1 text-left text-ink-700">
          Stray drops were flagged, so the results are given both ways. The column marked “counts” is the one the class comparison and
          marking use; the uncertainty budget is for all drops.
        </caption>
        <thead>
          <tr className="border-b border-ink-900/10">
            <th scope="col" className="py-1 pr-4 font-medium">
              Result
            </th>
            {columns.map((column) => (
              <th key={column.key} scope="col" className="py-1 pr-4 font-medium">
                {column.label}
                {column.counts ? <span className="ml-1 rounded px-1.5 text-xs font-normal ring-1 ring-consistent">counts</span> : null}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rows.map(([label, value]) => (
            <tr key={label} className="border-b border-ink-900/5">
              <th scope="row" className="py-1 pr-4 font-normal">
                {label}
              </th>
              {columns.map((column) => (
                <td key={column.key} className="py-1 pr-4">
                  {value(column.results, column.figure)}
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

/** The sphere, fluid lot and column the reduction used, with the values it used (kept with the version). */
export function PartsUsed({ kitRecords, temperatureC }: { kitRecords: KitRecords; temperatureC: number }) {
  const { sphere, fluidLot, column } = kitRecords;
  const densityAtT = fluidLot.densityAtTemperatureKgM3;
  const corrected = densityAtT !== undefined && fluidLot.densityTemperatureCoefficientKgM3K != null;
  const items: [string, string][] = [
    [
      `Sphere ${sphere.label}`,
      `${sphere.material ?? "material not recorded"}; d = ${sphere.diameterMm} mm, m = ${sphere.massG} g${sphere.source === "student" ? " (the student's own measurement: the kit has no record)" : ""}`,
    ],
    [
      `Fluid lot ${fluidLot.label}`,
      [
        fluidLot.fluidName ?? "fluid not named",
        `ρ = ${fluidLot.densityKgM3} kg/m³${fluidLot.densityUncertaintyKgM3 != null ? ` (u = ${fluidLot.densityUncertaintyKgM3} kg/m³)` : ""}${corrected ? ` at 20 °C, ${figure(densityAtT, 5)} kg/m³ at ${temperatureC} °C (dρ/dT = ${fluidLot.densityTemperatureCoefficientKgM3K} kg/m³ per K)` : ""}`,
        fluidLot.viscosityPaS !== null
          ? `μ = ${figure(fluidLot.viscosityPaS)} Pa·s at ${temperatureC} °C from its calibration${fluidLot.fit ? ` (${fluidLot.fit.temperatureRange[0]}–${fluidLot.fit.temperatureRange[1]} °C)` : ""}`
          : "no viscosity calibration",
      ].join("; "),
    ],
    [
      `Column ${column.label}`,
      `${column.innerDiameterMm !== null ? `bore ${column.innerDiameterMm} mm${column.innerDiameterUncertaintyMm != null ? ` (u = ${column.innerDiameterUncertaintyMm} mm)` : ""}` : "bore not recorded"}; timed over ${column.timedDistanceMm} mm${column.runInMm !== null ? `; run-in ${column.runInMm} mm` : ""}`,
    ],
  ];
  return (
    <section aria-label="Parts used">
      <h4 className="text-sm font-medium">Parts used</h4>
      <dl className="grid grid-cols-1 gap-x-4 gap-y-1 text-sm sm:grid-cols-[auto_1fr]">
        {items.map(([term, description]) => (
          <div key={term} className="contents">
            <dt className="text-ink-700">{term}</dt>
            <dd>{description}</dd>
          </div>
        ))}
      </dl>
    </section>
  );
}
