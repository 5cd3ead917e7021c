/** Three significant figures, as a check message needs. */
export function format(value: number): string {
  return Number(value.toPrecision(3)).toString();
}

/** A fraction as a per cent to two significant figures, signed unless `signed` is false. */
export function formatPercent(fraction: number, signed = true): string {
  const percent = Number((fraction * 100).toPrecision(2));
  return `${signed && percent > 0 ? "+" : ""}${percent} %`;
}
