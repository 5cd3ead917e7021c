/**
 * The times and reason of an extension, shared by the forms that give students a later due time (one
 * student or a cohort on the extensions page, the ticked students on the hand-in dashboard).
 */
import { TextAreaField } from "~/components/ui/field";
import { WallClockField } from "./lab-form";

type Errors = Record<string, string[] | undefined>;

export function ExtensionWindowFields({
  timeZone,
  values = {},
  errors = {},
}: {
  timeZone: string;
  values?: Record<string, string | undefined>;
  errors?: Errors;
}) {
  return (
    <div className="grid gap-4 sm:grid-cols-2">
      <WallClockField label="New due time" name="dueAt" defaultValue={values.dueAt ?? ""} timeZone={timeZone} errors={errors} />
      <WallClockField
        label="New late cut-off"
        name="lateCutoffAt"
        defaultValue={values.lateCutoffAt ?? ""}
        timeZone={timeZone}
        errors={errors}
        hint="Empty: late hand-ins until the class's cut-off if it is later, otherwise none. The new due time here: none after it."
      />
      <TextAreaField
        label="Reason"
        name="reason"
        rows={2}
        defaultValue={values.reason ?? ""}
        error={errors.reason}
        hint="Staff see it; the student sees only their own times."
        className="sm:col-span-2"
      />
    </div>
  );
}
