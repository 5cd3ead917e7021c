/**
 * One criterion of the rubric form, a member of Conform's `criteria` field list: its title, how it is
 * scored, and the fields of that kind (levels, a range, or an automatic rule). Levels are a nested
 * field list; adding, removing and moving are intent buttons, so they work without JavaScript too.
 */
import type { FieldMetadata, FormMetadata } from "@conform-to/react";
import type { z } from "zod";
import { SelectField, TextAreaField, TextField } from "~/components/ui/field";
import { parseTypedNumber } from "~/lib/forms/typed-number";
import {
  autoRuleLabels,
  autoRules,
  describeAutoRule,
  MAX_LEVELS,
  type AutoRule,
  type CriterionKind,
  type rubricFormInput,
  type RubricCriterionInput,
} from "~/lib/marking/rubric";

export type RubricFormSchema = z.input<typeof rubricFormInput>;
export type RubricForm = FormMetadata<RubricFormSchema, string[]>;
export type CriterionField = FieldMetadata<RubricCriterionInput, RubricFormSchema, string[]>;
/** What the form holds of a criterion: text as typed. */
type CriterionValue = Partial<Record<"id" | "title" | "description" | "kind" | "rule" | "maxPoints", string>> & {
  levels?: { points?: string }[];
  params?: Partial<Record<"tolerancePercent" | "suspectPoints" | "latePenaltyPoints", string>>;
};

/** A typed number as the preview reads it: 0 until it is one. */
const typed = (text: string | undefined) => {
  const value = parseTypedNumber(text ?? "");
  return typeof value === "number" && Number.isFinite(value) ? value : undefined;
};

/** The most points a criterion as typed can give, for the page's running total. */
export function typedMaxPoints(criterion: CriterionValue | undefined): number {
  if (criterion?.kind === "levels") return Math.max(0, ...(criterion.levels ?? []).map((level) => typed(level.points) ?? 0));
  return typed(criterion?.maxPoints) ?? 0;
}

/** A new criterion of `kind` as the form starts it, keeping the id, title and description of the one it replaces. */
export function starterCriterion(kind: CriterionKind, keep: CriterionValue = {}) {
  const common = { ...(keep.id ? { id: keep.id } : {}), title: keep.title ?? "", description: keep.description ?? "" };
  if (kind === "levels")
    return {
      ...common,
      kind,
      levels: [
        { points: "0", description: "" },
        { points: "", description: "" },
      ],
    };
  if (kind === "range") return { ...common, kind, minPoints: "0", maxPoints: "" };
  return { ...common, kind, rule: "required_drops" as const, maxPoints: "", params: { tolerancePercent: "10" } };
}

export function CriterionFields({
  form,
  criteria,
  criterion,
  index,
  count,
  requiredDrops,
  locked,
}: {
  form: RubricForm;
  criteria: FieldMetadata<RubricCriterionInput[], RubricFormSchema, string[]>;
  criterion: CriterionField;
  index: number;
  count: number;
  requiredDrops: number;
  locked: boolean;
}) {
  const fields = criterion.getFieldset();
  const value = (criterion.value ?? {}) as CriterionValue;
  const kind = (value.kind ?? "levels") as CriterionKind;
  return (
    <fieldset disabled={locked} className="flex flex-col gap-3">
      <legend className="sr-only">Criterion {index + 1}</legend>
      {value.id ? <input type="hidden" name={fields.id.name} value={value.id} /> : null}
      <div className="grid gap-3 sm:grid-cols-[1fr_12rem]">
        <TextField label={`Criterion ${index + 1}`} field={fields.title} required />
        <SelectField
          label="Scored by"
          field={fields.kind}
          // With JavaScript the new kind's fields appear at once; without, after the next save.
          onChange={(event) =>
            form.update({ name: criterion.name, value: starterCriterion(event.currentTarget.value as CriterionKind, value) })
          }
        >
          <option value="levels">levels</option>
          <option value="range">points in a range</option>
          <option value="auto">automatically</option>
        </SelectField>
      </div>
      <TextAreaField label="What it looks for" rows={2} field={fields.description} />
      {kind === "levels" ? (
        <LevelFields form={form} levels={fields.levels} />
      ) : kind === "range" ? (
        <div className="grid gap-3 sm:grid-cols-2">
          <TextField label="Fewest points" unit="pts" inputMode="decimal" field={fields.minPoints} />
          <TextField label="Most points" unit="pts" inputMode="decimal" field={fields.maxPoints} />
        </div>
      ) : (
        <AutoRuleFields fields={fields} value={value} requiredDrops={requiredDrops} />
      )}
      <div className="flex flex-wrap gap-3 text-sm">
        <button
          className="min-h-9 underline disabled:opacity-50"
          disabled={index === 0}
          {...form.reorder.getButtonProps({ name: criteria.name, from: index, to: index - 1 })}
        >
          Move up
        </button>
        <button
          className="min-h-9 underline disabled:opacity-50"
          disabled={index === count - 1}
          {...form.reorder.getButtonProps({ name: criteria.name, from: index, to: index + 1 })}
        >
          Move down
        </button>
        <button className="min-h-9 text-outlier underline" {...form.remove.getButtonProps({ name: criteria.name, index })}>
          Remove the criterion
        </button>
      </div>
    </fieldset>
  );
}

type Fieldset = ReturnType<CriterionField["getFieldset"]>;

function LevelFields({ form, levels }: { form: RubricForm; levels: Fieldset["levels"] }) {
  const list = levels.getFieldList();
  return (
    <div className="flex flex-col gap-2">
      {list.map((level, levelIndex) => {
        const { points, description } = level.getFieldset();
        return (
          <div key={level.key ?? levelIndex} className="grid items-start gap-2 sm:grid-cols-[7rem_1fr_auto]">
            <TextField label={`Level ${levelIndex + 1}`} unit="pts" inputMode="decimal" field={points} />
            <TextField label="Description" field={description} />
            <button
              className="mt-6 min-h-9 px-2 text-sm underline"
              {...form.remove.getButtonProps({ name: levels.name, index: levelIndex })}
            >
              Remove<span className="sr-only"> level {levelIndex + 1}</span>
            </button>
          </div>
        );
      })}
      {levels.errors?.length ? <p className="text-sm text-outlier">{levels.errors.join(" ")}</p> : null}
      {list.length < MAX_LEVELS ? (
        <button
          className="self-start text-sm underline"
          {...form.insert.getButtonProps({ name: levels.name, defaultValue: { points: "", description: "" } })}
        >
          Add a level
        </button>
      ) : null}
    </div>
  );
}

function AutoRuleFields({ fields, value, requiredDrops }: { fields: Fieldset; value: CriterionValue; requiredDrops: number }) {
  const params = fields.params.getFieldset();
  const rule = (value.rule ?? "required_drops") as AutoRule;
  return (
    <div className="grid gap-3 sm:grid-cols-2">
      <SelectField label="Rule" field={fields.rule}>
        {autoRules.map((option) => (
          <option key={option} value={option}>
            {autoRuleLabels[option]}
          </option>
        ))}
      </SelectField>
      <TextField label="Points" unit="pts" inputMode="decimal" field={fields.maxPoints} />
      {rule === "within_reference" ? <TextField label="Tolerance" unit="%" inputMode="decimal" field={params.tolerancePercent} /> : null}
      {rule === "not_outlier" ? (
        <TextField
          label="Points when suspect"
          unit="pts"
          inputMode="decimal"
          hint="Half the points when empty."
          field={params.suspectPoints}
        />
      ) : null}
      {rule === "on_time" ? (
        <TextField
          label="Taken off when late"
          unit="pts"
          inputMode="decimal"
          hint="All the points when empty."
          field={params.latePenaltyPoints}
        />
      ) : null}
      <p className="text-sm text-ink-700 sm:col-span-2">
        {describeAutoRule(
          {
            autoRule: rule,
            maxPoints: typed(value.maxPoints) ?? 0,
            autoParams: {
              tolerancePercent: typed(value.params?.tolerancePercent),
              suspectPoints: typed(value.params?.suspectPoints),
              latePenaltyPoints: typed(value.params?.latePenaltyPoints),
            },
          },
          requiredDrops,
        )}{" "}
        A marker may override it, with a reason.
      </p>
    </div>
  );
}
