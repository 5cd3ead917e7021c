import type { Route } from "./+types/courses.$courseId.labs.$labId.comparison[.]csv";
import { csvResponse, toCsv } from "~/lib/csv";
import { comparisonJson, getLabComparison, readComparisonFilters, type ComparisonJson } from "~/server/comparison/class-comparison.server";
import { db } from "~/server/db.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";
import { loadComparisonLab } from "~/server/comparison/class-comparison.server";
import { staffRoles } from "~/server/auth/access.server";

type Row = ComparisonJson["handIns"][number];

/** The whole comparison table (or the filtered part of it) for a spreadsheet, formulas neutralised. */
export async function loader({ request, context, params }: Route.LoaderArgs) {
  const { access, lab } = await requireLabAccess({ request, context }, params, staffRoles, loadComparisonLab);
  const comparison = comparisonJson(await getLabComparison(db, access, lab, readComparisonFilters(request)));
  const csv = toCsv<Row>(comparison.handIns, [
    { header: "student", value: (row) => row.student.name },
    { header: "cohort", value: (row) => row.cohort?.name },
    { header: "drop_log_id", value: (row) => row.dropLogId },
    { header: "version", value: (row) => row.version },
    { header: "submitted_at", value: (row) => row.submittedAt },
    { header: "late", value: (row) => (row.late ? "yes" : "no") },
    { header: "sphere", value: (row) => row.parts.sphere?.label },
    { header: "fluid_lot", value: (row) => row.parts.fluidLot?.label },
    { header: "column", value: (row) => row.parts.column?.label },
    { header: "normalised_figure", value: (row) => row.figure },
    // Expanded uncertainties U = k·u_c at 95 % from each version's budget; empty for versions reduced before budgets.
    { header: "normalised_figure_expanded_uncertainty", value: (row) => row.uncertainty.figureExpanded },
    { header: "relative_to_class_median", value: (row) => row.relativeToClass },
    { header: "reynolds", value: (row) => row.reynolds },
    { header: "drag_coefficient", value: (row) => row.dragCoefficient },
    { header: "viscosity_pa_s", value: (row) => row.viscosityPaS },
    { header: "result_expanded_uncertainty", value: (row) => row.uncertainty.resultExpanded },
    { header: "coverage_factor", value: (row) => row.uncertainty.coverageFactor },
    { header: "reference_viscosity_pa_s", value: (row) => row.referenceViscosityPaS },
    { header: "temperature_c", value: (row) => row.temperatureC },
    { header: "label", value: (row) => row.label },
    { header: "reason", value: (row) => row.reason },
    { header: "method", value: () => comparison.method.description },
  ]);
  return csvResponse(`class-comparison-${lab.title}.csv`, csv);
}
