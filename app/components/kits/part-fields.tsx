/**
 * The measurement fields of one part kind, each with its unit and its error beside it. Used by the
 * "Add a part" form and the re-measure form, so both ask for the same things in the same words.
 */
import type { FieldErrorMap } from "~/lib/forms/parse-form";
import { useState } from "react";
import { SelectField, TextAreaField, TextField } from "~/components/ui/field";
import { Button } from "~/components/ui/button";
import { accessoryInput, type PartKind } from "~/lib/kits/part-input";
import type { CalibrationRow } from "~/lib/kits/part-form";

export type PartFormValues = Record<string, string | undefined>;

export function PartFields({
  kind,
  values,
  calibration,
  errors,
}: {
  kind: PartKind;
  values: PartFormValues;
  calibration: CalibrationRow[];
  errors: FieldErrorMap;
}) {
  const field = (name: string) => ({ name, defaultValue: values[name] ?? "", error: errors[name] });
  const number = { type: "text", inputMode: "decimal" as const, autoComplete: "off" };
  return (
    <div className="flex flex-col gap-4">
      <input type="hidden" name="kind" value={kind} />
      <TextField
        label="Label"
        {...field("label")}
        required
        maxLength={40}
        hint="The course's own name for the part, e.g. S-12; unique in the course."
      />
      {kind === "sphere" ? (
        <>
          <TextField label="Material" {...field("material")} required hint="e.g. steel, glass, nylon: the density check uses it." />
          <div className="grid gap-4 sm:grid-cols-2">
            <TextField label="Diameter" unit="mm" {...field("diameterMm")} {...number} required />
            <TextField
              label="Diameter resolution"
              unit="mm"
              {...field("diameterResolutionMm")}
              {...number}
              hint="Of the calipers or micrometer; optional."
            />
            <TextField label="Mass" unit="g" {...field("massG")} {...number} required />
            <TextField label="Mass resolution" unit="g" {...field("massResolutionG")} {...number} hint="Of the balance; optional." />
          </div>
        </>
      ) : null}
      {kind === "fluid_lot" ? (
        <>
          <TextField label="Fluid" {...field("fluidName")} required hint="e.g. glycerol–water 85 %, or the syrup's brand and batch." />
          <div className="grid gap-4 sm:grid-cols-3">
            <TextField
              label="Density"
              unit="kg/m³"
              {...field("densityKgM3")}
              {...number}
              required
              hint="At 20 °C when a temperature coefficient is given."
            />
            <TextField
              label="Density uncertainty"
              unit="kg/m³"
              {...field("densityUncertaintyKgM3")}
              {...number}
              hint="Standard uncertainty; optional (taken as exact without it)."
            />
            <TextField
              label="Density change per kelvin"
              unit="kg/m³ per K"
              {...field("densityTemperatureCoefficientKgM3K")}
              {...number}
              hint="dρ/dT, negative (glycerol about −0.65); optional. The density is then corrected to each drop temperature."
            />
          </div>
          <TextField
            label="Glycerol mass fraction"
            unit="0–1"
            {...field("glycerolMassFraction")}
            {...number}
            hint="For a glycerol–water mix only, e.g. 0.85 for 85 % glycerol by mass: the calibration is then checked against handbook values. Leave empty for other fluids."
          />
          <CalibrationFields key={JSON.stringify(calibration)} rows={calibration} errors={errors} />
        </>
      ) : null}
      {kind === "column" ? (
        <div className="grid gap-4 sm:grid-cols-2">
          <TextField label="Inner diameter (bore)" unit="mm" {...field("innerDiameterMm")} {...number} required />
          <TextField
            label="Bore uncertainty"
            unit="mm"
            {...field("innerDiameterUncertaintyMm")}
            {...number}
            hint="Standard uncertainty; optional (the lab's diameter resolution is used without it)."
          />
          <TextField label="Timed distance between the bands" unit="mm" {...field("timedDistanceMm")} {...number} required />
          <TextField label="Run-in above the top band" unit="mm" {...field("runInMm")} {...number} required />
          <TextField label="Margin below the bottom band" unit="mm" {...field("marginBelowMm")} {...number} required />
        </div>
      ) : null}
      {kind === "accessory" ? (
        <SelectField label="Accessory type" {...field("accessoryType")} required>
          <option value="">Choose…</option>
          {accessoryInput.shape.accessoryType.options.map((type) => (
            <option key={type} value={type}>
              {type}
            </option>
          ))}
        </SelectField>
      ) : null}
      <TextAreaField label="Notes" {...field("notes")} rows={2} maxLength={2000} />
    </div>
  );
}

/**
 * Calibration points as rows of two boxes. Without JavaScript the form arrives with spare empty rows
 * (left out when empty); with it, rows can be added and removed.
 */
function CalibrationFields({ rows: initialRows, errors }: { rows: CalibrationRow[]; errors: FieldErrorMap }) {
  const [rows, setRows] = useState(() => initialRows.map((row, index) => ({ ...row, key: index })));
  const [nextKey, setNextKey] = useState(initialRows.length);
  const addRow = () => {
    setRows((current) => [...current, { temperatureC: "", viscosityPaS: "", key: nextKey }]);
    setNextKey((key) => key + 1);
  };
  return (
    <fieldset className="flex flex-col gap-3 rounded-md p-3 ring-1 ring-ink-900/15">
      <legend className="px-1 text-sm font-medium">Viscosity calibration points</legend>
      <p className="text-xs text-ink-600">
        One row per temperature, measured or from the supplier's sheet. Two or more temperatures give the Andrade fit ln μ = A + B/T; a row
        left empty is left out.
      </p>
      {errors.calibration ? (
        <p className="text-sm text-outlier" role="alert">
          {errors.calibration.join(" ")}
        </p>
      ) : null}
      <ol className="flex flex-col gap-3">
        {rows.map((row, index) => (
          <li key={row.key} className="grid grid-cols-[1fr_1fr_auto] items-end gap-2">
            <TextField
              label={`Point ${index + 1}: temperature`}
              unit="°C"
              name="calibrationTemperatureC"
              defaultValue={row.temperatureC}
              inputMode="decimal"
              autoComplete="off"
              error={errors[`calibration.${index}.temperatureC`]}
            />
            <TextField
              label="viscosity"
              unit="Pa·s"
              name="calibrationViscosityPaS"
              defaultValue={row.viscosityPaS}
              inputMode="decimal"
              autoComplete="off"
              aria-label={`Point ${index + 1}: viscosity (Pa·s)`}
              error={errors[`calibration.${index}.viscosityPaS`]}
            />
            <Button
              type="button"
              variant="secondary"
              onClick={() => setRows((current) => current.filter((other) => other.key !== row.key))}
              aria-label={`Remove point ${index + 1}`}
            >
              Remove
            </Button>
          </li>
        ))}
      </ol>
      <Button type="button" variant="secondary" onClick={addRow} className="self-start">
        Add a point
      </Button>
    </fieldset>
  );
}
