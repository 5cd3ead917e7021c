/**
 * How late a hand-in came, in words a marker reads at a glance ("2 days 3 hours", "45 minutes"):
 * the two largest units, rounded down, so that a hand-in one minute late never reads "0 minutes".
 */
import { counted } from "~/lib/plural";

const units = [
  { ms: 86_400_000, one: "day", other: "days" },
  { ms: 3_600_000, one: "hour", other: "hours" },
  { ms: 60_000, one: "minute", other: "minutes" },
] as const;

export function lateBy(submittedAt: string | Date, dueAt: string | Date): string {
  let left = Math.max(0, new Date(submittedAt).getTime() - new Date(dueAt).getTime());
  if (left < 60_000) return "under a minute";
  const parts: string[] = [];
  for (const unit of units) {
    const amount = Math.floor(left / unit.ms);
    left -= amount * unit.ms;
    if (amount > 0 || parts.length > 0) parts.push(counted(amount, unit.one, unit.other));
    if (parts.length === 2) break;
  }
  return parts.filter((part) => !part.startsWith("0 ")).join(" ");
}
