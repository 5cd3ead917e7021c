/**
 * Rounds a result to its uncertainty as GUM 7.2.6 asks (JCGM 100:2008): the uncertainty to two
 * significant digits, the value to the same last digit. Rounding is to the nearest digit; GUM 7.2.6
 * allows rounding an uncertainty up instead, but asks for common sense (its 28.05 kHz rounds down),
 * and a budget that rounds every row up would overstate the total. The one place results are written
 * with their uncertainty, for pages and CSV alike.
 */
export function roundToUncertainty(
  value: number,
  uncertainty: number,
  significantDigits = 2,
): { value: string; uncertainty: string } | null {
  if (!Number.isFinite(value) || !Number.isFinite(uncertainty) || !(uncertainty > 0)) return null;
  let exponent = Math.floor(Math.log10(uncertainty));
  let step = 10 ** (exponent - significantDigits + 1);
  // 99.6 rounds to 100: one more digit in front, so the step grows with it.
  if (Math.round(uncertainty / step) >= 10 ** significantDigits) {
    exponent += 1;
    step *= 10;
  }
  const decimals = significantDigits - 1 - exponent;
  if (decimals >= 0) return { value: value.toFixed(decimals), uncertainty: uncertainty.toFixed(decimals) };
  // Whole tens, hundreds, …: round explicitly, since toFixed has no negative digits.
  const roundTo = (x: number) => String(Math.round(x / step) * step);
  return { value: roundTo(value), uncertainty: roundTo(uncertainty) };
}

/** "1088 ± 26" style text of a result with its expanded uncertainty, or the value alone to four figures when U is unknown. */
export function formatWithUncertainty(value: number, expanded: number | null | undefined): string {
  const rounded = expanded === null || expanded === undefined ? null : roundToUncertainty(value, expanded);
  if (!rounded) return Number.isFinite(value) ? Number(value.toPrecision(4)).toString() : "—";
  return `${rounded.value} ± ${rounded.uncertainty}`;
}
