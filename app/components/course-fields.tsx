import { SelectField, TextField } from "~/components/ui/field";
import { partBiasAlphas } from "~/lib/courses/course-input";

/** The course's own fields, shared by this page and the settings page. */
export function CourseFields({
  values,
  errors,
  timeZones,
}: {
  values: Record<string, string | number | null | undefined>;
  errors: Record<string, string[] | undefined>;
  timeZones: string[];
}) {
  const text = (name: string) => (values[name] === null || values[name] === undefined ? "" : String(values[name]));
  return (
    <>
      <TextField label="Title" name="title" required defaultValue={text("title")} error={errors.title} />
      <div className="grid gap-4 sm:grid-cols-2">
        <TextField label="Course code" name="code" required defaultValue={text("code")} error={errors.code} hint="As in the institution's catalogue." />
        <TextField label="Term" name="term" required defaultValue={text("term")} error={errors.term} placeholder="2027 Spring" />
      </div>
      <TextField
        label="Time zone"
        name="timeZone"
        required
        list="time-zones"
        defaultValue={text("timeZone") || "Europe/Dublin"}
        error={errors.timeZone}
        hint="Opening and due times are entered and shown in this zone."
      />
      <datalist id="time-zones">
        {timeZones.map((zone) => (
          <option key={zone} value={zone} />
        ))}
      </datalist>
      <TextField
        label="Local gravity"
        unit="m/s²"
        name="localGravity"
        inputMode="decimal"
        defaultValue={text("localGravity")}
        error={errors.localGravity}
        hint="Leave empty to use standard gravity, 9.80665 m/s²."
      />
      <SelectField
        label="Kit-part bias test, α"
        name="partBiasAlpha"
        defaultValue={String(values.partBiasAlpha ?? 0.05)}
        error={errors.partBiasAlpha}
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
