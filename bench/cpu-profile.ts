/**
 * Where a process spent its CPU, from the `.cpuprofile` that `node --cpu-prof` writes: the frames with
 * the most self time, and the same time summed by package (pg, drizzle-orm, react-router, react-dom,
 * zod, …, the app's own build, node's core). Used by the benchmarks that take `BENCH_CPU_PROF=<dir>`;
 * also runs alone: `npx tsx bench/cpu-profile.ts <file.cpuprofile>`.
 */
import { readdirSync, readFileSync, statSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";

type CallFrame = { functionName: string; url: string; lineNumber: number; columnNumber: number };
type ProfileNode = { id: number; callFrame: CallFrame; children?: number[] };
/** The parts of V8's CPU profile read here (timestamps in microseconds on the monotonic clock). */
type CpuProfile = { nodes: ProfileNode[]; startTime: number; samples: number[]; timeDeltas: number[] };

/** The package a frame's script belongs to: the last node_modules folder in its path, or the app's build, or node itself. */
export function packageOf(url: string, functionName: string): string {
  if (!url) return functionName.startsWith("(") ? functionName : "(native)";
  if (url.startsWith("node:")) return "node (core)";
  const modules = url.lastIndexOf("/node_modules/");
  if (modules !== -1) {
    const [scope, name] = url.slice(modules + "/node_modules/".length).split("/");
    return scope.startsWith("@") ? `${scope}/${name}` : scope;
  }
  if (/\/build\/(production-check\/)?server\//.test(url)) return "app (build/server)";
  if (/\/build\/(production-check\/)?web\.js$/.test(url)) return "web server (build/web.js)";
  return url.replace(/^file:\/\//, "");
}

const frameName = ({ functionName, url, lineNumber }: CallFrame) =>
  `${functionName || "(anonymous)"} ${url ? `${path.basename(url)}:${lineNumber + 1}` : ""}`.trim();

export type CpuSummary = {
  /** Milliseconds of samples counted (the window's, idle excluded). */
  busyMs: number;
  idleMs: number;
  samples: number;
  byFrame: { name: string; package: string; ms: number }[];
  byPackage: { package: string; ms: number }[];
};

/**
 * Self time per frame and per package. With `window` (monotonic microseconds, as `process.hrtime`
 * counts them on Linux, the clock V8 stamps samples with), only the samples inside it: the load, not
 * the server's start-up.
 */
export function summariseCpuProfile(profile: CpuProfile, window?: { fromUs: number; toUs: number }): CpuSummary {
  const nodes = new Map(profile.nodes.map((node) => [node.id, node]));
  const selfUs = new Map<number, number>();
  let at = profile.startTime;
  let counted = 0;
  for (let index = 0; index < profile.samples.length; index++) {
    at += profile.timeDeltas[index];
    // A sample stands for the time until the next one.
    const duration = profile.timeDeltas[index + 1] ?? 0;
    if (window && (at < window.fromUs || at > window.toUs)) continue;
    counted++;
    selfUs.set(profile.samples[index], (selfUs.get(profile.samples[index]) ?? 0) + duration);
  }
  const parents = new Map<number, number>();
  for (const node of profile.nodes) for (const child of node.children ?? []) parents.set(child, node.id);
  // A native or node-core frame (a socket's writev, JSON.parse) is charged to the package that called it, when one did.
  const inNode = ({ url, functionName }: CallFrame) => (!url && !functionName.startsWith("(")) || url.startsWith("node:");
  const owner = (id: number): ProfileNode => {
    let node = nodes.get(id)!;
    while (inNode(node.callFrame) && parents.has(node.id)) node = nodes.get(parents.get(node.id)!)!;
    return inNode(node.callFrame) || node.callFrame.functionName === "(root)" ? nodes.get(id)! : node;
  };
  const frames = new Map<string, { name: string; package: string; us: number }>();
  const packages = new Map<string, number>();
  let idleUs = 0;
  for (const [id, us] of selfUs) {
    const { callFrame } = nodes.get(id)!;
    if (callFrame.functionName === "(idle)") {
      idleUs += us;
      continue;
    }
    const name = frameName(callFrame);
    const caller = owner(id).callFrame;
    const pkg = packageOf(caller.url, caller.functionName);
    const frame = frames.get(name) ?? { name, package: pkg, us: 0 };
    frame.us += us;
    frames.set(name, frame);
    packages.set(pkg, (packages.get(pkg) ?? 0) + us);
  }
  const busyUs = [...packages.values()].reduce((sum, us) => sum + us, 0);
  return {
    busyMs: busyUs / 1000,
    idleMs: idleUs / 1000,
    samples: counted,
    byFrame: [...frames.values()].sort((a, b) => b.us - a.us).map(({ us, ...frame }) => ({ ...frame, ms: us / 1000 })),
    byPackage: [...packages].sort((a, b) => b[1] - a[1]).map(([pkg, us]) => ({ package: pkg, ms: us / 1000 })),
  };
}

/** The summary as a few lines of text: the top `top` frames and packages, each with its share of the busy time. */
export function formatCpuSummary(summary: CpuSummary, { top = 25, requests }: { top?: number; requests?: number } = {}): string {
  const share = (ms: number) => `${((100 * ms) / summary.busyMs).toFixed(1).padStart(5)} %`;
  const perRequest = requests ? `, ${(summary.busyMs / requests).toFixed(2)} ms a request over ${requests}` : "";
  return [
    `CPU profile: ${summary.samples} samples, busy ${summary.busyMs.toFixed(0)} ms${perRequest} (idle ${summary.idleMs.toFixed(0)} ms)`,
    "self time by package (native and node-core frames count for the package that called them):",
    ...summary.byPackage.slice(0, top).map((row) => `  ${share(row.ms)} ${row.ms.toFixed(0).padStart(6)} ms  ${row.package}`),
    "self time by function [its package, or its caller's]:",
    ...summary.byFrame.slice(0, top).map((row) => `  ${share(row.ms)} ${row.ms.toFixed(0).padStart(6)} ms  ${row.name}  [${row.package}]`),
  ].join("\n");
}

/** The newest `.cpuprofile` in `directory` (node names them by date, pid and sequence). */
export function newestCpuProfile(directory: string): string {
  const files = readdirSync(directory)
    .filter((file) => file.endsWith(".cpuprofile"))
    .map((file) => path.join(directory, file));
  if (files.length === 0) throw new Error(`No .cpuprofile in ${directory}: did the server exit normally?`);
  return files.sort((a, b) => statSync(b).mtimeMs - statSync(a).mtimeMs)[0];
}

export const readCpuProfile = (file: string): CpuProfile => JSON.parse(readFileSync(file, "utf8"));

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const file = process.argv[2];
  if (!file) throw new Error("Usage: tsx bench/cpu-profile.ts <file.cpuprofile | directory> [top]");
  const profileFile = statSync(file).isDirectory() ? newestCpuProfile(file) : file;
  console.log(formatCpuSummary(summariseCpuProfile(readCpuProfile(profileFile)), { top: Number(process.argv[3] ?? 25) }));
}
