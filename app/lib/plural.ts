/**
 * Counts in words that agree with their number ("1 point", "2 points", "0 points"), through the
 * language's own plural rules rather than `n === 1` tests scattered over the pages. Every user-facing
 * count goes through here; the messages built on it are tested at 0, 1 and 2.
 */
const rules = new Intl.PluralRules("en-GB");
const numbers = new Intl.NumberFormat("en-GB", { maximumFractionDigits: 2 });

/** The word that agrees with `n`: plural(1, "is", "are") → "is". */
export function plural(n: number, one: string, other: string): string {
  return rules.select(n) === "one" ? one : other;
}

/** `n` and the word that agrees with it: counted(1200, "row", "rows") → "1,200 rows". */
export function counted(n: number, one: string, other: string): string {
  return `${numbers.format(n)} ${plural(n, one, other)}`;
}
