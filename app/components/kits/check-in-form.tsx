import { getFormProps, getInputProps, getSelectProps, useForm, type FieldMetadata, type SubmissionResult } from "@conform-to/react";
import { Form } from "react-router";
import { kitInput } from "~/components/kits/kit-input";
import { FormErrors } from "~/components/kits/kit-moves";
import type { KitPart } from "~/components/kits/kit-parts";
import { Button } from "~/components/ui/button";
import { TextField } from "~/components/ui/field";
import { parseSubmission } from "~/lib/forms/submission";
import { partConditions } from "~/lib/kits/kit-states";

/** A kit back on the bench: each part's condition, one row per part, and which to send for re-measuring. */
export function CheckInForm({ parts, lastResult }: { parts: KitPart[]; lastResult?: SubmissionResult }) {
  const [form, fields] = useForm({
    id: "check-in",
    lastResult,
    defaultValue: { parts: parts.map((part) => ({ partId: part.id })) },
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
    onValidate: ({ formData }) => parseSubmission(formData, kitInput),
  });
  const rows = fields.parts.getFieldList();
  return (
    <>
      <FormErrors errors={form.errors} />
      <Form method="post" className="flex flex-col gap-3 rounded-lg bg-white p-4 ring-1 ring-ink-900/10" {...getFormProps(form)}>
        <input type="hidden" name="intent" value="check-in" />
        <p className="text-sm text-ink-700">
          Record each part's condition. Damaged or missing parts are retired; tick a part to send it for re-measurement.
        </p>
        <table className="text-sm">
          <caption className="sr-only">Condition of each part</caption>
          <PartConditionHead />
          <tbody>
            {rows.map((row, index) => (
              <PartConditionRow key={row.key ?? index} label={parts[index]?.label ?? ""} cells={row.getFieldset()} />
            ))}
          </tbody>
        </table>
        <TextField label="Note" field={fields.note} />
        <Button type="submit">Check the kit in</Button>
      </Form>
    </>
  );
}

export function PartConditionHead() {
  return (
    <thead>
      <tr className="text-left text-ink-600">
        <th scope="col">Part</th>
        <th scope="col">Condition</th>
        <th scope="col">Re-measure</th>
      </tr>
    </thead>
  );
}

type Cell = FieldMetadata<unknown, Record<string, unknown>, string[]>;

/** One part of a kit being checked in: its condition and whether to re-measure it. `kitNumber` names the kit where a form holds several. */
export function PartConditionRow({
  label,
  cells,
  kitNumber,
}: {
  label: string;
  cells: { partId: Cell; condition: Cell; remeasure: Cell };
  kitNumber?: string;
}) {
  const ofKit = kitNumber ? ` in kit ${kitNumber}` : "";
  return (
    <tr>
      <td className="py-1 pr-3">
        {label}
        <input {...getInputProps(cells.partId, { type: "hidden" })} />
      </td>
      <td className="py-1 pr-3">
        <select
          {...getSelectProps(cells.condition)}
          aria-label={`Condition of ${label}${ofKit}`}
          className="rounded border border-ink-900/20 px-2 py-1"
        >
          <option value="">Choose…</option>
          {partConditions.map((condition) => (
            <option key={condition} value={condition}>
              {condition}
            </option>
          ))}
        </select>
        {cells.condition.errors?.length ? (
          <p id={cells.condition.errorId} className="mt-1 text-outlier">
            {cells.condition.errors.join(" ")}
          </p>
        ) : null}
      </td>
      <td className="py-1">
        <input
          {...getInputProps(cells.remeasure, { type: "checkbox" })}
          aria-label={kitNumber ? `Send ${label} of kit ${kitNumber} for re-measurement` : `Send ${label} for re-measurement`}
        />
      </td>
    </tr>
  );
}
