/**
 * The lab's outlier method. As the fields change, a fetcher asks the server how many hand-ins this
 * choice and a few alternatives would flag, before anything is saved.
 */
import { getFormProps, useForm, type SubmissionResult } from "@conform-to/react";
import { useEffect, useRef } from "react";
import { Form, useFetcher, useNavigation } from "react-router";
import { Button } from "~/components/ui/button";
import { SelectField, TextField } from "~/components/ui/field";
import { comparisonMethods, comparisonSettings, methodNames, type ComparisonSettings } from "~/lib/comparison/comparison-settings";
import { parseSubmission } from "~/lib/forms/submission";
import type { previewLabSettings } from "~/server/comparison/class-comparison.server";
import { counted } from "~/lib/plural";

export type SettingsPreview = Awaited<ReturnType<typeof previewLabSettings>>;

export function MethodForm({
  method,
  mayEdit,
  lastResult,
  countedWithoutScript,
}: {
  method: ComparisonSettings;
  mayEdit: boolean;
  /** The server's reply to a refused save or count. */
  lastResult: SubmissionResult | undefined;
  /** The counts of "Count without saving" sent without JavaScript. */
  countedWithoutScript: SettingsPreview | undefined;
}) {
  const preview = useFetcher<{ preview?: SettingsPreview }>();
  const formRef = useRef<HTMLFormElement>(null);
  const navigation = useNavigation();
  const [form, fields] = useForm({
    id: "comparison-method",
    lastResult,
    defaultValue: { method: method.method, alpha: String(method.alpha), maxOutliers: String(method.maxOutliers), k: String(method.k) },
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, comparisonSettings),
  });
  const askPreview = () => {
    if (!formRef.current) return;
    const body = new FormData(formRef.current);
    body.set("intent", "preview");
    void preview.submit(body, { method: "post" });
  };
  // The counts for the saved method show as soon as the page is interactive; later counts follow the form's changes.
  // eslint-disable-next-line react-hooks/exhaustive-deps -- once, on mount: the fetcher changes with every answer
  useEffect(askPreview, []);
  const flagCounts = preview.data?.preview ?? countedWithoutScript;
  return (
    <section aria-labelledby="method-heading" className="no-print max-w-3xl">
      <h2 id="method-heading" className="mb-2 text-lg font-semibold">
        Outlier method
      </h2>
      <Form
        method="post"
        ref={formRef}
        onChange={askPreview}
        className="flex flex-col gap-4 rounded-lg bg-white p-4 ring-1 ring-ink-900/10"
        {...getFormProps(form)}
      >
        <div className="grid gap-4 sm:grid-cols-2">
          <SelectField label="Method" field={fields.method}>
            {comparisonMethods.map((value) => (
              <option key={value} value={value}>
                {methodNames[value]}
              </option>
            ))}
          </SelectField>
          <TextField label="Grubbs / ESD: significance α" field={fields.alpha} inputMode="decimal" hint="Outlier at α; suspect at 2α." />
          <TextField label="Grubbs: most removals; ESD: upper bound r" field={fields.maxOutliers} inputMode="numeric" />
          <TextField
            label="Tukey: fence factor k"
            field={fields.k}
            inputMode="decimal"
            hint="Suspect beyond k·IQR, outlier beyond 2k·IQR."
          />
        </div>
        <div aria-live="polite">
          {flagCounts ? (
            <PreviewCounts flagCounts={flagCounts} />
          ) : (
            <p className="text-sm text-ink-600">
              {preview.state === "idle" ? "Change a field to see how many hand-ins it would flag." : "Counting…"}
            </p>
          )}
        </div>
        <div className="flex flex-wrap gap-2">
          <Button type="submit" name="intent" value="preview" variant="secondary">
            Count without saving
          </Button>
          {mayEdit ? (
            <Button type="submit" name="intent" value="save" disabled={navigation.state === "submitting"}>
              Save and relabel every hand-in
            </Button>
          ) : null}
        </div>
      </Form>
    </section>
  );
}

function PreviewCounts({ flagCounts }: { flagCounts: SettingsPreview }) {
  return (
    <table className="text-sm [&_td]:py-1 [&_td]:pr-6 [&_th]:pr-6 [&_th]:text-left [&_th]:font-medium">
      <caption className="mb-1 text-left font-medium">Would flag, of {counted(flagCounts.classSize, "hand-in", "hand-ins")}</caption>
      <thead>
        <tr>
          <th scope="col">Setting</th>
          <th scope="col">Suspect</th>
          <th scope="col">Outlier</th>
        </tr>
      </thead>
      <tbody>
        {flagCounts.previews.map((row, index) => (
          <tr key={`${index}-${row.description}`} className={index === 0 ? "font-semibold" : undefined}>
            <td>
              {index === 0 ? "Your choice: " : ""}
              {row.description}
            </td>
            <td>{row.counts.suspect}</td>
            <td>{row.counts.outlier}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}
