import type { FieldMetadata } from "@conform-to/react";
import { SelectField } from "~/components/ui/field";
import { courseRoles, roleWords } from "~/lib/courses/roles";

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- a field of any form's schema
type Field = FieldMetadata<any, any, string[]>;

/** A member's role and cohort, shared by the invitation form and the member's own page. */
export function RoleAndCohortFields({
  fields,
  cohorts,
  cohortLabel,
}: {
  fields: { role: Field; cohortId: Field };
  cohorts: { id: string; name: string }[];
  cohortLabel: string;
}) {
  return (
    <>
      <SelectField label="Role" field={fields.role}>
        {courseRoles.map((value) => (
          <option key={value} value={value}>
            {roleWords[value]}
          </option>
        ))}
      </SelectField>
      <SelectField label={cohortLabel} field={fields.cohortId}>
        <option value="">No cohort</option>
        {cohorts.map((cohort) => (
          <option key={cohort.id} value={cohort.id}>
            {cohort.name}
          </option>
        ))}
      </SelectField>
    </>
  );
}
