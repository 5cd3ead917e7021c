// Benchmark of the reduction engine: 10,000 drop logs of 12 drops, then one class comparison over them,
// against a floor loop that only sums the same drop times. Run with `npm run bench:reduction`.
import { performance } from "node:perf_hooks";
import {
  classComparison,
  normalisedFigure,
  reduceFallingSphere,
  type ClassComparisonEntry,
  type FallingSphereInput,
} from "../app/lib/reduction/index";

const LOG_COUNT = 10_000;
const DROPS_PER_LOG = 12;
const ROUNDS = 7;

// mulberry32: a small seeded PRNG, so every run reduces the same invented data.
function mulberry32(seed: number) {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function makeLogs(): FallingSphereInput[] {
  const random = mulberry32(20240917);
  const gaussian = () => Math.sqrt(-2 * Math.log(1 - random())) * Math.cos(2 * Math.PI * random());
  const logs: FallingSphereInput[] = [];
  for (let i = 0; i < LOG_COUNT; i++) {
    const meanTime = 18 + 4 * random();
    const drops = new Array<number>(DROPS_PER_LOG);
    for (let j = 0; j < DROPS_PER_LOG; j++) drops[j] = meanTime * (1 + 0.01 * gaussian());
    if (random() < 0.1) drops[Math.floor(random() * DROPS_PER_LOG)] *= 1.08; // a mistimed drop now and then
    logs.push({
      mode: i % 2 === 0 ? "drag" : "viscometry",
      sphere: { diameter: 2e-3 * (1 + 0.002 * gaussian()), mass: 32.7e-6 * (1 + 0.002 * gaussian()) },
      fluid: { density: 1260, viscosity: 1.2, temperature: 21 },
      column: { timedDistance: 0.2, innerDiameter: 40e-3, runIn: 0.05 },
      drops,
    });
  }
  return logs;
}

function runBatch(logs: FallingSphereInput[]): number {
  const entries: ClassComparisonEntry[] = new Array(logs.length);
  for (let i = 0; i < logs.length; i++) {
    const reduction = reduceFallingSphere(logs[i]);
    entries[i] = { id: String(i), figure: normalisedFigure(reduction, { referenceViscosity: 1.2 }) };
  }
  return classComparison(entries, { method: "grubbs" }).length;
}

function figuresOf(logs: FallingSphereInput[]): ClassComparisonEntry[] {
  return logs.map((log, i) => ({ id: String(i), figure: normalisedFigure(reduceFallingSphere(log), { referenceViscosity: 1.2 }) }));
}

function runFloor(logs: FallingSphereInput[]): number {
  let total = 0;
  for (const log of logs) for (const time of log.drops) total += time;
  return total;
}

function bestOf(rounds: number, work: () => unknown): number {
  let best = Number.POSITIVE_INFINITY;
  for (let round = 0; round < rounds; round++) {
    const start = performance.now();
    work();
    best = Math.min(best, performance.now() - start);
  }
  return best;
}

const logs = makeLogs();
runBatch(logs); // warm-up: JIT and the t-quantile caches
runFloor(logs);
const batchMs = bestOf(ROUNDS, () => runBatch(logs));
const entries = figuresOf(logs);
const comparisonMs = bestOf(ROUNDS, () => classComparison(entries, { method: "grubbs" }));
const floorMs = bestOf(ROUNDS, () => runFloor(logs));
const perLogMicroseconds = (batchMs * 1000) / LOG_COUNT;
const floorPerLogMicroseconds = (floorMs * 1000) / LOG_COUNT;

console.log(`${LOG_COUNT} drop logs × ${DROPS_PER_LOG} drops, best of ${ROUNDS} rounds`);
console.log(`reduction + class comparison: ${batchMs.toFixed(2)} ms (${perLogMicroseconds.toFixed(2)} µs per log)`);
console.log(`  of which class comparison:   ${comparisonMs.toFixed(2)} ms`);
console.log(`floor (sum of drop times):    ${floorMs.toFixed(3)} ms (${floorPerLogMicroseconds.toFixed(3)} µs per log)`);
console.log(`ratio: ${(batchMs / floorMs).toFixed(0)}× the floor; budget 50 ms → ${batchMs < 50 ? "within" : "OVER"} budget`);
