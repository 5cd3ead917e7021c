/**
 * The outlier method of a lab's class comparison, the form that changes it, and how a setting and its
 * counts read. No engine code: the settings form ships to the browser, and what labels a class under a
 * setting is in `class-labelling.ts`, which the server runs.
 */
import { z } from "zod";
import { typedNumber } from "~/lib/forms/typed-number";
import type { ClassComparisonLabel } from "~/lib/reduction/class-comparison";
import { counted } from "../plural";

export const comparisonLabels = ["consistent", "suspect", "outlier"] as const satisfies readonly ClassComparisonLabel[];

export const comparisonSettings = z.object({
  method: z.enum(["grubbs", "esd", "iqr"], { error: "Choose Grubbs' test, the generalized ESD test or Tukey's fences." }),
  alpha: typedNumber(
    z.number({ error: "Enter a significance level." }).gt(0, "Use a level above 0.").max(0.2, "Use a level of at most 0.2."),
  ),
  maxOutliers: typedNumber(
    z
      .number({ error: "Enter a whole number." })
      .int("Enter a whole number.")
      .min(1, "Allow at least one removal.")
      .max(100, "Allow at most 100 removals."),
  ),
  k: typedNumber(
    z.number({ error: "Enter a fence factor." }).min(0.5, "Use a factor of at least 0.5.").max(10, "Use a factor of at most 10."),
  ),
});
export type ComparisonSettings = z.infer<typeof comparisonSettings>;

export const comparisonMethods = comparisonSettings.shape.method.options;

export const methodNames: Record<ComparisonSettings["method"], string> = {
  grubbs: "Grubbs' test (iterative)",
  esd: "Generalized ESD test (Rosner)",
  iqr: "Tukey's fences",
};

/** Plain words for a setting, as the page, the CSV and the API quote it. */
export function describeSettings(settings: ComparisonSettings): string {
  if (settings.method === "grubbs")
    return `Grubbs' test, α = ${settings.alpha}, at most ${counted(settings.maxOutliers, "removal", "removals")}`;
  if (settings.method === "esd")
    return `generalized ESD test, α = ${settings.alpha}, up to r = ${counted(settings.maxOutliers, "outlier", "outliers")}`;
  return `Tukey's fences, k = ${settings.k} (outer ${2 * settings.k}), type-7 quartiles`;
}

export type LabelCounts = Record<ClassComparisonLabel, number>;

export function countLabels(results: readonly { label: ClassComparisonLabel }[]): LabelCounts {
  const counts: LabelCounts = { consistent: 0, suspect: 0, outlier: 0 };
  for (const result of results) counts[result.label]++;
  return counts;
}
