import { partKindLabels, sphereDensityKgM3, type PartKind } from "./part-input";

/** A measured value printed to the instrument's resolution, so 0.110 g does not read as 0.11 g. */
function measured(value: number | null, resolution: number | null): string {
  if (value === null) return "?";
  if (!resolution) return String(value);
  return value.toFixed(Math.max(0, Math.ceil(-Math.log10(resolution) - 1e-9)));
}

type PartRecord = {
  diameterResolutionMm: number | null;
  massResolutionG: number | null;
  kind: PartKind;
  label: string;
  material: string | null;
  diameterMm: number | null;
  massG: number | null;
  fluidName: string | null;
  densityKgM3: number | null;
  innerDiameterMm: number | null;
  timedDistanceMm: number | null;
  runInMm: number | null;
  marginBelowMm: number | null;
  accessoryType: string | null;
};

/** A part's recorded values in one line, with units, for kit pages, packing slips and "My kit". */
export function describePart(part: PartRecord): { kind: string; values: string } {
  const kind = partKindLabels[part.kind];
  switch (part.kind) {
    case "sphere":
      return {
        kind,
        values: `${part.material}, d = ${measured(part.diameterMm, part.diameterResolutionMm)} mm, m = ${measured(part.massG, part.massResolutionG)} g (ρ ≈ ${Math.round(sphereDensityKgM3(part.massG!, part.diameterMm!))} kg/m³)`,
      };
    case "fluid_lot":
      return { kind, values: `${part.fluidName}, ρ = ${part.densityKgM3} kg/m³` };
    case "column":
      return {
        kind,
        values: `inner diameter ${part.innerDiameterMm} mm, ${part.timedDistanceMm} mm between the bands, run-in ${part.runInMm} mm, ${part.marginBelowMm} mm below`,
      };
    case "accessory":
      return { kind, values: part.accessoryType ?? "" };
  }
}
