import { availableParallelism } from "node:os";
import { resolve } from "node:path";
import { Piscina } from "piscina";

/**
 * The worker-thread pool that runs heavy math off the event loop, in two lanes so that long batch work
 * (simulation chunks) never queues ahead of short API requests: each lane has its own threads and its own
 * bounded queue. Every task has a deadline and every worker a V8 heap ceiling; a task past either is ended
 * by terminating its worker, which the pool replaces.
 */
export type Lane = "request" | "batch";

/** A task the worker entry (pool-worker.ts) knows how to run. */
export type PoolTask =
  | { kind: "endpoint"; id: string; input: unknown }
  /** One chunk of a simulation: its counts (lib/api/simulation-spec.ts, lib/core/sim). */
  | { kind: "sim-chunk"; request: unknown; point: number; chunk: number; frames: number }
  /** Build a simulation's simulator, so that a request's mistakes are found before it is queued. */
  | { kind: "sim-check"; request: unknown };

/** What a task sends back: the JSON text of its result, or the error it threw, as data (classes do not cross threads). */
export type PoolReply =
  | { ok: true; json: string }
  | { ok: false; error: { kind: "input"; message: string; path: (string | number)[] } | { kind: "api"; code: string; detail: string; extra: object } };

/** Why the pool did not run a task to its end. */
export class PoolRefusal extends Error {
  constructor(
    readonly reason: "deadline" | "memory" | "busy",
    readonly limit: number,
  ) {
    super(`pool refused the task: ${reason}`);
    this.name = "PoolRefusal";
  }
}

const cores = Math.max(1, availableParallelism());
const envInt = (name: string, fallback: number) => {
  const v = Number(process.env[name]);
  return Number.isSafeInteger(v) && v > 0 ? v : fallback;
};

/** Limits of the pool, read once from the environment. */
export const poolLimits = {
  /** Per-task deadline of request work, ms (PARITAS_TASK_DEADLINE_MS). */
  deadlineMs: envInt("PARITAS_TASK_DEADLINE_MS", 15_000),
  /** V8 heap ceiling of each worker, MiB (PARITAS_TASK_MEMORY_MB). */
  memoryMb: envInt("PARITAS_TASK_MEMORY_MB", 512),
  /**
   * Threads of the request lane: one per core but one, at least one. The event loop keeps a core for the cheap
   * requests: with every core computing, a cheap call's p99 tripled under load (npm run bench); with one left, it held.
   */
  requestThreads: envInt("PARITAS_POOL_THREADS", Math.max(1, cores - 1)),
  /** Threads of the batch lane: one per core but one, at least one. */
  batchThreads: envInt("PARITAS_BATCH_THREADS", Math.max(1, cores - 1)),
  /** Tasks that may wait per request-lane thread before the lane answers busy. */
  queuePerThread: envInt("PARITAS_POOL_QUEUE_PER_THREAD", 8),
};

/**
 * The worker entry: plain JavaScript bundled from lib/jobs/pool-worker.ts by scripts/build-worker.mjs
 * (Next's bundler cannot ship a worker file, and worker threads cannot load TypeScript).
 */
export const workerFile = () => resolve(/*turbopackIgnore: true*/ process.env.PARITAS_POOL_WORKER ?? "dist/pool-worker.mjs");

const state = globalThis as unknown as { __paritasPools?: Partial<Record<Lane, Piscina>> };

function lane(name: Lane): Piscina {
  state.__paritasPools ??= {};
  const existing = state.__paritasPools[name];
  if (existing) return existing;
  const threads = name === "request" ? poolLimits.requestThreads : poolLimits.batchThreads;
  const pool = new Piscina({
    filename: workerFile(),
    minThreads: name === "request" ? 1 : 0,
    maxThreads: threads,
    maxQueue: threads * poolLimits.queuePerThread,
    idleTimeout: 60_000,
    resourceLimits: { maxOldGenerationSizeMb: poolLimits.memoryMb, maxYoungGenerationSizeMb: 64 },
  });
  state.__paritasPools[name] = pool;
  return pool;
}

/** Run a task on a lane within `deadlineMs`; a PoolRefusal says which limit stopped it. */
export async function runTask(name: Lane, task: PoolTask, deadlineMs = poolLimits.deadlineMs): Promise<PoolReply> {
  const pool = lane(name);
  // piscina checks maxQueue only for tasks without an abort signal; every task here has one, so the bound is ours.
  if (pool.queueSize >= pool.options.maxQueue) throw new PoolRefusal("busy", pool.options.maxQueue);
  try {
    return (await pool.run(task, { signal: AbortSignal.timeout(deadlineMs) })) as PoolReply;
  } catch (e) {
    const err = e as Error & { code?: string };
    if (err.name === "AbortError") throw new PoolRefusal("deadline", deadlineMs);
    if (err.code === "ERR_WORKER_OUT_OF_MEMORY") throw new PoolRefusal("memory", poolLimits.memoryMb);
    if (err.message === "Task queue is at limit") throw new PoolRefusal("busy", pool.options.maxQueue);
    throw e;
  }
}

/** Threads, running and queued tasks per lane (for the health check and the benchmark). */
export function poolStats(): Record<Lane, { threads: number; queued: number; completed: number } | null> {
  const of = (n: Lane) => {
    const p = state.__paritasPools?.[n];
    return p ? { threads: p.threads.length, queued: p.queueSize, completed: p.completed } : null;
  };
  return { request: of("request"), batch: of("batch") };
}

/** Close both lanes (tests, scripts). */
export async function closePools(): Promise<void> {
  const pools = state.__paritasPools;
  state.__paritasPools = undefined;
  await Promise.all(Object.values(pools ?? {}).map((p) => p.close({ force: true })));
}
