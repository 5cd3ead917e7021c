/**
 * The part form's fields as the server reads them. Calibration points arrive as repeated
 * `calibrationTemperatureC` / `calibrationViscosityPaS` fields, one pair per row, so the form works
 * without JavaScript; a row left empty is left out.
 */
import { formValues } from "~/lib/forms/parse-form";
import { blankAsMissing } from "~/lib/kits/parts-csv";

export type CalibrationRow = { temperatureC: string; viscosityPaS: string };

export function calibrationRows(form: FormData): CalibrationRow[] {
  const temperatures = form.getAll("calibrationTemperatureC").map(String);
  const viscosities = form.getAll("calibrationViscosityPaS").map(String);
  return temperatures
    .map((temperatureC, index) => ({ temperatureC: temperatureC.trim(), viscosityPaS: (viscosities[index] ?? "").trim() }))
    .filter((row) => row.temperatureC !== "" || row.viscosityPaS !== "");
}

/** What `partInput` checks: the typed values, with an empty box read as "missing" rather than zero. */
export function partFormCandidate(form: FormData): Record<string, unknown> {
  const values = Object.fromEntries(Object.entries(formValues(form)).map(([field, value]) => [field, blankAsMissing(field, value.trim())]));
  const calibration = calibrationRows(form).map((row) => ({
    temperatureC: row.temperatureC || undefined,
    viscosityPaS: row.viscosityPaS || undefined,
  }));
  return { ...values, calibration };
}
