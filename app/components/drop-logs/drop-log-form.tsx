/**
 * The drop-log form, made for a phone at the bench: the sphere, the temperature, the timed distance
 * and a table of drops that takes a pasted column or a CSV file. It is a plain form first: without
 * JavaScript it hands in, adds and removes rows, and shows the server's errors at their fields with
 * what was typed. With JavaScript it also previews the server's reduction as the student types and
 * saves a draft, so a reload or a dropped connection loses nothing.
 *
 * The hand-in's idempotency key comes from the page's loader: a double tap, or a retry after a lost
 * answer, sends the same key and stores one version; the page's reload after a hand-in brings a new one.
 */
import { Form, useNavigation } from "react-router";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { SelectField, TextAreaField, TextField } from "~/components/ui/field";
import { dropFieldName, type DropLogDraft, type DropLogField } from "~/lib/drop-logs/drop-log-input";
import { formatDateTime } from "~/lib/format-date";
import { DropTimesField } from "./drop-times-field";
import { PartChoice } from "./part-choice";
import { PreviewPanel } from "./preview-panel";
import { WarningList } from "./reduction-summary";
import { useDraftAutosave } from "./use-draft-autosave";
import { useDropLogState, type FormColumn, type FormFluidLot, type FormSphere } from "./use-drop-log-state";
import { useReductionPreview } from "./use-reduction-preview";

export type { FormColumn, FormFluidLot, FormSphere };

export function DropLogForm({
  labId,
  kind,
  requiredDrops,
  spheres,
  fluidLots,
  columns,
  draft,
  attemptKey,
  timeZone,
  canHandIn,
  serverErrors,
}: {
  labId: string;
  kind: "drag" | "viscometry";
  requiredDrops: number;
  spheres: FormSphere[];
  /** The kit's fluid lots and columns the lab allows: one is taken as it is, two or more ask the student. */
  fluidLots: FormFluidLot[];
  columns: FormColumn[];
  /** What the form starts from: the saved draft, or what a refused hand-in sent. */
  draft: DropLogDraft;
  attemptKey: string;
  timeZone: string;
  canHandIn: boolean;
  /** Errors of a refused hand-in, keyed by the form's field names (`drops[3]`; "" above the form). */
  serverErrors: Record<string, string[] | null | undefined> | null;
}) {
  const { state, input, rows, rowErrors, update, chooseColumn } = useDropLogState(draft, { spheres, fluidLots, columns });
  const preview = useReductionPreview(labId, input, rows);
  const draftSave = useDraftAutosave(state);
  const navigation = useNavigation();
  const handingIn = navigation.state !== "idle" && navigation.formData?.get("intent") === "hand-in";

  const sphere = spheres.find((candidate) => candidate.id === state.sphereId) ?? null;
  const column = columns.find((candidate) => candidate.id === state.columnId) ?? null;
  const previewIssues = preview.status === "error" ? preview.issues : {};
  const warnings = preview.status === "ready" ? preview.result.warnings : [];
  const strayRows = new Set(preview.status === "ready" ? preview.result.reduction.drops.strayDrops.map((i) => preview.rows[i]) : []);
  const fieldMessages = (field: DropLogField): string[] => [
    ...(serverErrors?.[field] ?? []),
    ...(previewIssues[field] ? [previewIssues[field]] : []),
  ];
  const warningsFor = (field: DropLogField) => warnings.filter((warning) => warning.field === field);
  const handInButton = { type: "submit", name: "intent", value: "hand-in", disabled: !canHandIn || handingIn } as const;

  return (
    <Form method="post" className="flex flex-col gap-5" aria-labelledby="drop-log-heading" onSubmit={draftSave.cancel}>
      {/* The form's default button, first in it: Enter in a field hands in, never the row buttons below. */}
      <button {...handInButton} className="sr-only" tabIndex={-1} aria-hidden="true">
        Hand in
      </button>
      <input type="hidden" name="idempotencyKey" value={attemptKey} />
      <h2 id="drop-log-heading" className="text-lg font-semibold">
        Your drop log
      </h2>
      {serverErrors?.[""] ? <Notice tone="error">{serverErrors[""].join(" ")}</Notice> : null}

      <div className="group">
        <SelectField
          label="Sphere"
          name="sphereId"
          value={state.sphereId}
          onChange={(event) => update({ sphereId: event.target.value })}
          error={fieldMessages("sphereId")}
        >
          {spheres.map((candidate) => (
            <option key={candidate.id} value={candidate.id}>
              {candidate.label}
              {candidate.material ? ` (${candidate.material})` : ""}
            </option>
          ))}
        </SelectField>
        {sphere ? (
          <p className="mt-1 text-sm text-ink-700">
            Kit record: d = {sphere.diameterMm ?? "?"} mm, m = {sphere.massG ?? "?"} g. These are used for your result.
          </p>
        ) : null}
        <WarningList warnings={warningsFor("sphereId")} />
        <PartChoice
          label="Fluid lot (bottle)"
          name="fluidLotId"
          value={state.fluidLotId}
          onChange={(fluidLotId) => update({ fluidLotId })}
          options={fluidLots.map((lot) => ({
            id: lot.id,
            label: [lot.label, lot.fluidName].filter(Boolean).join(" · "),
            record: `density ${lot.densityKgM3 ?? "?"} kg/m³`,
          }))}
          error={fieldMessages("fluidLotId")}
          prompt="Choose the bottle you used"
        />
        <PartChoice
          label="Column"
          name="columnId"
          value={state.columnId}
          onChange={chooseColumn}
          options={columns.map((candidate) => ({
            id: candidate.id,
            label: candidate.label,
            record: `bore ${candidate.innerDiameterMm ?? "?"} mm, ${candidate.timedDistanceMm ?? "?"} mm between the bands`,
          }))}
          error={fieldMessages("columnId")}
          prompt="Choose the column you used"
        />
        <label className="mt-2 flex items-center gap-2 py-1 text-sm">
          <input
            type="checkbox"
            className="size-5 shrink-0"
            name="useOwnMeasurements"
            checked={state.useOwnMeasurements}
            onChange={(event) => update({ useOwnMeasurements: event.target.checked })}
          />
          Enter my own measurements of the sphere as well
        </label>
        {/* Always rendered, shown by the box's own state (CSS), so that ticking it works without JavaScript too. */}
        <div className="mt-2 hidden grid-cols-2 gap-3 group-has-[[name=useOwnMeasurements]:checked]:grid">
          <NumberField
            label="My diameter"
            unit="mm"
            name="ownDiameterMm"
            value={state.ownDiameterMm}
            onChange={update}
            errors={fieldMessages("ownDiameterMm")}
            warnings={warningsFor("ownDiameterMm")}
          />
          <NumberField
            label="My mass"
            unit="g"
            name="ownMassG"
            value={state.ownMassG}
            onChange={update}
            errors={fieldMessages("ownMassG")}
            warnings={warningsFor("ownMassG")}
          />
        </div>
      </div>

      <div className="grid grid-cols-2 gap-3">
        <NumberField
          label="Fluid temperature"
          unit="°C"
          name="temperatureC"
          required
          value={state.temperatureC}
          onChange={update}
          errors={fieldMessages("temperatureC")}
          warnings={warningsFor("temperatureC")}
        />
        <NumberField
          label="Timed distance"
          unit="mm"
          name="timedDistanceMm"
          value={state.timedDistanceMm}
          onChange={update}
          hint={
            column && column.timedDistanceMm !== null ? `Column ${column.label}: ${column.timedDistanceMm} mm between the bands` : undefined
          }
          errors={fieldMessages("timedDistanceMm")}
          warnings={warningsFor("timedDistanceMm")}
        />
      </div>

      <div>
        <DropTimesField
          drops={state.drops}
          onChange={(drops) => update({ drops })}
          requiredDrops={requiredDrops}
          messageFor={(row) => serverErrors?.[dropFieldName(row)]?.[0] ?? rowErrors[row] ?? previewIssues[dropFieldName(row)]}
          strayRows={strayRows}
        />
        {serverErrors?.drops ? <p className="mt-1 text-sm font-medium text-outlier">{serverErrors.drops.join(" ")}</p> : null}
        <WarningList warnings={warningsFor("drops")} />
      </div>

      <TextAreaField
        label="Notes (optional)"
        name="notes"
        rows={3}
        value={state.notes}
        onChange={(event) => update({ notes: event.target.value })}
        error={fieldMessages("notes")}
      />

      <PreviewPanel preview={preview} kind={kind} formWarnings={warningsFor("form")} />

      <div className="flex flex-wrap items-center gap-3">
        <Button {...handInButton}>{handingIn ? "Handing in…" : "Hand in"}</Button>
        <span className="text-sm text-ink-600" role="status">
          {draftSave.saving
            ? "Saving draft…"
            : draftSave.savedAt
              ? `Draft saved ${formatDateTime(draftSave.savedAt, timeZone, "time")}`
              : null}
        </span>
      </div>
    </Form>
  );
}

type NumberFieldName = "ownDiameterMm" | "ownMassG" | "temperatureC" | "timedDistanceMm";

/** One typed number of the log, with its errors and the preview's warnings beneath it. */
function NumberField({
  name,
  value,
  onChange,
  errors,
  warnings,
  ...field
}: {
  label: string;
  unit: string;
  name: NumberFieldName;
  value: string;
  required?: boolean;
  hint?: string;
  onChange: (patch: Partial<Record<NumberFieldName, string>>) => void;
  errors: string[];
  warnings: Parameters<typeof WarningList>[0]["warnings"];
}) {
  return (
    <div>
      <TextField
        {...field}
        name={name}
        inputMode="decimal"
        value={value}
        onChange={(event) => onChange({ [name]: event.target.value })}
        error={errors}
      />
      <WarningList warnings={warnings} />
    </div>
  );
}
