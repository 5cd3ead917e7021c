/**
 * The fields of a lab, shared by the "new lab" and "edit lab" pages. Times are typed in the course's
 * time zone; beside each, the instant it names is shown in the viewer's own zone too.
 */
import { getCollectionProps, type FieldMetadata } from "@conform-to/react";
import { useState, type ReactNode } from "react";
import { LabTime } from "~/components/drop-logs/lab-time";
import { SafetyCautions } from "~/components/safety-cautions";
import { SelectField, TextAreaField, TextField } from "~/components/ui/field";
import { comparisonMethods, methodNames } from "~/lib/comparison/comparison-settings";
import {
  allowedPartFields,
  dragModelNames,
  dragModels,
  experimentKindNames,
  experimentKinds,
  wallCorrectionNames,
  wallCorrections,
  type LabFormValues,
} from "~/lib/labs/lab-input";
import { wallClockToInstant } from "~/lib/labs/wall-clock";
import { afterReleaseHandInNames, afterReleaseHandInPolicies } from "~/lib/marking/release";
import { formatNumber } from "~/lib/kits/part-display";
import { counted } from "~/lib/plural";

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- a field of any form's schema
type Field = FieldMetadata<any, any, string[]>;
type PartOption = {
  id: string;
  kind: "sphere" | "fluid_lot" | "column" | "accessory";
  label: string;
  material: string | null;
  fluidName: string | null;
  diameterMm: number | null;
};

const partKindHeadings = { fluid_lot: "Fluid lots", column: "Columns" } as const;
/** What "none ticked" means for each kind, said where the instructor chooses. */
const noneTickedHints = {
  sphere: "None ticked: any sphere of the student's kit; the student names the one dropped.",
  fluid_lot:
    "None ticked: any fluid lot of the student's kit. When a kit holds more than one allowed lot, the student must say which bottle was used.",
  column: "None ticked: any column of the student's kit. When a kit holds more than one allowed column, the student must say which.",
} as const;

/** The messages of a list field and of its items (`cohortIds[0]`), so that all of them show. */
const messagesOf = (field: Field) => Object.values(field.allErrors).flat();

/**
 * A wall-clock time in the course's zone, with the instant it names shown beside it (also used by the
 * extension forms). On a Conform form pass `field`; the hand-in dashboard's fetcher form passes `name` and `error`.
 */
export function WallClockField({
  label,
  timeZone,
  hint,
  field,
  name,
  error,
}: {
  label: string;
  timeZone: string;
  hint?: string;
  field?: Field;
  name?: string;
  error?: string[];
}) {
  const [value, setValue] = useState(typeof field?.initialValue === "string" ? field.initialValue : "");
  const instant = value ? wallClockToInstant(value, timeZone) : null;
  return (
    <TextField
      label={label}
      type="datetime-local"
      {...(field ? { field } : { name, defaultValue: "", error })}
      onChange={(event) => setValue(event.currentTarget.value)}
      hint={
        <>
          {hint ? <span className="block">{hint}</span> : null}
          {instant?.ok ? <LabTime at={instant.instant.toISOString()} courseTimeZone={timeZone} /> : `In ${timeZone}.`}
        </>
      }
    />
  );
}

function CheckboxGroup({
  legend,
  field,
  options,
  hint,
}: {
  legend: string;
  field: Field;
  options: { id: string; label: string }[];
  hint?: string;
}) {
  const messages = messagesOf(field);
  const boxes = getCollectionProps(field, { type: "checkbox", options: options.map((option) => option.id) });
  return (
    <fieldset aria-describedby={messages.length ? field.errorId : undefined}>
      <legend className="text-sm font-medium text-ink-900">{legend}</legend>
      {hint ? <p className="text-sm text-ink-600">{hint}</p> : null}
      <div className="mt-1 flex flex-wrap gap-x-4 gap-y-1">
        {options.map((option, index) => {
          const { key, ...box } = boxes[index];
          return (
            <label key={key} className="flex items-center gap-1.5 text-sm">
              <input {...box} aria-describedby={undefined} aria-invalid={undefined} />
              {option.label}
            </label>
          );
        })}
      </div>
      {messages.length ? (
        <p id={field.errorId} className="mt-1 text-sm font-medium text-outlier">
          {messages.join(" ")}
        </p>
      ) : null}
    </fieldset>
  );
}

/** Spheres of one material and nominal size (measured diameters rounded to 0.1 mm), in material then size order. */
function sphereGroups(spheres: PartOption[]) {
  const groups = new Map<string, { material: string; sizeMm: number | null; spheres: PartOption[] }>();
  for (const sphere of spheres) {
    const material = sphere.material ?? "unnamed material";
    const sizeMm = sphere.diameterMm === null ? null : Math.round(sphere.diameterMm * 10) / 10;
    const key = `${material} ${sizeMm}`;
    const group = groups.get(key) ?? { material, sizeMm, spheres: [] };
    group.spheres.push(sphere);
    groups.set(key, group);
  }
  return [...groups.values()].sort((a, b) => a.material.localeCompare(b.material) || (a.sizeMm ?? 0) - (b.sizeMm ?? 0));
}

/**
 * The allowed spheres, a fieldset per material and size. Its "all of this size" box sends the whole
 * group's ids in one value, so it works without script; with script it also ticks the spheres below
 * it, and ticking every one of them ticks it.
 */
function SphereGroups({ field, spheres, hint }: { field: Field; spheres: PartOption[]; hint: string }) {
  const messages = messagesOf(field);
  const initial = field.initialValue;
  const ticked = new Set((Array.isArray(initial) ? initial : initial ? [initial] : []).flatMap((value) => String(value).split(" ")));
  const boxesOf = (element: HTMLElement) => [
    ...(element.closest("fieldset")?.querySelectorAll<HTMLInputElement>("input[data-sphere]") ?? []),
  ];
  return (
    <fieldset aria-describedby={messages.length ? field.errorId : undefined}>
      <legend className="text-sm font-medium text-ink-900">Allowed spheres</legend>
      <p className="text-sm text-ink-600">{hint}</p>
      <div className="mt-2 flex flex-col gap-2">
        {sphereGroups(spheres).map((group) => {
          const ids = group.spheres.map((sphere) => sphere.id);
          const all = ids.every((id) => ticked.has(id)) || ticked.has(ids.join(" "));
          const some = ids.some((id) => ticked.has(id));
          const name = `${group.material}${group.sizeMm === null ? "" : `, ${formatNumber(group.sizeMm, 3)} mm`}`;
          return (
            <fieldset key={`${group.material}${group.sizeMm}`} className="rounded border border-ink-900/15 px-3 py-2">
              <legend className="px-1 text-sm font-medium">
                {name} ({counted(ids.length, "sphere", "spheres")})
              </legend>
              <label className="flex items-center gap-1.5 text-sm">
                <input
                  type="checkbox"
                  name={field.name}
                  value={ids.join(" ")}
                  defaultChecked={all}
                  onChange={(event) => {
                    for (const box of boxesOf(event.currentTarget)) box.checked = event.currentTarget.checked;
                  }}
                />
                All of this size
              </label>
              <details className="mt-1 text-sm" open={some && !all}>
                <summary className="cursor-pointer text-ink-700 underline underline-offset-2">Choose single spheres</summary>
                <div className="mt-1 flex flex-wrap gap-x-4 gap-y-1">
                  {group.spheres.map((sphere) => (
                    <label key={sphere.id} className="flex items-center gap-1.5">
                      <input
                        type="checkbox"
                        name={field.name}
                        value={sphere.id}
                        data-sphere=""
                        defaultChecked={all || ticked.has(sphere.id)}
                        onChange={(event) => {
                          const groupBox = event.currentTarget
                            .closest("fieldset")
                            ?.querySelector<HTMLInputElement>("input:not([data-sphere])");
                          if (groupBox) groupBox.checked = boxesOf(event.currentTarget).every((box) => box.checked);
                        }}
                      />
                      {sphere.label}
                    </label>
                  ))}
                </div>
              </details>
            </fieldset>
          );
        })}
      </div>
      {messages.length ? (
        <p id={field.errorId} className="mt-1 text-sm font-medium text-outlier">
          {messages.join(" ")}
        </p>
      ) : null}
    </fieldset>
  );
}

function Section({ title, children }: { title: string; children: ReactNode }) {
  return (
    <fieldset className="flex flex-col gap-4 rounded-lg bg-white p-4 ring-1 ring-ink-900/10">
      <legend className="px-1 text-base font-semibold">{title}</legend>
      {children}
    </fieldset>
  );
}

export function LabFields({
  fields,
  timeZone,
  cohorts,
  parts,
}: {
  fields: { [Key in keyof LabFormValues]: Field };
  timeZone: string;
  cohorts: { id: string; name: string }[];
  parts: PartOption[];
}) {
  const resolutions = (
    fields.resolutions as Field & { getFieldset: () => Record<keyof LabFormValues["resolutions"], Field> }
  ).getFieldset();
  return (
    <>
      <Section title="The lab">
        <TextField label="Title" required field={fields.title} />
        <SelectField label="Experiment" field={fields.kind}>
          {experimentKinds.map((kind) => (
            <option key={kind} value={kind}>
              {experimentKindNames[kind]}
            </option>
          ))}
        </SelectField>
        <TextAreaField
          label="Instructions"
          rows={6}
          field={fields.instructions}
          hint="Students read these on the lab page, always with the safety cautions below."
        />
        <SafetyCautions compact />
      </Section>

      <Section title={`Times (${timeZone})`}>
        <div className="grid gap-4 sm:grid-cols-3">
          <WallClockField label="Opens" field={fields.opensAt} timeZone={timeZone} />
          <WallClockField label="Due" field={fields.dueAt} timeZone={timeZone} />
          <WallClockField
            label="Late cut-off"
            field={fields.lateCutoffAt}
            timeZone={timeZone}
            hint="Hand-ins until then are accepted and labelled late. Empty: none after the due time."
          />
        </div>
      </Section>

      <Section title="Cohorts and parts">
        <CheckboxGroup
          legend="Cohorts"
          field={fields.cohortIds}
          options={cohorts.map((cohort) => ({ id: cohort.id, label: cohort.name }))}
          hint="Publishing needs at least one."
        />
        <TextField
          label="Required drops"
          inputMode="numeric"
          field={fields.requiredDrops}
          hint="Fewer drops are still taken, with a warning."
        />
        <SphereGroups
          field={fields.allowedSphereIds}
          spheres={parts.filter((part) => part.kind === "sphere")}
          hint={`${noneTickedHints.sphere} "All of this size" allows every sphere of its group, ticked below or not.`}
        />
        {(["fluid_lot", "column"] as const).map((kind) => (
          <CheckboxGroup
            key={kind}
            legend={`Allowed ${partKindHeadings[kind].toLowerCase()}`}
            field={fields[allowedPartFields[kind]]}
            options={parts
              .filter((part) => part.kind === kind)
              .map((part) => ({ id: part.id, label: [part.label, part.material ?? part.fluidName].filter(Boolean).join(" · ") }))}
            hint={noneTickedHints[kind]}
          />
        ))}
      </Section>

      <Section title="Reduction">
        <div className="grid gap-4 sm:grid-cols-2">
          <SelectField label="Wall correction" field={fields.wallCorrection}>
            {wallCorrections.map((method) => (
              <option key={method} value={method}>
                {wallCorrectionNames[method]}
              </option>
            ))}
          </SelectField>
          <SelectField label="Reference drag model" field={fields.dragModel}>
            {dragModels.map((model) => (
              <option key={model} value={model}>
                {dragModelNames[model]}
              </option>
            ))}
          </SelectField>
        </div>
        <p className="text-sm text-ink-700">
          Instrument resolutions feed the uncertainty budget (each reading taken as rectangular, u = r/√12), and so does the
          thermometer&apos;s accuracy ±a (rectangular, u = a/√3). The defaults are common practice for a home kit: micrometer, milligram
          balance, ruler, hand stopwatch and a thermometer good to ±0.5 °C.
        </p>
        <div className="grid gap-4 sm:grid-cols-3 lg:grid-cols-6">
          <TextField label="Diameter" unit="mm" inputMode="decimal" field={resolutions.diameterMm} />
          <TextField label="Mass" unit="g" inputMode="decimal" field={resolutions.massG} />
          <TextField label="Distance" unit="mm" inputMode="decimal" field={resolutions.distanceMm} />
          <TextField label="Time" unit="s" inputMode="decimal" field={resolutions.timeS} />
          <TextField label="Temperature" unit="°C" inputMode="decimal" field={resolutions.temperatureC} />
          <TextField label="Thermometer accuracy ±" unit="°C" inputMode="decimal" field={resolutions.thermometerAccuracyC} />
        </div>
      </Section>

      <Section title="Class comparison">
        {/* The method's column is as wide as its longest name, so the select never cuts it off. */}
        <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-[max-content_repeat(3,minmax(0,1fr))]">
          <SelectField label="Method" field={fields.comparisonMethod}>
            {comparisonMethods.map((method) => (
              <option key={method} value={method}>
                {methodNames[method]}
              </option>
            ))}
          </SelectField>
          <TextField label="Grubbs / ESD α" inputMode="decimal" field={fields.comparisonAlpha} />
          <TextField
            label="Grubbs: at most this many removals; ESD: upper bound r"
            inputMode="numeric"
            field={fields.comparisonMaxOutliers}
          />
          <TextField label="Tukey k" inputMode="decimal" field={fields.comparisonK} hint="Suspect beyond k, outlier beyond 2k." />
        </div>
      </Section>

      <Section title="Reminders">
        <TextField
          label="Remind students without a hand-in"
          unit="hours before the due time"
          field={fields.reminderOffsetsHours}
          hint="Whole hours, separated by commas; empty for none. Each student gets each reminder at most once."
        />
      </Section>

      <Section title="After the release">
        <SelectField
          label="A hand-in from a student whose mark is released"
          field={fields.afterReleaseHandIns}
          hint="Either way the released mark keeps the version it was marked on."
        >
          {afterReleaseHandInPolicies.map((policy) => (
            <option key={policy} value={policy}>
              {afterReleaseHandInNames[policy]}
            </option>
          ))}
        </SelectField>
      </Section>
    </>
  );
}
