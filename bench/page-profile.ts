/**
 * `npm run bench:page-profile -- lab|comparison`: where the server's CPU goes on one page. A class of
 * 100 students (60 of them handed in) on a bench copy of the database; the built app under
 * `node --cpu-prof`; 1,500 document requests of the page, six at a time, loopback only; then the
 * profile's top frames and packages by self time (bench/cpu-profile.ts), start-up and the hand-ins
 * before the load left out.
 */
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { formatCpuSummary, newestCpuProfile, readCpuProfile, summariseCpuProfile } from "./cpu-profile";
import { buildAppIfChanged, createBenchDatabase, dropTimes, postHandIn, seedDeadlineClass, startAppServer } from "./support";

const REQUESTS = 1_500;
const AT_ONCE = 6;
const page = process.argv[2];
if (page !== "lab" && page !== "comparison") throw new Error("Name the page to profile: lab or comparison.");

buildAppIfChanged();
const bench = await createBenchDatabase();
const profiles = await mkdtemp(path.join(tmpdir(), "benchpost-page-profile-"));
try {
  const { students, labId, courseId, instructor, label } = await seedDeadlineClass({ students: 100, cohorts: 2 });
  const server = await startAppServer(bench.url, { nodeArguments: ["--cpu-prof", `--cpu-prof-dir=${profiles}`] });
  let window: { fromUs: number; toUs: number };
  const statuses = new Map<number, number>();
  let bytes = 0;
  try {
    for (const student of students.slice(0, 60))
      await postHandIn(server.baseUrl, {
        labId,
        student,
        key: `${label}-${student.index}`,
        drops: dropTimes(student.index),
        signal: AbortSignal.timeout(10_000),
      });
    // The student's own lab page, each request another student's; the comparison as the instructor sees it.
    const request = (index: number) =>
      page === "lab"
        ? { url: `/courses/${courseId}/labs/${labId}`, cookie: students[index % students.length].cookie }
        : { url: `/courses/${courseId}/labs/${labId}/comparison`, cookie: instructor.cookie };
    let sent = 0;
    const started = performance.now();
    const fromUs = Number(process.hrtime.bigint() / 1000n);
    await Promise.all(
      Array.from({ length: AT_ONCE }, async () => {
        while (sent < REQUESTS) {
          const { url, cookie } = request(sent++);
          const response = await fetch(`${server.baseUrl}${url}`, { headers: { Cookie: cookie }, signal: AbortSignal.timeout(10_000) });
          bytes += (await response.text()).length;
          statuses.set(response.status, (statuses.get(response.status) ?? 0) + 1);
        }
      }),
    );
    window = { fromUs, toUs: Number(process.hrtime.bigint() / 1000n) };
    const answers = [...statuses].map(([status, count]) => `${count} × ${status}`).join(", ");
    console.log(
      `${REQUESTS} requests of the ${page} page in ${((performance.now() - started) / 1000).toFixed(1)} s (${answers}), ${(bytes / REQUESTS / 1024).toFixed(1)} KB each`,
    );
  } finally {
    // The profile is written as the server exits.
    await server.stop();
  }
  console.log(formatCpuSummary(summariseCpuProfile(readCpuProfile(newestCpuProfile(profiles)), window), { requests: REQUESTS }));
} finally {
  await rm(profiles, { recursive: true, force: true });
  await bench.drop();
}
