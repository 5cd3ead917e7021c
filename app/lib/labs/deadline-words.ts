/** The deadline reminder's counts of time left, agreeing with their numbers. */
import { counted, plural } from "../plural";

/** Whole hours left, or "less than an hour" under one: "24 hours", "1 hour". */
export function timeLeftWords(hoursLeft: number): string {
  return hoursLeft < 1 ? "less than an hour" : counted(Math.floor(hoursLeft), "hour", "hours");
}

/** The reminder's opening: "There are 24 hours left to hand in your drop log." */
export function timeLeftSentence(hoursLeft: number): string {
  const hours = hoursLeft < 1 ? 1 : Math.floor(hoursLeft);
  return `There ${plural(hours, "is", "are")} ${timeLeftWords(hoursLeft)} left to hand in your drop log.`;
}
