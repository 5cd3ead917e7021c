/**
 * What a class looks like under a comparison setting: the engine's labels, the counts each alternative
 * setting would give, and the limits the strip plot draws. Pure, so the settings preview and the
 * server's relabel read the same code; kept apart from `comparison-settings.ts` because it reaches the
 * Student-t quantile (stdlib), which the settings form in the browser does not need.
 */
import { classComparison, type ClassComparisonEntry, type ClassComparisonResult } from "~/lib/reduction/class-comparison";
import { grubbsCriticalValue } from "~/lib/reduction/grubbs";
import { MINIMUM_DROPS_FOR_STRAY_TEST } from "~/lib/reduction/stray-drops";
import { quantileType7 } from "~/lib/reduction/tukey";
import { countLabels, describeSettings, type ComparisonSettings, type LabelCounts } from "./comparison-settings";

/** The engine's labels for a class under one setting; `quantity` names the figure in the reasons. */
export function labelClass(
  entries: readonly ClassComparisonEntry[],
  settings: ComparisonSettings,
  quantity: string,
): ClassComparisonResult[] {
  return classComparison(entries, {
    method: settings.method,
    alpha: settings.alpha,
    maxOutliers: settings.maxOutliers,
    k: settings.k,
    quantity,
  });
}

/** The settings the preview compares with the chosen one: three Grubbs levels, three ESD levels and three fence factors. */
export function alternativeSettings(chosen: ComparisonSettings): ComparisonSettings[] {
  return [
    ...[0.01, 0.05, 0.1].map((alpha) => ({ ...chosen, method: "grubbs" as const, alpha })),
    ...[0.01, 0.05, 0.1].map((alpha) => ({ ...chosen, method: "esd" as const, alpha })),
    ...[1.5, 2.2, 3].map((k) => ({ ...chosen, method: "iqr" as const, k })),
  ];
}

export type SettingsPreview = { settings: ComparisonSettings; description: string; counts: LabelCounts };

/** How many hand-ins each setting would flag: the chosen one first, then the alternatives. */
export function previewSettings(entries: readonly ClassComparisonEntry[], chosen: ComparisonSettings, quantity: string): SettingsPreview[] {
  return [chosen, ...alternativeSettings(chosen)].map((settings) => ({
    settings,
    description: describeSettings(settings),
    counts: countLabels(labelClass(entries, settings, quantity)),
  }));
}

/** Limits on the figure itself (not its log), as the strip plot draws them; null when the class is too small. */
export type ComparisonLimits = { kind: "tukey" | "grubbs"; inner: [number, number]; outer: [number, number] | null; note: string } | null;

/**
 * Where the method draws its lines over the whole class, in figure units. Tukey: the inner (k) and
 * outer (2k) fences on ln figure with type-7 quartiles. Grubbs and ESD: the first step's limits,
 * mean ± G_crit·s of ln figure at α (NIST/SEMATECH e-Handbook §1.3.5.17.1; λ₁ of the ESD test, §1.3.5.17.3,
 * is the same value); later steps test the rest. None below seven figures, where neither test is made.
 */
export function comparisonLimits(figures: readonly number[], settings: ComparisonSettings): ComparisonLimits {
  const n = figures.length;
  if (n < (settings.method === "iqr" ? 3 : MINIMUM_DROPS_FOR_STRAY_TEST)) return null;
  const logs = Float64Array.from(figures, Math.log).sort();
  if (settings.method === "iqr") {
    const q1 = quantileType7(logs, 0.25);
    const q3 = quantileType7(logs, 0.75);
    const iqr = q3 - q1;
    const at = (factor: number): [number, number] => [Math.exp(q1 - factor * iqr), Math.exp(q3 + factor * iqr)];
    return {
      kind: "tukey",
      inner: at(settings.k),
      outer: at(2 * settings.k),
      note: `Tukey's fences at k = ${settings.k} and ${2 * settings.k}`,
    };
  }
  let sum = 0;
  for (const value of logs) sum += value;
  const mean = sum / n;
  let squares = 0;
  for (const value of logs) squares += (value - mean) ** 2;
  const sd = Math.sqrt(squares / (n - 1));
  const critical = grubbsCriticalValue(n, settings.alpha);
  return {
    kind: "grubbs",
    inner: [Math.exp(mean - critical * sd), Math.exp(mean + critical * sd)],
    outer: null,
    note: `${settings.method === "esd" ? "Generalized ESD λ₁" : "Grubbs"} limits of the first step: mean ± ${critical.toFixed(2)}·s of ln figure at α = ${settings.alpha}, n = ${n}`,
  };
}
