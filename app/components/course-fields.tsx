import type { FieldMetadata } from "@conform-to/react";
import { SelectField, TextField } from "~/components/ui/field";
import { partBiasAlphas, type CourseInput } from "~/lib/courses/course-input";

type CourseFieldset = { [Key in keyof CourseInput]: FieldMetadata<unknown, Record<string, unknown>, string[]> };

/** A course's IANA time zone, typed with the zones this server knows offered as suggestions. */
export function TimeZoneField({ field, timeZones, hint }: { field: CourseFieldset["timeZone"]; timeZones: string[]; hint: string }) {
  return (
    <>
      <TextField label="Time zone" field={field} required list="time-zones" hint={hint} />
      <datalist id="time-zones">
        {timeZones.map((zone) => (
          <option key={zone} value={zone} />
        ))}
      </datalist>
    </>
  );
}

/** The course's own fields, shared by this page and the settings page. */
export function CourseFields({ fields, timeZones }: { fields: CourseFieldset; timeZones: string[] }) {
  return (
    <>
      <TextField label="Title" field={fields.title} required />
      <div className="grid gap-4 sm:grid-cols-2">
        <TextField label="Course code" field={fields.code} required hint="As in the institution's catalogue." />
        <TextField label="Term" field={fields.term} required placeholder="2027 Spring" />
      </div>
      <TimeZoneField field={fields.timeZone} timeZones={timeZones} hint="Opening and due times are entered and shown in this zone." />
      <TextField
        label="Local gravity"
        unit="m/s²"
        field={fields.localGravity}
        inputMode="decimal"
        hint="Leave empty to use standard gravity, 9.80665 m/s²."
      />
      <SelectField
        label="Kit-part bias test, α"
        field={fields.partBiasAlpha}
        hint="A sphere, fluid lot or column whose results sit off the class over three or more hand-ins is flagged for re-measurement when a t-test rejects “no bias” at this level. Smaller flags fewer parts."
      >
        {partBiasAlphas.map((alpha) => (
          <option key={alpha} value={String(alpha)}>
            {alpha.toFixed(2)}
          </option>
        ))}
      </SelectField>
    </>
  );
}
