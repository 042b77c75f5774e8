import { redactSecrets } from "@/lib/api/redact";
import type { ClaimedJob, JobQueue } from "./queue";

/**
 * What a kind of job does, as the runner sees it: points (a sweep), each computed chunk after chunk until
 * it stops. Chunks are independent tasks that may run in parallel, but they are folded strictly in chunk
 * order and the stopping rule is checked after each fold, so the same input gives the same result however
 * many workers ran it and however often it was interrupted.
 */
export interface JobPlan<S = unknown, C = unknown> {
  points: number;
  /** Compute chunk `chunk` of point `point` (off the event loop: on the pool's batch lane). */
  run(point: number, chunk: number): Promise<C>;
  fold(point: number, state: S | undefined, counts: C): S;
  /** Why the point is finished (a sentence), or null to go on. `elapsedMs`: this point's computing time in this attempt. */
  stop(point: number, state: S, elapsedMs: number): string | null;
  /** What a watcher sees: written at least every second. */
  progress(states: (S | undefined)[], stops: (string | null)[]): unknown;
  result(states: (S | undefined)[], stops: (string | null)[]): unknown;
  /** Compute units for the chunks folded so far. */
  units(states: (S | undefined)[]): number;
}

export interface JobKind {
  kind: string;
  plan(input: unknown): JobPlan;
}

/** A plan with its own state and count types, as the runner holds it (it passes states and counts back untouched). */
export const erasePlan = <S, C>(plan: JobPlan<S, C>): JobPlan => plan as unknown as JobPlan;

export interface RunnerOptions {
  queue: JobQueue;
  kinds: JobKind[];
  /** Who this runner is (host, process, random): leases name it. */
  holder: string;
  leaseMs?: number;
  /** Renew the lease, write progress and look for a cancel this often. */
  heartbeatMs?: number;
  /** Chunks of one point in flight at once (the pool's threads). */
  parallel?: number;
  /** How long to wait before looking again when the queue is empty. */
  idleMs?: number;
  log?: (line: string) => void;
}

export const RUNNER_DEFAULTS = { leaseMs: 15_000, heartbeatMs: 500, parallel: 1, idleMs: 250 };

class Stop extends Error {
  constructor(readonly why: "cancelled" | "lost" | "shutdown") {
    super(why);
  }
}

/** Run one claimed job to its end (done, cancelled, failed), or until the lease is lost or the runner stops. */
export async function runJob(job: ClaimedJob, o: RunnerOptions, stopping: () => boolean): Promise<JobEndState> {
  const { queue, holder } = o;
  const leaseMs = o.leaseMs ?? RUNNER_DEFAULTS.leaseMs;
  const kind = o.kinds.find((k) => k.kind === job.kind);
  if (!kind) {
    await queue.finish(job.id, holder, { status: "failed", reason: `This runner cannot run jobs of kind ${job.kind}.`, units: 0 });
    return "failed";
  }
  let plan: JobPlan;
  try {
    plan = kind.plan(job.input);
  } catch (e) {
    await queue.finish(job.id, holder, { status: "failed", reason: `The job's input no longer reads: ${(e as Error).message}`, units: 0 });
    return "failed";
  }
  const states: unknown[] = new Array(plan.points).fill(undefined);
  const stops: (string | null)[] = new Array(plan.points).fill(null);
  const next: number[] = new Array(plan.points).fill(0);
  // Resume: fold the chunks a previous attempt recorded, in order.
  for (const c of job.chunks) {
    if (c.chunk !== next[c.point]) continue;
    states[c.point] = plan.fold(c.point, states[c.point], c.counts);
    next[c.point] = c.chunk + 1;
  }

  let cancelRequested = false;
  let lost = false;
  let beat: Promise<void> = Promise.resolve();
  const heartbeat = () => {
    beat = beat.then(async () => {
      const h = await queue.heartbeat(job.id, holder, leaseMs, plan.progress(states, stops));
      if (!h.held) lost = true;
      if (h.cancelRequested) cancelRequested = true;
    });
    return beat;
  };
  const check = () => {
    if (lost) throw new Stop("lost");
    if (cancelRequested) throw new Stop("cancelled");
    if (stopping()) throw new Stop("shutdown");
  };
  const timer = setInterval(() => void heartbeat().catch(() => undefined), o.heartbeatMs ?? RUNNER_DEFAULTS.heartbeatMs);
  const parallel = Math.max(1, o.parallel ?? RUNNER_DEFAULTS.parallel);
  try {
    await heartbeat();
    for (let p = 0; p < plan.points; p++) {
      const started = performance.now();
      let why = states[p] === undefined ? null : plan.stop(p, states[p], 0);
      const inFlight = new Map<number, Promise<unknown>>();
      while (why === null) {
        check();
        while (inFlight.size < parallel) {
          const c = next[p]! + inFlight.size;
          const task = plan.run(p, c);
          task.catch(() => undefined);
          inFlight.set(c, task);
        }
        const c = next[p]!;
        const counts = await inFlight.get(c)!;
        inFlight.delete(c);
        check();
        states[p] = plan.fold(p, states[p], counts);
        if (!(await queue.saveChunk(job.id, holder, p, c, counts))) throw new Stop("lost");
        next[p] = c + 1;
        why = plan.stop(p, states[p], performance.now() - started);
      }
      stops[p] = why;
      // Chunks computed past the stop are dropped: they were never folded, so they are not charged.
    }
    clearInterval(timer);
    await beat;
    const ok = await queue.finish(job.id, holder, { status: "done", result: plan.result(states, stops), progress: plan.progress(states, stops), units: plan.units(states) });
    return ok ? "done" : "lost";
  } catch (e) {
    clearInterval(timer);
    await beat.catch(() => undefined);
    if (e instanceof Stop) {
      if (e.why === "lost") return "lost";
      if (e.why === "shutdown") {
        await queue.release(job.id, holder);
        return "released";
      }
      await queue.finish(job.id, holder, {
        status: "cancelled",
        reason: "Cancelled on request; the result holds the chunks finished before.",
        result: plan.result(states, stops),
        progress: plan.progress(states, stops),
        units: plan.units(states),
      });
      return "cancelled";
    }
    // A failed job is not charged.
    await queue.finish(job.id, holder, { status: "failed", reason: `The computation stopped with an error: ${(e as Error).message}`, progress: plan.progress(states, stops), units: 0 });
    return "failed";
  }
}

export type JobEndState = "done" | "cancelled" | "failed" | "lost" | "released";

/** Claim and run jobs one after another until `signal` aborts; then give back the job in hand. */
export async function runJobs(o: RunnerOptions, signal: AbortSignal): Promise<void> {
  const idle = o.idleMs ?? RUNNER_DEFAULTS.idleMs;
  while (!signal.aborted) {
    const job = await o.queue.claim(o.holder, o.leaseMs ?? RUNNER_DEFAULTS.leaseMs);
    if (!job) {
      // Wait, or stop waiting at the abort; the listener goes with the wait (one per idle turn would pile up).
      await new Promise<void>((r) => {
        const onAbort = () => (clearTimeout(t), r());
        const t = setTimeout(() => (signal.removeEventListener("abort", onAbort), r()), idle);
        signal.addEventListener("abort", onAbort, { once: true });
      });
      continue;
    }
    o.log?.(`job ${job.id} (${job.kind}) claimed, attempt ${job.attempts}${job.chunks.length ? `, resuming after ${job.chunks.length} chunks` : ""}`);
    const end = await runJob(job, o, () => signal.aborted);
    // The end may quote a failure's message, which may quote the request that queued the job.
    o.log?.(redactSecrets(`job ${job.id}: ${end}`));
  }
}
