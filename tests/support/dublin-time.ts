/**
 * A wall-clock time in Europe/Dublin as an instant, for the tests that cross Ireland's clock changes
 * (last Sunday of March and of October).
 */
import { wallClockToInstant } from "~/lib/labs/wall-clock";

export function dublin(wall: string): Date {
  const result = wallClockToInstant(wall, "Europe/Dublin");
  if (!result.ok) throw new Error(`not a Dublin wall-clock time: ${wall}`);
  return result.instant;
}
