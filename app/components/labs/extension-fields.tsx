/**
 * The times and reason of an extension, shared by the forms that give students a later due time (one
 * student or a cohort on the extensions page, the ticked students on the hand-in dashboard). The
 * extensions page passes its Conform `fields`; the dashboard's fetcher form passes the reply's `errors`.
 */
import type { FieldMetadata } from "@conform-to/react";
import { TextAreaField } from "~/components/ui/field";
import { WallClockField } from "./lab-form";

type Errors = Record<string, string[] | null | undefined>;
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- a field of any form's schema
type WindowFields = Record<"dueAt" | "lateCutoffAt" | "reason", FieldMetadata<any, any, string[]>>;

export function ExtensionWindowFields({ timeZone, fields, errors = {} }: { timeZone: string; fields?: WindowFields; errors?: Errors }) {
  const wiring = (name: keyof WindowFields) => (fields ? { field: fields[name] } : { name, error: errors[name] ?? undefined });
  return (
    <div className="grid gap-4 sm:grid-cols-2">
      <WallClockField label="New due time" timeZone={timeZone} {...wiring("dueAt")} />
      <WallClockField
        label="New late cut-off"
        timeZone={timeZone}
        {...wiring("lateCutoffAt")}
        hint="Empty: late hand-ins until the class's cut-off if it is later, otherwise none. The new due time here: none after it."
      />
      <TextAreaField
        label="Reason"
        rows={2}
        {...wiring("reason")}
        hint="Staff see it; the student sees only their own times."
        className="sm:col-span-2"
      />
    </div>
  );
}
