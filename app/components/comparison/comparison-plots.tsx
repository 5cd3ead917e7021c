/** The class comparison's plots: the lab's own curve (drag or viscometry) and the strip of normalised figures. */
import { DragCurveChart, FigureStripChart, ViscometryChart, type ComparisonPoint } from "~/components/comparison/comparison-charts";
import { handInHref } from "~/lib/comparison/links";
import type { ComparisonJson, PlotPoint } from "~/server/comparison/class-comparison.server";

export function ComparisonPlots({
  courseId,
  lab,
  points: plotted,
  limits,
}: Pick<ComparisonJson, "lab" | "limits"> & { courseId: string; points: PlotPoint[] }) {
  const points: ComparisonPoint[] = plotted.map((point) => ({ ...point, href: handInHref(courseId, lab.id, point.id) }));
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
