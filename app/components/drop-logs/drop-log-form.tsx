/**
 * The drop-log form, made for a phone at the bench: the sphere, the temperature, the timed distance
 * and a table of drops that takes a pasted column or a CSV file. While the student types, the form
 * asks the server for the reduction (the same one a hand-in stores) and saves a draft, so a reload or
 * a dropped connection loses nothing.
 */
import Papa from "papaparse";
import { useEffect, useMemo, useRef, useState, type ClipboardEvent } from "react";
import { Form, useFetcher, useNavigation } from "react-router";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { SelectField, TextAreaField, TextField } from "~/components/ui/field";
import { dropLogInput, type DropLogDraft, type DropLogField } from "~/lib/drop-logs/drop-log-input";
import { parseTypedNumber } from "~/lib/forms/typed-number";
import { enteredTimes, joinTimes, splitPastedTimes, type TimesJoin } from "~/lib/drop-logs/pasted-times";
import type { DropLogReduction } from "~/lib/drop-logs/reduce-drop-log";
import { ReductionSummary, WarningList, figure } from "./reduction-summary";
import { StrayDropComparison } from "./reduction-result";

export type FormSphere = { id: string; label: string; material: string | null; diameterMm: number | null; massG: number | null };
export type FormFluidLot = { id: string; label: string; fluidName: string | null; densityKgM3: number | null };
export type FormColumn = { id: string; label: string; innerDiameterMm: number | null; timedDistanceMm: number | null };

type FormState = Required<Omit<DropLogDraft, "useOwnMeasurements">> & { useOwnMeasurements: boolean };
/** A column of times waiting for the student to say how it joins the drops already typed. */
type IncomingColumn = { times: string[]; /** "from the clipboard", "from runs.csv" */ from: string; returnFocusTo: number };
type Preview =
  | { status: "idle" | "loading" }
  | { status: "ready"; result: DropLogReduction; rows: number[] }
  | { status: "error"; message: string; issues: Record<string, string> };

const PREVIEW_DELAY_MS = 400;
const DRAFT_DELAY_MS = 1200;

/** The draft's choice while the kit still holds it; else the only choice; else none, for the student to make. */
function initialChoice(saved: string | undefined, options: { id: string }[]): string {
  if (saved && options.some((option) => option.id === saved)) return saved;
  return options.length === 1 ? options[0].id : "";
}

function initialState(draft: DropLogDraft, spheres: FormSphere[], fluidLots: FormFluidLot[], columns: FormColumn[]): FormState {
  const columnId = initialChoice(draft.columnId, columns);
  const columnDistanceMm = columns.find((column) => column.id === columnId)?.timedDistanceMm ?? null;
  return {
    sphereId: draft.sphereId ?? spheres[0]?.id ?? "",
    fluidLotId: initialChoice(draft.fluidLotId, fluidLots),
    columnId,
    useOwnMeasurements: draft.useOwnMeasurements ?? false,
    ownDiameterMm: draft.ownDiameterMm ?? "",
    ownMassG: draft.ownMassG ?? "",
    temperatureC: draft.temperatureC ?? "",
    timedDistanceMm: draft.timedDistanceMm ?? (columnDistanceMm !== null ? String(columnDistanceMm) : ""),
    drops: draft.drops?.length ? draft.drops : [""],
    notes: draft.notes ?? "",
  };
}

/** The drop-log input the state stands for, with blank rows left out, and which row each drop came from. */
function toInput(state: FormState) {
  const rows = state.drops.flatMap((value, index) => (value.trim() === "" ? [] : [index]));
  return {
    rows,
    input: {
      sphereId: state.sphereId,
      fluidLotId: state.fluidLotId,
      columnId: state.columnId,
      ownDiameterMm: state.useOwnMeasurements ? state.ownDiameterMm : undefined,
      ownMassG: state.useOwnMeasurements ? state.ownMassG : undefined,
      temperatureC: state.temperatureC,
      timedDistanceMm: state.timedDistanceMm,
      drops: rows.map((index) => state.drops[index]),
      notes: state.notes,
    },
  };
}

/** Issue paths (`drops.2` of the sent drops) back on the rows of the table. */
function issuesByField(issues: { path: (string | number)[]; message: string }[], rows: number[]): Record<string, string> {
  const byField: Record<string, string> = {};
  for (const issue of issues) {
    const [first, second] = issue.path;
    const key = first === "drops" && typeof second === "number" ? `drops.${rows[second] ?? second}` : String(first ?? "form");
    byField[key] ??= issue.message;
  }
  return byField;
}

export function DropLogForm({
  labId,
  kind,
  requiredDrops,
  spheres,
  fluidLots,
  columns,
  draft,
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
  draft: DropLogDraft;
  canHandIn: boolean;
  /** Field errors of a refused hand-in, keyed like the form (`drops.3`). */
  serverErrors: Record<string, string[] | undefined> | null;
}) {
  const [state, setState] = useState<FormState>(() => initialState(draft, spheres, fluidLots, columns));
  const [preview, setPreview] = useState<Preview>({ status: "idle" });
  const [attemptKey, setAttemptKey] = useState<string | null>(null);
  const [incoming, setIncoming] = useState<IncomingColumn | null>(null);
  const [columnMessage, setColumnMessage] = useState<string | null>(null);
  const draftFetcher = useFetcher<{ draftSavedAt?: string }>();
  const navigation = useNavigation();
  const handingIn = navigation.state !== "idle" && navigation.formData?.get("intent") === "hand-in";
  const firstRender = useRef(true);
  const dropRefs = useRef<(HTMLInputElement | null)[]>([]);

  const sphere = spheres.find((candidate) => candidate.id === state.sphereId) ?? null;
  const column = columns.find((candidate) => candidate.id === state.columnId) ?? null;
  const { input, rows } = useMemo(() => toInput(state), [state]);

  // Instant per-row checks in the browser with the server's own schema; the server checks again.
  const rowErrors = useMemo(() => {
    const errors: Record<number, string> = {};
    state.drops.forEach((value, index) => {
      if (value.trim() === "") return;
      const parsed = dropLogInput.shape.drops.element.safeParse(value);
      if (!parsed.success) errors[index] = parsed.error.issues[0].message;
    });
    return errors;
  }, [state.drops]);

  // A new attempt, and so a new idempotency key, whenever the input changes; a double tap reuses it.
  useEffect(() => setAttemptKey(crypto.randomUUID()), [state]);

  useEffect(() => {
    // What the page loaded with is already on the server.
    if (firstRender.current) {
      firstRender.current = false;
      return;
    }
    const timer = setTimeout(() => {
      draftFetcher.submit({ intent: "save-draft", draft: JSON.stringify(state) }, { method: "post" });
    }, DRAFT_DELAY_MS);
    return () => clearTimeout(timer);
    // The fetcher's identity changes as it runs; only the typed state should restart the timer.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [state]);

  useEffect(() => {
    if (!input.drops.length || parseTypedNumber(input.temperatureC) === undefined) {
      setPreview({ status: "idle" });
      return;
    }
    const controller = new AbortController();
    const timer = setTimeout(async () => {
      setPreview({ status: "loading" });
      try {
        const response = await fetch("/api/v1/reduce", {
          method: "POST",
          headers: { "Content-Type": "application/json" },
          body: JSON.stringify({ labId, input }),
          signal: controller.signal,
        });
        const body = await response.json();
        if (response.ok) setPreview({ status: "ready", result: body as DropLogReduction, rows });
        else
          setPreview({
            status: "error",
            message: body.error?.message ?? "The preview failed.",
            issues: issuesByField(body.error?.issues ?? [], rows),
          });
      } catch {
        if (!controller.signal.aborted)
          setPreview({ status: "error", message: "No connection: the preview will come back when you are online.", issues: {} });
      }
    }, PREVIEW_DELAY_MS);
    return () => {
      clearTimeout(timer);
      controller.abort();
    };
  }, [labId, input, rows]);

  const update = (patch: Partial<FormState>) => setState((current) => ({ ...current, ...patch }));
  // The timed distance follows the column chosen, unless the student typed their own.
  const chooseColumn = (columnId: string) =>
    setState((current) => {
      const before = columns.find((candidate) => candidate.id === current.columnId)?.timedDistanceMm ?? null;
      const after = columns.find((candidate) => candidate.id === columnId)?.timedDistanceMm ?? null;
      const untouched = current.timedDistanceMm === "" || (before !== null && current.timedDistanceMm === String(before));
      return { ...current, columnId, timedDistanceMm: untouched && after !== null ? String(after) : current.timedDistanceMm };
    });
  const setDrop = (index: number, value: string) =>
    setState((current) => ({ ...current, drops: current.drops.map((drop, i) => (i === index ? value : drop)) }));
  const addRow = (focus = true) => {
    setState((current) => ({ ...current, drops: [...current.drops, ""] }));
    if (focus) setTimeout(() => dropRefs.current[state.drops.length]?.focus(), 0);
  };
  const removeRow = (index: number) =>
    setState((current) => ({ ...current, drops: current.drops.length > 1 ? current.drops.filter((_, i) => i !== index) : [""] }));

  const typedCount = enteredTimes(state.drops).length;
  const joinColumn = (column: IncomingColumn, how: TimesJoin) => {
    const kept = how === "append" ? typedCount : 0;
    update({ drops: joinTimes(state.drops, column.times, how) });
    setIncoming(null);
    const times = `${column.times.length} drop times ${column.from}`;
    setColumnMessage(
      how === "append" ? `Added ${times} after drop ${kept}.` : typedCount ? `Replaced the drops with ${times}.` : `Entered ${times}.`,
    );
    setTimeout(() => dropRefs.current[kept]?.focus(), 0);
  };
  // Into an empty log the column simply goes in; over typed drops the student is asked first.
  const receiveColumn = (column: IncomingColumn) => {
    if (typedCount === 0) joinColumn(column, "replace");
    else {
      setColumnMessage(null);
      setIncoming(column);
    }
  };
  const pasteIntoRow = (index: number, event: ClipboardEvent<HTMLInputElement>) => {
    const times = splitPastedTimes(event.clipboardData.getData("text"));
    if (times.length < 2) return;
    event.preventDefault();
    receiveColumn({ times, from: "from the clipboard", returnFocusTo: index });
  };

  const readCsv = (file: File) => {
    Papa.parse<string[]>(file, {
      skipEmptyLines: true,
      complete: ({ data }) => {
        // The first column that holds numbers; a header row above them is skipped.
        const width = Math.max(0, ...data.map((row) => row.length));
        for (let column = 0; column < width; column++) {
          const cells = data
            .map((row) => (row[column] ?? "").trim())
            .filter((cell) => typeof parseTypedNumber(cell) === "number" && !Number.isNaN(parseTypedNumber(cell)));
          if (cells.length) {
            receiveColumn({ times: cells, from: `from ${file.name}`, returnFocusTo: 0 });
            return;
          }
        }
        setColumnMessage(`${file.name} holds no column of numbers.`);
      },
      error: () => setColumnMessage(`${file.name} could not be read as CSV.`),
    });
  };

  const previewIssues = preview.status === "error" ? preview.issues : {};
  const warnings = preview.status === "ready" ? preview.result.warnings : [];
  const strayRows = new Set(preview.status === "ready" ? preview.result.reduction.drops.strayDrops.map((i) => preview.rows[i]) : []);
  const fieldMessages = (field: DropLogField): string[] => [
    ...(serverErrors?.[field] ?? []),
    ...(previewIssues[field] ? [previewIssues[field]] : []),
  ];
  const warningsFor = (field: DropLogField) => warnings.filter((warning) => warning.field === field);
  const savedAt = draftFetcher.data?.draftSavedAt;

  return (
    <Form method="post" className="flex flex-col gap-5" aria-labelledby="drop-log-heading">
      <input type="hidden" name="intent" value="hand-in" />
      <input type="hidden" name="idempotencyKey" value={attemptKey ?? ""} />
      <h2 id="drop-log-heading" className="text-lg font-semibold">
        Your drop log
      </h2>
      {serverErrors?.form ? <Notice tone="error">{serverErrors.form.join(" ")}</Notice> : null}

      <div>
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
        {state.useOwnMeasurements ? (
          <div className="mt-2 grid grid-cols-2 gap-3">
            <div>
              <TextField
                label="My diameter"
                unit="mm"
                name="ownDiameterMm"
                inputMode="decimal"
                value={state.ownDiameterMm}
                onChange={(event) => update({ ownDiameterMm: event.target.value })}
                error={fieldMessages("ownDiameterMm")}
              />
              <WarningList warnings={warningsFor("ownDiameterMm")} />
            </div>
            <div>
              <TextField
                label="My mass"
                unit="g"
                name="ownMassG"
                inputMode="decimal"
                value={state.ownMassG}
                onChange={(event) => update({ ownMassG: event.target.value })}
                error={fieldMessages("ownMassG")}
              />
              <WarningList warnings={warningsFor("ownMassG")} />
            </div>
          </div>
        ) : null}
      </div>

      <div className="grid grid-cols-2 gap-3">
        <div>
          <TextField
            label="Fluid temperature"
            unit="°C"
            name="temperatureC"
            inputMode="decimal"
            required
            value={state.temperatureC}
            onChange={(event) => update({ temperatureC: event.target.value })}
            error={fieldMessages("temperatureC")}
          />
          <WarningList warnings={warningsFor("temperatureC")} />
        </div>
        <div>
          <TextField
            label="Timed distance"
            unit="mm"
            name="timedDistanceMm"
            inputMode="decimal"
            value={state.timedDistanceMm}
            onChange={(event) => update({ timedDistanceMm: event.target.value })}
            hint={
              column && column.timedDistanceMm !== null
                ? `Column ${column.label}: ${column.timedDistanceMm} mm between the bands`
                : undefined
            }
            error={fieldMessages("timedDistanceMm")}
          />
          <WarningList warnings={warningsFor("timedDistanceMm")} />
        </div>
      </div>

      <fieldset>
        <legend className="text-sm font-medium">
          Drop times <span className="font-normal text-ink-600">(s, {requiredDrops} or more)</span>
        </legend>
        <p className="text-sm text-ink-600">Paste a column of times from a spreadsheet or stopwatch app into a row, or read a CSV file.</p>
        {incoming ? (
          <JoinTimesChoice
            incoming={incoming}
            typedCount={typedCount}
            onChoose={(how) => joinColumn(incoming, how)}
            onCancel={() => {
              setIncoming(null);
              dropRefs.current[incoming.returnFocusTo]?.focus();
            }}
          />
        ) : null}
        <table className="mt-2 w-full text-sm">
          <thead>
            <tr className="text-left text-ink-700">
              <th scope="col" className="w-10 py-1">
                #
              </th>
              <th scope="col" className="py-1">
                Time (s)
              </th>
              <th scope="col" className="w-20 py-1">
                <span className="sr-only">Remove</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {state.drops.map((value, index) => {
              const message = serverErrors?.[`drops.${index}`]?.[0] ?? rowErrors[index] ?? previewIssues[`drops.${index}`];
              const stray = strayRows.has(index);
              return (
                <tr key={index} className={stray ? "bg-amber-300/20" : undefined}>
                  <td className="pt-3.5 pb-1 align-top tabular-nums">{index + 1}</td>
                  <td className="py-1 align-top">
                    <input
                      ref={(element) => {
                        dropRefs.current[index] = element;
                      }}
                      name="drops"
                      inputMode="decimal"
                      aria-label={`Drop ${index + 1} time in seconds`}
                      aria-invalid={message ? true : undefined}
                      aria-describedby={message || stray ? `drop-${index}-note` : undefined}
                      className={`w-full rounded border px-3 py-2 text-base tabular-nums ${message ? "border-outlier" : "border-ink-900/20"}`}
                      value={value}
                      onChange={(event) => setDrop(index, event.target.value)}
                      onPaste={(event) => pasteIntoRow(index, event)}
                      onKeyDown={(event) => {
                        if (event.key === "Enter") {
                          event.preventDefault();
                          if (index === state.drops.length - 1) addRow();
                          else dropRefs.current[index + 1]?.focus();
                        }
                      }}
                    />
                    {message || stray ? (
                      <p id={`drop-${index}-note`} className={`mt-1 ${message ? "font-medium text-outlier" : "text-amber-800"}`}>
                        {message ?? "Stray drop (generalized ESD test): kept, and also reported without it."}
                      </p>
                    ) : null}
                  </td>
                  <td className="py-1 text-right align-top">
                    <button
                      type="button"
                      className="rounded px-2 py-2 text-ink-700 underline"
                      onClick={() => removeRow(index)}
                      aria-label={`Remove drop ${index + 1}`}
                    >
                      Remove
                    </button>
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
        {serverErrors?.drops ? <p className="mt-1 text-sm font-medium text-outlier">{serverErrors.drops.join(" ")}</p> : null}
        <WarningList warnings={warningsFor("drops")} />
        <div className="mt-2 flex flex-wrap items-center gap-3">
          <Button type="button" variant="secondary" onClick={() => addRow()}>
            Add a drop
          </Button>
          {/* The file input is hidden; the label is what is seen, tapped and shows the keyboard focus. */}
          <label className="cursor-pointer rounded px-2 py-2 text-sm focus-within:outline-2 focus-within:outline-offset-2 focus-within:outline-ink-700">
            <span className="underline">Read a CSV file</span>
            <input
              type="file"
              accept=".csv,text/csv,text/plain"
              className="sr-only"
              onChange={(event) => {
                const file = event.target.files?.[0];
                if (file) readCsv(file);
                event.target.value = "";
              }}
            />
          </label>
          <span className="text-sm text-ink-700" role="status">
            {columnMessage}
          </span>
        </div>
      </fieldset>

      <TextAreaField
        label="Notes (optional)"
        name="notes"
        rows={3}
        value={state.notes}
        onChange={(event) => update({ notes: event.target.value })}
        error={fieldMessages("notes")}
      />

      <section aria-labelledby="preview-heading" aria-live="polite" className="rounded-lg bg-paper-100 p-4 ring-1 ring-ink-900/10">
        <h3 id="preview-heading" className="font-semibold">
          Preview {preview.status === "loading" ? <span className="text-sm font-normal text-ink-600">(updating…)</span> : null}
        </h3>
        {preview.status === "idle" ? (
          <p className="text-sm text-ink-700">Enter the temperature and a drop time to see your result.</p>
        ) : null}
        {preview.status === "error" ? <p className="text-sm text-outlier">{preview.message}</p> : null}
        {preview.status === "ready" ? (
          <>
            <ReductionSummary reduction={preview.result.reduction} normalisedFigure={preview.result.normalisedFigure} />
            <WarningList warnings={warningsFor("form")} />
            <StrayDropComparison
              reduction={preview.result.reduction}
              normalisedFigure={preview.result.normalisedFigure}
              referenceViscosity={preview.result.kitRecords.fluidLot.viscosityPaS}
            />
            <p className="mt-2 text-xs text-ink-600">
              Computed by the server from your kit's records
              {kind === "drag"
                ? `, with the fluid's viscosity ${figure(preview.result.kitRecords.fluidLot.viscosityPaS)} Pa·s at your temperature`
                : ""}
              . Handing in stores this result.
            </p>
          </>
        ) : null}
      </section>

      <div className="flex flex-wrap items-center gap-3">
        <Button type="submit" disabled={!canHandIn || !attemptKey || handingIn}>
          {handingIn ? "Handing in…" : "Hand in"}
        </Button>
        <span className="text-sm text-ink-600" role="status">
          {draftFetcher.state !== "idle" ? "Saving draft…" : savedAt ? `Draft saved ${new Date(savedAt).toLocaleTimeString()}` : null}
        </span>
      </div>
    </Form>
  );
}

/**
 * The question a column of times asks when the log already has drops. Focus moves to it so a keyboard
 * or screen-reader user meets it at once; Escape leaves the log as it was.
 */
function JoinTimesChoice({
  incoming,
  typedCount,
  onChoose,
  onCancel,
}: {
  incoming: IncomingColumn;
  typedCount: number;
  onChoose: (how: TimesJoin) => void;
  onCancel: () => void;
}) {
  const first = useRef<HTMLButtonElement>(null);
  useEffect(() => first.current?.focus(), []);
  return (
    <div
      role="group"
      aria-labelledby="join-times-question"
      className="mt-2 rounded-lg bg-paper-100 p-3 ring-1 ring-ink-900/10"
      onKeyDown={(event) => {
        if (event.key === "Escape") {
          event.preventDefault();
          onCancel();
        }
      }}
    >
      <p id="join-times-question" className="text-sm">
        {incoming.times.length} drop times {incoming.from}, and the log already has {typedCount} {typedCount === 1 ? "drop" : "drops"}. Add
        them after the last drop, or replace the drops with them?
      </p>
      <div className="mt-2 flex flex-wrap gap-2">
        <Button ref={first} type="button" onClick={() => onChoose("append")}>
          Add after drop {typedCount}
        </Button>
        <Button type="button" variant="danger" onClick={() => onChoose("replace")}>
          Replace {typedCount === 1 ? "the drop" : `all ${typedCount} drops`}
        </Button>
        <Button type="button" variant="secondary" onClick={onCancel}>
          Cancel
        </Button>
      </div>
    </div>
  );
}

/**
 * One part of the kit the drop log names. With one allowed part it is taken and shown (and sent, so the
 * hand-in says which); with more the student chooses, and nothing is chosen for them.
 */
function PartChoice({
  label,
  name,
  value,
  onChange,
  options,
  error,
  prompt,
}: {
  label: string;
  name: string;
  value: string;
  onChange: (id: string) => void;
  options: { id: string; label: string; record: string }[];
  error: string[];
  prompt: string;
}) {
  if (options.length === 0) return null;
  const chosen = options.find((option) => option.id === value);
  if (options.length === 1) {
    return (
      <p className="mt-2 text-sm">
        <input type="hidden" name={name} value={options[0].id} />
        <span className="text-ink-700">{label}:</span> {options[0].label} <span className="text-ink-600">({options[0].record})</span>
        {error.length ? <span className="block font-medium text-outlier">{error.join(" ")}</span> : null}
      </p>
    );
  }
  return (
    <div className="mt-2">
      <SelectField
        label={label}
        name={name}
        value={value}
        required
        onChange={(event) => onChange(event.target.value)}
        error={error}
        hint={chosen ? `Kit record: ${chosen.record}.` : `Your kit holds ${options.length} this lab allows.`}
      >
        <option value="" disabled>
          {prompt}
        </option>
        {options.map((option) => (
          <option key={option.id} value={option.id}>
            {option.label}
          </option>
        ))}
      </SelectField>
    </div>
  );
}
