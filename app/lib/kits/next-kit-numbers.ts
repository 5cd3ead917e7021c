/**
 * New kits take the next free numbers in the course's own scheme: the prefix most of its kits use
 * ("K-" in "K-07") and the width of their digits, counting on from the highest. A course with no
 * numbered kit yet starts at K-01.
 */
export function nextKitNumbers(existing: string[], count: number): string[] {
  const numbered = existing.flatMap((number) => {
    const match = /^(.*?)(\d+)$/.exec(number);
    return match ? [{ prefix: match[1], digits: match[2] }] : [];
  });
  const uses = new Map<string, number>();
  for (const { prefix } of numbered) uses.set(prefix, (uses.get(prefix) ?? 0) + 1);
  const prefix = [...uses.entries()].sort((a, b) => b[1] - a[1])[0]?.[0] ?? "K-";
  const ofPrefix = numbered.filter((entry) => entry.prefix === prefix);
  const width = Math.max(2, ...ofPrefix.map((entry) => entry.digits.length));
  const taken = new Set(existing);
  const numbers: string[] = [];
  for (let next = Math.max(0, ...ofPrefix.map((entry) => Number(entry.digits))) + 1; numbers.length < count; next++) {
    const number = `${prefix}${String(next).padStart(width, "0")}`;
    if (!taken.has(number)) numbers.push(number);
  }
  return numbers;
}
