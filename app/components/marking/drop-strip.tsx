/**
 * A hand-in's drop times as a strip one card wide: each drop a tick on a line from the fastest to the
 * slowest, the mean as a taller mark, stray drops as crosses (shape, not colour). It carries no text;
 * its title says the same in words, as its name for screen readers and as a tooltip. The ticks are one path each for the drops and the strays, at a
 * tenth of a unit: a desk page draws one strip per card, so its markup stays a few hundred bytes.
 */
import { counted } from "~/lib/plural";

const WIDTH = 200;
const HEIGHT = 22;
const PAD = 6;

export function DropStrip({ times, strayDrops }: { times: readonly number[]; strayDrops: readonly number[] }) {
  const valid = times.filter((time) => Number.isFinite(time));
  if (valid.length === 0) return null;
  const low = Math.min(...valid);
  const high = Math.max(...valid);
  const mean = valid.reduce((sum, time) => sum + time, 0) / valid.length;
  // One spread for a log whose drops all read alike: they sit together in the middle.
  const span = high - low || 1;
  const x = (time: number) => Math.round((high === low ? WIDTH / 2 : PAD + ((time - low) / span) * (WIDTH - 2 * PAD)) * 10) / 10;
  const stray = new Set(strayDrops);
  const seconds = (time: number) => `${Number(time.toPrecision(4))} s`;
  const label = `${counted(valid.length, "drop", "drops")} from ${seconds(low)} to ${seconds(high)}, mean ${seconds(mean)}${
    stray.size ? `; ${counted(stray.size, "stray drop", "stray drops")} marked with a cross` : ""
  }`;
  const mid = HEIGHT / 2;
  const drawn = times.map((time, index) => ({ time, index })).filter(({ time }) => Number.isFinite(time));
  const ticks = drawn
    .filter(({ index }) => !stray.has(index))
    .map(({ time }) => `M${x(time)} ${mid - 5}v10`)
    .join("");
  const crosses = drawn
    .filter(({ index }) => stray.has(index))
    .map(({ time }) => `M${x(time) - 3.5} ${mid - 3.5}l7 7m0-7l-7 7`)
    .join("");
  return (
    <svg viewBox={`0 0 ${WIDTH} ${HEIGHT}`} className="block h-7 w-full text-ink-700" role="img">
      <title>{label}</title>
      <path d={`M${PAD} ${mid}H${WIDTH - PAD}`} stroke="currentColor" strokeOpacity={0.3} />
      <path d={`M${x(mean)} 1V${HEIGHT - 1}`} stroke="currentColor" strokeWidth={1.5} strokeDasharray="2 1.5" />
      {ticks ? <path d={ticks} stroke="currentColor" strokeWidth={1.5} /> : null}
      {crosses ? <path d={crosses} stroke="var(--color-outlier)" strokeWidth={1.8} /> : null}
    </svg>
  );
}
