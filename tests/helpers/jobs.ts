import { afterAll, beforeAll } from "vitest";
import { getDb } from "@/db";
import { databaseQueue } from "@/lib/jobs/queue";
import { runJobs } from "@/lib/jobs/runner";
import { jobKinds } from "@/lib/jobs/simulation-kind";

/**
 * A job runner in this test file's process, on its database, from beforeAll to afterAll (a quick heartbeat and
 * idle poll, two chunks in flight). The returned stop() ends it early; afterAll's call then finds it ended.
 */
export function runnerForThisFile(holder: string): { stop: () => Promise<void> } {
  const abort = new AbortController();
  let loop: Promise<void> = Promise.resolve();
  beforeAll(async () => {
    loop = runJobs({ queue: databaseQueue(await getDb()), kinds: jobKinds, holder, heartbeatMs: 100, idleMs: 20, parallel: 2 }, abort.signal);
  });
  const stop = async () => {
    abort.abort();
    await loop;
  };
  afterAll(stop);
  return { stop };
}

export const finished = (s: { status: string }) => ["done", "cancelled", "failed"].includes(s.status);

/** Read until `done` holds, every 50 ms, for at most `ms`; the last value read either way. */
export async function until<T>(read: () => Promise<T>, done: (v: NoInfer<T>) => boolean, ms = 60_000): Promise<T> {
  const t0 = Date.now();
  for (;;) {
    const v = await read();
    if (done(v) || Date.now() - t0 > ms) return v;
    await new Promise((r) => setTimeout(r, 50));
  }
}
