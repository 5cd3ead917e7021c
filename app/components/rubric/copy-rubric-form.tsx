import { getFormProps, useForm, type SubmissionResult } from "@conform-to/react";
import { Form } from "react-router";
import { Button } from "~/components/ui/button";
import { SelectField } from "~/components/ui/field";
import { counted } from "~/lib/plural";

/** "Copy the rubric of another lab": replaces this lab's criteria, only before anyone is marked. */
export function CopyRubricForm({
  sources,
  reply,
  busy,
}: {
  sources: { labId: string; title: string; criteria: number }[];
  reply: SubmissionResult | undefined;
  busy: boolean;
}) {
  const [form, fields] = useForm({ id: "copy", lastResult: reply, defaultValue: { fromLabId: sources[0]?.labId } });
  return (
    <Form
      method="post"
      className="flex flex-wrap items-end gap-3 rounded-lg bg-white p-4 shadow-sm ring-1 ring-ink-900/10"
      {...getFormProps(form)}
    >
      <input type="hidden" name="intent" value="copy" />
      <SelectField label="Copy the rubric of another lab" field={fields.fromLabId} className="min-w-64">
        {sources.map((source) => (
          <option key={source.labId} value={source.labId}>
            {source.title} ({counted(source.criteria, "criterion", "criteria")})
          </option>
        ))}
      </SelectField>
      <Button type="submit" variant="secondary" disabled={busy}>
        Copy it here
      </Button>
      <p className="w-full text-xs text-ink-700">Replaces this lab&apos;s criteria; only possible before anyone is marked.</p>
    </Form>
  );
}
