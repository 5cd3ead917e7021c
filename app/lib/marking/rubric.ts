/**
 * A lab's rubric: its criteria, each scored by picking a level (1-based, so a TA can type its number),
 * a number of points within a range, or automatically from the hand-in's reduction and the class
 * comparison. Pure, so the rubric form and the server check the same schema.
 */
import { z } from "zod";
import { typedNumber } from "~/lib/forms/typed-number";
import { counted } from "../plural";

export const criterionKinds = ["levels", "range", "auto"] as const;
export type CriterionKind = (typeof criterionKinds)[number];

/** The automatic rules: what each reads from the hand-in is in `./automatic-criteria.ts`. */
export const autoRules = ["required_drops", "within_reference", "not_outlier", "on_time"] as const;
export type AutoRule = (typeof autoRules)[number];

export const autoRuleLabels: Record<AutoRule, string> = {
  required_drops: "Required number of drops",
  within_reference: "Result within a tolerance of the reference",
  not_outlier: "Not an outlier in the class comparison",
  on_time: "Handed in on time",
};

/** One level of a levels criterion: its points and what a hand-in at that level looks like. */
export type RubricLevel = { points: number; description: string };

/**
 * Parameters of an automatic rule. `tolerancePercent` (within_reference): how far the normalised
 * figure may be from 1. `suspectPoints` (not_outlier): points for a hand-in labelled suspect, half the
 * maximum when absent. `latePenaltyPoints` (on_time): taken off the maximum for a late hand-in, all of
 * it when absent.
 */
export type AutoRuleParams = { tolerancePercent?: number; suspectPoints?: number; latePenaltyPoints?: number };

/** A criterion as stored and read back. `minPoints`/`maxPoints` are the levels' lowest and highest for a levels criterion, 0 and the maximum for an automatic one. */
export type RubricCriterion = {
  id: string;
  position: number;
  title: string;
  description: string;
  kind: CriterionKind;
  levels: RubricLevel[] | null;
  minPoints: number;
  maxPoints: number;
  autoRule: AutoRule | null;
  autoParams: AutoRuleParams;
};

/** Most points a criterion may carry; keeps a typo (1000 for 10) out of the totals. */
export const MAX_CRITERION_POINTS = 1000;
/** Level numbers are typed on the keyboard, 1 to 9. */
export const MAX_LEVELS = 9;

const pointsNumber = z
  .number({ error: "Enter a number of points." })
  .finite()
  .min(0, "Points cannot be negative.")
  .max(MAX_CRITERION_POINTS, `At most ${MAX_CRITERION_POINTS} points.`);
// Numbers as the rubric form types them (a blank, a decimal comma) or as code passes them.
const points = typedNumber(pointsNumber);
const optionalPoints = typedNumber(pointsNumber.optional());
const common = {
  id: z.uuid().optional(),
  title: z.string().trim().min(1, "Give the criterion a title.").max(120, "At most 120 characters."),
  description: z.string().trim().max(1000, "At most 1,000 characters.").default(""),
};

export const levelsCriterionInput = z.object({
  ...common,
  kind: z.literal("levels"),
  levels: z
    .array(z.object({ points, description: z.string().trim().min(1, "Describe the level.").max(500, "At most 500 characters.") }))
    .min(2, "Give at least two levels.")
    .max(MAX_LEVELS, `At most ${MAX_LEVELS} levels (they are picked by their number key).`),
});

export const rangeCriterionInput = z
  .object({ ...common, kind: z.literal("range"), minPoints: points, maxPoints: points })
  .refine((criterion) => criterion.maxPoints > criterion.minPoints, {
    message: "The maximum must be above the minimum.",
    path: ["maxPoints"],
  });

export const autoCriterionInput = z
  .object({
    ...common,
    kind: z.literal("auto"),
    rule: z.enum(autoRules, { error: "Choose one of the automatic rules." }),
    maxPoints: typedNumber(pointsNumber.refine((value) => value > 0, "Give the criterion some points.")),
    params: z
      .object({
        tolerancePercent: typedNumber(
          z.number().finite().positive("The tolerance must be above 0 %.").max(100, "At most 100 %.").optional(),
        ),
        suspectPoints: optionalPoints,
        latePenaltyPoints: optionalPoints,
      })
      .default({}),
  })
  .superRefine((criterion, context) => {
    const { params, rule, maxPoints } = criterion;
    if (rule === "within_reference" && params.tolerancePercent === undefined) {
      context.addIssue({ code: "custom", path: ["params", "tolerancePercent"], message: "Give the tolerance in per cent." });
    }
    for (const key of ["suspectPoints", "latePenaltyPoints"] as const) {
      const value = params[key];
      if (value !== undefined && value > maxPoints)
        context.addIssue({
          code: "custom",
          path: ["params", key],
          message: `At most the criterion's ${counted(maxPoints, "point", "points")}.`,
        });
    }
  });

// Told apart by `kind`, so that a refusal names the field of the chosen kind rather than the whole criterion.
export const rubricCriterionInput = z.discriminatedUnion("kind", [levelsCriterionInput, rangeCriterionInput, autoCriterionInput]);
export type RubricCriterionInput = z.input<typeof rubricCriterionInput>;

/** The rubric's criteria in their order. An `id` keeps a criterion (and the scores given for it). */
const rubricCriteriaInput = z
  .array(rubricCriterionInput)
  .min(1, "Add at least one criterion.")
  .max(30, "At most 30 criteria.")
  .superRefine((criteria, context) => {
    const seen = new Set<string>();
    criteria.forEach((criterion, index) => {
      if (!criterion.id) return;
      if (seen.has(criterion.id)) context.addIssue({ code: "custom", path: [index, "id"], message: "This criterion appears twice." });
      seen.add(criterion.id);
    });
  });

/** The whole rubric, as `saveRubric` takes it. */
export const rubricInput = z.object({ criteria: rubricCriteriaInput });
export type RubricInput = z.output<typeof rubricInput>;

/**
 * The rubric form's submission, its field list named `criteria[0].title`, `criteria[0].levels[1].points`…;
 * `intent` tells it from the copy form on the same page.
 */
export const rubricFormInput = rubricInput.extend({ intent: z.literal("save") });

/** The columns a criterion input is stored as (without lab and position). */
export function criterionColumns(input: z.output<typeof rubricCriterionInput>) {
  const base = { title: input.title, description: input.description };
  if (input.kind === "levels") {
    const levelPoints = input.levels.map((level) => level.points);
    return {
      ...base,
      kind: input.kind,
      levels: input.levels,
      minPoints: Math.min(...levelPoints),
      maxPoints: Math.max(...levelPoints),
      autoRule: null,
      autoParams: {},
    };
  }
  if (input.kind === "range")
    return {
      ...base,
      kind: input.kind,
      levels: null,
      minPoints: input.minPoints,
      maxPoints: input.maxPoints,
      autoRule: null,
      autoParams: {},
    };
  const params: AutoRuleParams = {};
  if (input.rule === "within_reference") params.tolerancePercent = input.params.tolerancePercent;
  if (input.rule === "not_outlier" && input.params.suspectPoints !== undefined) params.suspectPoints = input.params.suspectPoints;
  if (input.rule === "on_time" && input.params.latePenaltyPoints !== undefined) params.latePenaltyPoints = input.params.latePenaltyPoints;
  return { ...base, kind: input.kind, levels: null, minPoints: 0, maxPoints: input.maxPoints, autoRule: input.rule, autoParams: params };
}

/** A stored criterion as the rubric form's input, for editing or copying (`keepId` false makes a copy). */
export function criterionToInput(criterion: RubricCriterion, keepId = true): RubricCriterionInput {
  const base = { ...(keepId ? { id: criterion.id } : {}), title: criterion.title, description: criterion.description };
  if (criterion.kind === "levels") return { ...base, kind: "levels", levels: criterion.levels ?? [] };
  if (criterion.kind === "range") return { ...base, kind: "range", minPoints: criterion.minPoints, maxPoints: criterion.maxPoints };
  return { ...base, kind: "auto", rule: criterion.autoRule!, maxPoints: criterion.maxPoints, params: criterion.autoParams };
}

/** The most a mark can reach: the sum of every criterion's maximum. */
export const maxTotalOf = (rubric: readonly RubricCriterion[]) =>
  roundPoints(rubric.reduce((sum, criterion) => sum + criterion.maxPoints, 0));

/** Points are kept to two decimals, so that sums of halves and quarters print as typed. */
export const roundPoints = (value: number) => Math.round(value * 100) / 100;

/** A sentence for people: what an automatic rule awards, with its parameters filled in. */
export function describeAutoRule(criterion: Pick<RubricCriterion, "autoRule" | "autoParams" | "maxPoints">, requiredDrops: number): string {
  const { autoParams: params, maxPoints } = criterion;
  const points = counted(maxPoints, "point", "points");
  switch (criterion.autoRule) {
    case "required_drops":
      return `${points} when the counted hand-in has at least the lab's ${counted(requiredDrops, "drop", "drops")}, none otherwise.`;
    case "within_reference":
      return `${points} when the normalised figure is within ±${params.tolerancePercent ?? 0} % of the reference (1), none otherwise.`;
    case "not_outlier":
      return `${points} when the class comparison labels the hand-in consistent, ${params.suspectPoints ?? maxPoints / 2} when suspect, none when outlier.`;
    case "on_time":
      return `${points} when handed in on time, ${Math.max(0, maxPoints - (params.latePenaltyPoints ?? maxPoints))} when late.`;
    default:
      return "";
  }
}
