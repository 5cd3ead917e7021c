/**
 * The measurement fields of one part kind, each with its unit and its error beside it. Used by the
 * "Add a part" form and the re-measure form, so both ask for the same things in the same words.
 */
import { useFormMetadata, type FormMetadata } from "@conform-to/react";
import { SelectField, TextAreaField, TextField } from "~/components/ui/field";
import { Button } from "~/components/ui/button";
import { accessoryInput, type PartFormInput, type PartKind } from "~/lib/kits/part-input";

/** The fields of a form over `partInput` (the re-measure form adds its own to them). */
export type PartFieldset = ReturnType<FormMetadata<PartFormInput>["getFieldset"]>;

export function PartFields({ kind, fields }: { kind: PartKind; fields: PartFieldset }) {
  const number = { type: "text", inputMode: "decimal" as const, autoComplete: "off" };
  return (
    <div className="flex flex-col gap-4">
      {/* Enter in a box presses the form's first submit button: it must save, not add or remove a calibration row. */}
      <button type="submit" hidden tabIndex={-1} />
      <input type="hidden" name="kind" value={kind} />
      <TextField
        label="Label"
        field={fields.label}
        required
        maxLength={40}
        hint="The course's own name for the part, e.g. S-12; unique in the course."
      />
      {kind === "sphere" ? (
        <>
          <TextField label="Material" field={fields.material} required hint="e.g. steel, glass, nylon: the density check uses it." />
          <div className="grid gap-4 sm:grid-cols-2">
            <TextField label="Diameter" unit="mm" field={fields.diameterMm} {...number} required />
            <TextField
              label="Diameter resolution"
              unit="mm"
              field={fields.diameterResolutionMm}
              {...number}
              hint="Of the calipers or micrometer; optional."
            />
            <TextField label="Mass" unit="g" field={fields.massG} {...number} required />
            <TextField label="Mass resolution" unit="g" field={fields.massResolutionG} {...number} hint="Of the balance; optional." />
          </div>
        </>
      ) : null}
      {kind === "fluid_lot" ? (
        <>
          <TextField label="Fluid" field={fields.fluidName} required hint="e.g. glycerol–water 85 %, or the syrup's brand and batch." />
          <div className="grid gap-4 sm:grid-cols-3">
            <TextField
              label="Density"
              unit="kg/m³"
              field={fields.densityKgM3}
              {...number}
              required
              hint="At 20 °C when a temperature coefficient is given."
            />
            <TextField
              label="Density uncertainty"
              unit="kg/m³"
              field={fields.densityUncertaintyKgM3}
              {...number}
              hint="Standard uncertainty; optional (taken as exact without it)."
            />
            <TextField
              label="Density change per kelvin"
              unit="kg/m³ per K"
              field={fields.densityTemperatureCoefficientKgM3K}
              {...number}
              hint="dρ/dT, negative (glycerol about −0.65); optional. The density is then corrected to each drop temperature."
            />
          </div>
          <TextField
            label="Glycerol mass fraction"
            unit="0–1"
            field={fields.glycerolMassFraction}
            {...number}
            hint="For a glycerol–water mix only, e.g. 0.85 for 85 % glycerol by mass: the calibration is then checked against handbook values. Leave empty for other fluids."
          />
          <CalibrationFields calibration={fields.calibration} />
        </>
      ) : null}
      {kind === "column" ? (
        <div className="grid gap-4 sm:grid-cols-2">
          <TextField label="Inner diameter (bore)" unit="mm" field={fields.innerDiameterMm} {...number} required />
          <TextField
            label="Bore uncertainty"
            unit="mm"
            field={fields.innerDiameterUncertaintyMm}
            {...number}
            hint="Standard uncertainty; optional (the lab's diameter resolution is used without it)."
          />
          <TextField label="Timed distance between the bands" unit="mm" field={fields.timedDistanceMm} {...number} required />
          <TextField label="Run-in above the top band" unit="mm" field={fields.runInMm} {...number} required />
          <TextField label="Margin below the bottom band" unit="mm" field={fields.marginBelowMm} {...number} required />
        </div>
      ) : null}
      {kind === "accessory" ? (
        <SelectField label="Accessory type" field={fields.accessoryType} required>
          <option value="">Choose…</option>
          {accessoryInput.shape.accessoryType.options.map((type) => (
            <option key={type} value={type}>
              {type}
            </option>
          ))}
        </SelectField>
      ) : null}
      <TextAreaField label="Notes" field={fields.notes} rows={2} maxLength={2000} />
    </div>
  );
}

/**
 * Calibration points as rows of two boxes (inside the form's FormProvider). Adding and removing a row are submit buttons,
 * so they work without JavaScript; a row left empty is left out.
 */
function CalibrationFields({ calibration }: { calibration: PartFieldset["calibration"] }) {
  const form = useFormMetadata(calibration.formId);
  return (
    <fieldset className="flex flex-col gap-3 rounded-md p-3 ring-1 ring-ink-900/15">
      <legend className="px-1 text-sm font-medium">Viscosity calibration points</legend>
      <p className="text-xs text-ink-600">
        One row per temperature, measured or from the supplier's sheet. Two or more temperatures give the Andrade fit ln μ = A + B/T; a row
        left empty is left out.
      </p>
      {calibration.errors ? (
        <p id={calibration.errorId} className="text-sm text-outlier" role="alert">
          {calibration.errors.join(" ")}
        </p>
      ) : null}
      <ol className="flex flex-col gap-3">
        {calibration.getFieldList().map((row, index) => {
          const point = row.getFieldset();
          return (
            <li key={row.key ?? index} className="grid grid-cols-[1fr_1fr_auto] items-end gap-2">
              <TextField
                label={`Point ${index + 1}: temperature`}
                unit="°C"
                field={point.temperatureC}
                inputMode="decimal"
                autoComplete="off"
              />
              <TextField
                label="viscosity"
                unit="Pa·s"
                field={point.viscosityPaS}
                inputMode="decimal"
                autoComplete="off"
                aria-label={`Point ${index + 1}: viscosity (Pa·s)`}
              />
              <Button
                variant="secondary"
                {...form.remove.getButtonProps({ name: calibration.name, index })}
                aria-label={`Remove point ${index + 1}`}
              >
                Remove
              </Button>
            </li>
          );
        })}
      </ol>
      <Button variant="secondary" {...form.insert.getButtonProps({ name: calibration.name })} className="self-start">
        Add a point
      </Button>
    </fieldset>
  );
}
