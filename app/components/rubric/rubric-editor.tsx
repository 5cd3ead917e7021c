/**
 * A lab's rubric as its instructors edit it: a Conform field list of criteria, sent as ordinary form
 * fields (`criteria[0].title`, `criteria[0].levels[1].points`…) and checked with the same schema in the
 * browser and on the server; the form keeps everything typed and shows each problem at its field.
 */
import { getFormProps, useForm, type SubmissionResult } from "@conform-to/react";
import type { ReactNode } from "react";
import { Form, useNavigation } from "react-router";
import { LabStaffNav } from "~/components/labs/lab-staff-nav";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { parseSubmission } from "~/lib/forms/submission";
import { rubricFormInput, type RubricCriterionInput } from "~/lib/marking/rubric";
import { CriterionFields, starterCriterion, typedMaxPoints } from "./criterion-fields";
import { counted } from "~/lib/plural";

export function RubricEditor({
  courseId,
  lab,
  criteria: stored,
  reply,
  notices,
}: {
  courseId: string;
  lab: { id: string; title: string; requiredDrops: number; releasedAt: string | null };
  criteria: RubricCriterionInput[];
  reply: SubmissionResult | undefined;
  /** What the page says above the criteria (what a write did, the copy form). */
  notices: ReactNode;
}) {
  const navigation = useNavigation();
  const [form, fields] = useForm({
    id: "rubric",
    lastResult: reply,
    defaultValue: { criteria: stored },
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, rubricFormInput),
  });
  const criteria = fields.criteria.getFieldList();
  const locked = lab.releasedAt !== null;
  const busy = navigation.state === "submitting";
  const maxTotal = criteria.reduce((sum, criterion) => sum + typedMaxPoints(criterion.value as Parameters<typeof typedMaxPoints>[0]), 0);
  const criterionErrors = Object.keys(fields.criteria.allErrors).some((name) => name !== fields.criteria.name);
  return (
    <div className="flex max-w-4xl flex-col gap-6">
      <PageHeader
        title={lab.title}
        trail={[{ to: `/courses/${courseId}/labs`, label: "Labs" }]}
        tabs={<LabStaffNav courseId={courseId} labId={lab.id} instructor />}
      >
        Rubric · {counted(criteria.length, "criterion", "criteria")} · out of {counted(maxTotal, "point", "points")}
      </PageHeader>
      {notices}
      {form.errors?.length ? <Notice tone="error">{form.errors.join(" ")}</Notice> : null}
      {criterionErrors ? (
        <Notice tone="error">Some criteria need correcting; see the messages beside them. Nothing was saved.</Notice>
      ) : null}
      {locked ? <Notice tone="info">Marks of this lab are released, so its rubric is kept as the students saw it.</Notice> : null}

      <Form method="post" className="flex flex-col gap-4" {...getFormProps(form)}>
        <input type="hidden" name="intent" value="save" />
        {/* The form's first submit button, so that Enter in a field saves rather than moving or removing a criterion. */}
        <button type="submit" className="sr-only" tabIndex={-1} aria-hidden="true">
          Save the rubric
        </button>
        <ol className="flex flex-col gap-4">
          {criteria.map((criterion, index) => (
            <li key={criterion.key ?? index} className="rounded-lg bg-white p-4 shadow-sm ring-1 ring-ink-900/10">
              <CriterionFields
                form={form}
                criteria={fields.criteria}
                criterion={criterion}
                index={index}
                count={criteria.length}
                requiredDrops={lab.requiredDrops}
                locked={locked}
              />
            </li>
          ))}
        </ol>
        {fields.criteria.errors?.length ? <Notice tone="error">{fields.criteria.errors.join(" ")}</Notice> : null}
        {!locked ? (
          <div className="flex flex-wrap gap-3">
            {(
              [
                ["levels", "Add a levels criterion"],
                ["range", "Add a points criterion"],
                ["auto", "Add an automatic criterion"],
              ] as const
            ).map(([kind, label]) => (
              <Button
                key={kind}
                variant="secondary"
                {...form.insert.getButtonProps({ name: fields.criteria.name, defaultValue: starterCriterion(kind) })}
              >
                {label}
              </Button>
            ))}
            <Button type="submit" disabled={busy}>
              {busy ? "Saving…" : "Save the rubric"}
            </Button>
          </div>
        ) : null}
      </Form>
    </div>
  );
}
