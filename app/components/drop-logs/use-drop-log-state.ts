/**
 * What the student has typed into the drop-log form, as one state object, with the changes the form
 * makes to it. The timed distance follows the column chosen unless the student typed their own.
 */
import { useMemo, useState } from "react";
import { dropLogInput, type DropLogDraft } from "~/lib/drop-logs/drop-log-input";

export type FormSphere = { id: string; label: string; material: string | null; diameterMm: number | null; massG: number | null };
export type FormFluidLot = { id: string; label: string; fluidName: string | null; densityKgM3: number | null };
export type FormColumn = { id: string; label: string; innerDiameterMm: number | null; timedDistanceMm: number | null };

export type FormState = Required<Omit<DropLogDraft, "useOwnMeasurements">> & { useOwnMeasurements: boolean };

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

export function useDropLogState(draft: DropLogDraft, parts: { spheres: FormSphere[]; fluidLots: FormFluidLot[]; columns: FormColumn[] }) {
  const { spheres, fluidLots, columns } = parts;
  const [state, setState] = useState<FormState>(() => initialState(draft, spheres, fluidLots, columns));
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

  const update = (patch: Partial<FormState>) => setState((current) => ({ ...current, ...patch }));
  const chooseColumn = (columnId: string) =>
    setState((current) => {
      const before = columns.find((candidate) => candidate.id === current.columnId)?.timedDistanceMm ?? null;
      const after = columns.find((candidate) => candidate.id === columnId)?.timedDistanceMm ?? null;
      const untouched = current.timedDistanceMm === "" || (before !== null && current.timedDistanceMm === String(before));
      return { ...current, columnId, timedDistanceMm: untouched && after !== null ? String(after) : current.timedDistanceMm };
    });
  return { state, input, rows, rowErrors, update, chooseColumn };
}
