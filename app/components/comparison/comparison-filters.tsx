/** The cohort and label filters of the class comparison, and the count of each label. */
import { Form, useNavigation, useSubmit } from "react-router";
import { labelWords } from "~/components/comparison/chart-parts";
import { Button } from "~/components/ui/button";
import { SelectField } from "~/components/ui/field";
import { comparisonLabels, type LabelCounts } from "~/lib/comparison/comparison-settings";
import type { ComparisonFilters as Filters, ComparisonJson } from "~/server/comparison/class-comparison.server";

/** With JavaScript the filters reload only the data as they change; without, the button does. */
export function ComparisonFilters({ cohorts, filters }: { cohorts: ComparisonJson["cohorts"]; filters: Filters }) {
  const submit = useSubmit();
  const navigation = useNavigation();
  return (
    <Form
      method="get"
      className="no-print flex flex-wrap items-end gap-4"
      onChange={(event) => submit(event.currentTarget, { replace: true, preventScrollReset: true })}
    >
      <SelectField label="Cohort" name="cohort" defaultValue={filters.cohortId ?? ""}>
        <option value="">All cohorts you see</option>
        {cohorts.map((cohort) => (
          <option key={cohort.id} value={cohort.id}>
            {cohort.name}
          </option>
        ))}
      </SelectField>
      <SelectField label="Label" name="label" defaultValue={filters.label ?? ""}>
        <option value="">Every label</option>
        {comparisonLabels.map((label) => (
          <option key={label} value={label}>
            {labelWords[label]}
          </option>
        ))}
      </SelectField>
      <Button type="submit" variant="secondary">
        Show
      </Button>
      {navigation.state === "loading" ? (
        <span className="text-sm text-ink-600" role="status">
          Updating…
        </span>
      ) : null}
    </Form>
  );
}

export function LabelCountList({ counts }: { counts: LabelCounts }) {
  return (
    <dl className="flex flex-wrap gap-6 text-sm">
      {comparisonLabels.map((label) => (
        <div key={label} className="rounded-lg bg-white px-4 py-2 ring-1 ring-ink-900/10">
          <dt className="text-ink-600">{labelWords[label]}</dt>
          <dd className="text-xl font-semibold" style={{ color: `var(--color-${label})` }}>
            {counts[label]}
          </dd>
        </div>
      ))}
    </dl>
  );
}
