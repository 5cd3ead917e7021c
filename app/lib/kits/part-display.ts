/** How parts read on screen: status words (never colour alone), field names with their units, numbers. */
import type { CalibrationPoint } from "~/db/schema";
import { fluidLotCalibration } from "~/lib/kits/fluid-lot-fit";
import { sphereDensityKgM3, type PartKind } from "~/lib/kits/part-input";

export type PartStatus = "in_service" | "remeasure" | "retired";

export const partStatusLabels: Record<PartStatus, string> = {
  in_service: "In service",
  remeasure: "Needs re-measuring",
  retired: "Retired",
};

/** Each stored field's name on screen, with its unit, for the history's "old → new". */
export const partFieldLabels: Record<string, string> = {
  label: "Label",
  notes: "Notes",
  material: "Material",
  diameterMm: "Diameter (mm)",
  diameterResolutionMm: "Diameter resolution (mm)",
  massG: "Mass (g)",
  massResolutionG: "Mass resolution (g)",
  fluidName: "Fluid",
  densityKgM3: "Density (kg/m³)",
  densityUncertaintyKgM3: "Density uncertainty (kg/m³)",
  densityTemperatureCoefficientKgM3K: "dρ/dT (kg/m³ per K)",
  glycerolMassFraction: "Glycerol mass fraction (0–1)",
  calibration: "Calibration (°C : Pa·s)",
  innerDiameterMm: "Bore (mm)",
  innerDiameterUncertaintyMm: "Bore uncertainty (mm)",
  timedDistanceMm: "Timed distance (mm)",
  runInMm: "Run-in (mm)",
  marginBelowMm: "Margin below (mm)",
  accessoryType: "Accessory type",
};

/** Up to four significant figures: enough for bench measurements, short enough for a table cell. */
export function formatNumber(value: number | null | undefined, significant = 4): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return "—";
  return Number(value.toPrecision(significant)).toString();
}

/** A stored value as the history shows it. */
export function formatFieldValue(value: unknown): string {
  if (value === null || value === undefined || value === "") return "—";
  if (Array.isArray(value))
    return (value as CalibrationPoint[]).map((point) => `${point.temperatureC} °C : ${point.viscosityPaS}`).join("; ");
  return String(value);
}

/** A part's measured columns as stored (null where its kind has none). */
export type StoredPartFields = {
  kind: PartKind;
  material: string | null;
  diameterMm: number | null;
  massG: number | null;
  fluidName: string | null;
  densityKgM3: number | null;
  densityUncertaintyKgM3?: number | null;
  densityTemperatureCoefficientKgM3K?: number | null;
  calibration: CalibrationPoint[] | null;
  innerDiameterMm: number | null;
  innerDiameterUncertaintyMm?: number | null;
  timedDistanceMm: number | null;
  runInMm: number | null;
  marginBelowMm: number | null;
  accessoryType: string | null;
};

/** The few numbers that identify a part at a glance, with their units. */
export function measurementSummary(part: StoredPartFields): string {
  switch (part.kind) {
    case "sphere": {
      const density = part.massG && part.diameterMm ? sphereDensityKgM3(part.massG, part.diameterMm) : null;
      return `${part.material ?? "—"} · d ${formatNumber(part.diameterMm)} mm · m ${formatNumber(part.massG)} g · ρ ${formatNumber(density)} kg/m³`;
    }
    case "fluid_lot": {
      const calibration = fluidLotCalibration(part.calibration);
      const at20 = calibration?.quoted.find((point) => point.temperatureC === 20);
      const density = `ρ ${formatNumber(part.densityKgM3)}${part.densityUncertaintyKgM3 != null ? ` (u ${formatNumber(part.densityUncertaintyKgM3)})` : ""} kg/m³`;
      const coefficient =
        part.densityTemperatureCoefficientKgM3K != null
          ? ` at 20 °C, dρ/dT ${formatNumber(part.densityTemperatureCoefficientKgM3K)} kg/m³ per K`
          : "";
      return `${part.fluidName ?? "—"} · ${density}${coefficient} · ${part.calibration?.length ?? 0} calibration points · μ(20 °C) ${formatNumber(at20?.viscosityPaS)} Pa·s`;
    }
    case "column":
      return `inner diameter ${formatNumber(part.innerDiameterMm)}${part.innerDiameterUncertaintyMm != null ? ` (u ${formatNumber(part.innerDiameterUncertaintyMm)})` : ""} mm · timed ${formatNumber(part.timedDistanceMm)} mm · run-in ${formatNumber(part.runInMm)} mm · margin ${formatNumber(part.marginBelowMm)} mm`;
    case "accessory":
      return part.accessoryType ?? "—";
  }
}
