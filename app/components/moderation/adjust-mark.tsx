/** Adjusting one marked student's mark with a reason; the version it starts from makes a change meanwhile a conflict. */
import { getFormProps, useForm, type FieldMetadata, type SubmissionResult } from "@conform-to/react";
import { useState } from "react";
import { Form } from "react-router";
import { Button } from "~/components/ui/button";
import { SelectField, TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { parseSubmission } from "~/lib/forms/submission";
import { markAdjustment } from "~/lib/marking/mark-adjustment";
import type { RubricCriterion } from "~/lib/marking/rubric";

export type MarkedStudent = { membershipId: string; name: string; total: number; version: number; markedBy: string | null };

export function AdjustMark({
  marked,
  rubric,
  lastResult,
  busy,
}: {
  marked: MarkedStudent[];
  rubric: Pick<RubricCriterion, "id" | "title" | "kind">[];
  lastResult: SubmissionResult | undefined;
  busy: boolean;
}) {
  const [form, fields] = useForm({
    id: "adjust",
    lastResult,
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, markAdjustment),
  });
  return (
    <section aria-labelledby="adjust-heading" className="max-w-3xl">
      <h2 id="adjust-heading" className="mb-2 text-lg font-semibold">
        Adjust a mark
      </h2>
      <Form
        method="post"
        className="grid gap-3 rounded-lg bg-white p-4 shadow-sm ring-1 ring-ink-900/10 sm:grid-cols-2"
        {...getFormProps(form)}
      >
        <input type="hidden" name="intent" value="adjust" />
        {form.errors?.length ? (
          <div className="sm:col-span-2">
            <Notice tone="error">{form.errors.join(" ")}</Notice>
          </div>
        ) : null}
        <StudentChoice marked={marked} field={fields.membershipId} />
        <SelectField label="What" field={fields.target} required>
          <option value="">Choose…</option>
          {rubric.map((criterion) => (
            <option key={criterion.id} value={`criterion:${criterion.id}`}>
              {criterion.title} ({criterion.kind === "levels" ? "level number" : "points"})
            </option>
          ))}
          <option value="penalty">Late penalty (points)</option>
        </SelectField>
        <TextField label="New value" field={fields.value} inputMode="decimal" required hint="A level's number, or points." />
        <TextField
          label="Why"
          field={fields.reason}
          className="sm:col-span-2"
          required
          hint="Kept with the change; a student whose mark is released sees it."
        />
        <div>
          <Button type="submit" disabled={busy}>
            Adjust the mark
          </Button>
        </div>
      </Form>
    </section>
  );
}

/** The student's select, with the version the adjustment starts from beside it: a mark changed meanwhile is then a conflict, not overwritten. */
function StudentChoice({ marked, field }: { marked: MarkedStudent[]; field: FieldMetadata<string> }) {
  // Controlled, so that the version sent beside it is the chosen student's.
  const [membershipId, setMembershipId] = useState(field.initialValue ?? "");
  return (
    <>
      <SelectField label="Student" field={field} value={membershipId} onChange={(event) => setMembershipId(event.target.value)} required>
        <option value="">Choose…</option>
        {marked.map((row) => (
          <option key={row.membershipId} value={row.membershipId}>
            {row.name} — {row.total} ({row.markedBy ?? "no marker"})
          </option>
        ))}
      </SelectField>
      <input type="hidden" name="expectedVersion" value={marked.find((row) => row.membershipId === membershipId)?.version ?? 0} />
    </>
  );
}
