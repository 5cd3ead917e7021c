/** The class comparison's plots: the lab's own curve (drag or viscometry) and the strip of normalised figures. */
import { DragCurveChart, FigureStripChart, ViscometryChart, type ComparisonPoint } from "~/components/comparison/comparison-charts";
import type { ComparisonJson } from "~/server/comparison/class-comparison.server";

export function ComparisonPlots({ lab, handIns, limits }: Pick<ComparisonJson, "lab" | "handIns" | "limits">) {
  const points: ComparisonPoint[] = handIns.map((handIn) => ({
    id: handIn.dropLogId,
    href: handIn.href,
    studentName: handIn.student.name,
    label: handIn.label,
    figure: handIn.figure,
    reynolds: handIn.reynolds,
    dragCoefficient: handIn.dragCoefficient,
    viscosityPaS: handIn.viscosityPaS,
    referenceViscosityPaS: handIn.referenceViscosityPaS,
    temperatureC: handIn.temperatureC,
  }));
  return (
    <section aria-labelledby="plots-heading" className="flex flex-col gap-8">
      <h2 id="plots-heading" className="text-lg font-semibold">
        Plots
      </h2>
      {lab.kind === "drag" ? (
        <DragCurveChart points={points} title={`Drag coefficient against Reynolds number, ${lab.title}`} />
      ) : (
        <ViscometryChart points={points} title={`Measured against reference viscosity, ${lab.title}`} />
      )}
      <FigureStripChart points={points} limits={limits} title={`Normalised figures of ${lab.title}`} />
    </section>
  );
}
