import { SelectField } from "~/components/ui/field";
import { courseRoles, roleWords } from "~/lib/courses/roles";

/** A member's role and cohort, shared by the invitation form and the member's own page. */
export function RoleAndCohortFields({
  role,
  cohortId,
  cohorts,
  errors,
  cohortLabel,
}: {
  role: string;
  cohortId: string;
  cohorts: { id: string; name: string }[];
  errors: Record<string, string | string[] | undefined>;
  cohortLabel: string;
}) {
  return (
    <>
      <SelectField label="Role" name="role" defaultValue={role} error={errors.role}>
        {courseRoles.map((value) => (
          <option key={value} value={value}>
            {roleWords[value]}
          </option>
        ))}
      </SelectField>
      <SelectField label={cohortLabel} name="cohortId" defaultValue={cohortId} error={errors.cohortId}>
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
