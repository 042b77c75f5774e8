/**
 * The job runner: its own process, beside the web server (the demo and the tests start it). It claims
 * queued jobs from the shared queue with a lease, runs their chunks on its own worker pool and writes
 * progress; several runners, on one machine or many, can share one queue.
 *
 *   npm run worker        # PARITAS_DB_FILE as for the app; PARITAS_JOB_LEASE_MS (default 15000),
 *                         # PARITAS_BATCH_THREADS (default: one per core)
 *
 * It lowers its own scheduling priority first, so that on a shared machine the web server's requests win
 * the cores; the pool's threads inherit it. SIGINT or SIGTERM gives the job in hand back to the queue.
 */
import { randomBytes } from "node:crypto";
import { availableParallelism, hostname, setPriority } from "node:os";

try {
  setPriority(10);
} catch {
  // not allowed here: run at normal priority
}
process.env.PARITAS_BATCH_THREADS ??= String(Math.max(1, availableParallelism()));

const { closeDb, getDb } = await import("@/db");
const { closePools, poolLimits } = await import("@/lib/jobs/pool");
const { databaseQueue } = await import("@/lib/jobs/queue");
const { runJobs } = await import("@/lib/jobs/runner");
const { jobKinds } = await import("@/lib/jobs/simulation-kind");

const lease = Number(process.env.PARITAS_JOB_LEASE_MS ?? 15_000);
const holder = `${hostname()}:${process.pid}:${randomBytes(4).toString("hex")}`;
const stop = new AbortController();
for (const sig of ["SIGINT", "SIGTERM"] as const) process.on(sig, () => stop.abort());

const db = await getDb();
console.log(`runner ${holder}: ${poolLimits.batchThreads} threads, lease ${lease} ms, kinds ${jobKinds.map((k) => k.kind).join(", ")}`);
await runJobs(
  { queue: databaseQueue(db), kinds: jobKinds, holder, leaseMs: lease, heartbeatMs: Math.min(500, lease / 4), parallel: poolLimits.batchThreads + 1, log: (l) => console.log(l) },
  stop.signal,
);
await closePools();
await closeDb();
console.log(`runner ${holder}: stopped`);
