import { rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { migrate, openDb } from "@/db";
import { insertOrg } from "@/db/queries/orgs";
import { findJob } from "@/db/queries/jobs";
import { newJobId } from "@/lib/jobs/ids";
import { closePools, poolLimits } from "@/lib/jobs/pool";
import { databaseQueue } from "@/lib/jobs/queue";
import { runJob } from "@/lib/jobs/runner";
import { jobKinds, type SimulationJobInput, type SimulationProgress } from "@/lib/jobs/simulation-kind";

/**
 * Simulations as the job runner runs them, in process on a scratch database: chunks on the pool's batch
 * lane, folded in order, recorded chunk by chunk. (7,4) Hamming on a BSC with p = 1e-3 and every bit drawn,
 * with 1 and 2 pool threads; then the wall time to decide "uncoded BSC with p = 1e-10 keeps BER ≤ 1e-9 at 95 %"
 * as a simulated claim decides it (the sequential rule, gap skipping), from enqueue to verdict.
 */
export async function runJobsBench(): Promise<void> {
  const file = join(tmpdir(), `paritas-bench-jobs-${process.pid}.db`);
  const db = openDb(file);
  await migrate(db);
  const org = await insertOrg(db, { slug: "bench-jobs", name: "Bench jobs" });
  const queue = databaseQueue(db);

  async function run(input: SimulationJobInput, threads: number) {
    const id = newJobId("sim");
    const t0 = performance.now();
    await queue.enqueue({ id, orgId: org.id, apiKeyId: null, kind: "simulation", input });
    const job = (await queue.claim("bench", 60_000))!;
    // As scripts/worker.ts runs them: one chunk more in flight than threads, so no thread waits for the next.
    await runJob(job, { queue, kinds: jobKinds, holder: "bench", parallel: threads + 1 }, () => false);
    return { id, t0 };
  }
  async function timed(input: SimulationJobInput, threads: number) {
    await closePools();
    poolLimits.batchThreads = threads;
    // A runner's pool stays up between jobs: start its threads with a short job first.
    await run({ ...input, stop: { maxBits: 1 << 20 } }, threads);
    const { id, t0 } = await run(input, threads);
    const s = (performance.now() - t0) / 1000;
    const row = (await findJob(db, org.id, id))!;
    const point = (JSON.parse(row.result!) as SimulationProgress).points[0]!;
    return { s, point, status: row.status };
  }

  const hamming: SimulationJobInput = {
    code: { family: "hamming", r: 3 } as SimulationJobInput["code"],
    channel: { type: "bsc" },
    points: [1e-3],
    stop: { maxBits: 2 ** 28 },
    confidence: 0.95,
    seed: 1,
    gapSkipping: false,
  };
  const rows: Record<string, { threads: number; "Mbit/s": number; seconds: number; chunks: number }> = {};
  const counts: string[] = [];
  for (const threads of [1, 2]) {
    const { s, point } = await timed(hamming, threads);
    rows[`${threads} worker${threads > 1 ? "s" : ""}`] = { threads, "Mbit/s": Math.round(point.counts.infoBits / s / 1e5) / 10, seconds: Math.round(s * 100) / 100, chunks: point.chunks };
    counts.push(JSON.stringify(point.counts));
  }
  console.log(`\nSimulation jobs: (7,4) Hamming, BSC p = 1e-3, every bit drawn, 2^28 information bits, through the runner and the pool's batch lane`);
  console.table(rows);
  const [one, two] = Object.values(rows);
  console.log(`ratio 2 workers / 1 worker: throughput ${(two!["Mbit/s"] / one!["Mbit/s"]).toFixed(2)}×; counts identical: ${counts[0] === counts[1]}`);

  const claim: SimulationJobInput = {
    channel: { type: "bsc" },
    points: [1e-10],
    stop: { maxBits: 2 ** 36, maxSeconds: 300 },
    confidence: 0.95,
    seed: 7,
    gapSkipping: true,
    decide: { metric: "ber", target: 1e-9, confidence: 0.95 },
  };
  const decided = await timed(claim, 2);
  console.log(
    `\nSimulated claim "uncoded BSC p = 1e-10 keeps BER ≤ 1e-9 at 95 %": ${decided.point.stoppedBy} after ${decided.point.counts.infoBits.toExponential(3)} bits ` +
      `(${decided.point.counts.bitErrors} errors, ${decided.point.chunks} chunks) in ${decided.s.toFixed(2)} s from enqueue to verdict`,
  );
  await closePools();
  await db.destroy();
  for (const suffix of ["", "-wal", "-shm"]) rmSync(file + suffix, { force: true });
}
