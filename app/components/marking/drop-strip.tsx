/**
 * A hand-in's drop times as a strip one card wide: each drop a tick on a line from the fastest to the
 * slowest, the mean as a taller mark, stray drops as crosses (shape, not colour). It carries no text;
 * its label says the same in words.
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
  const x = (time: number) => (high === low ? WIDTH / 2 : PAD + ((time - low) / span) * (WIDTH - 2 * PAD));
  const stray = new Set(strayDrops);
  const seconds = (time: number) => `${Number(time.toPrecision(4))} s`;
  const label = `${counted(valid.length, "drop", "drops")} from ${seconds(low)} to ${seconds(high)}, mean ${seconds(mean)}${
    stray.size ? `; ${counted(stray.size, "stray drop", "stray drops")} marked with a cross` : ""
  }`;
  const mid = HEIGHT / 2;
  return (
    <svg viewBox={`0 0 ${WIDTH} ${HEIGHT}`} className="block h-7 w-full text-ink-700" role="img" aria-label={label}>
      <title>{label}</title>
      <line x1={PAD} x2={WIDTH - PAD} y1={mid} y2={mid} stroke="currentColor" strokeOpacity={0.3} />
      <line x1={x(mean)} x2={x(mean)} y1={1} y2={HEIGHT - 1} stroke="currentColor" strokeWidth={1.5} strokeDasharray="2 1.5" />
      {times.map((time, index) =>
        !Number.isFinite(time) ? null : stray.has(index) ? (
          <path
            key={index}
            d={`M${x(time) - 3.5},${mid - 3.5}l7,7m0,-7l-7,7`}
            stroke="var(--color-outlier)"
            strokeWidth={1.8}
            data-stray="true"
          />
        ) : (
          <line key={index} x1={x(time)} x2={x(time)} y1={mid - 5} y2={mid + 5} stroke="currentColor" strokeWidth={1.5} />
        ),
      )}
    </svg>
  );
}
