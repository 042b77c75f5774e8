import { describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { findJob, requestCancel } from "@/db/queries/jobs";
import { newJobId, JOB_ID_PATTERN } from "@/lib/jobs/ids";
import { databaseQueue } from "@/lib/jobs/queue";
import { erasePlan, runJob, runJobs, type JobKind } from "@/lib/jobs/runner";
import { makeOrgWithKey } from "../helpers/fixtures";

/**
 * The runner and the database queue with a counting kind whose answer is known by hand: point i adds
 * chunk c's value (c + 1) until the sum reaches its target, so a target of 10 stops after chunks 0..3
 * (1 + 2 + 3 + 4 = 10) and the result is [sum, chunks] for each point.
 */
type Counting = { sum: number; chunks: number };
const calls: string[] = [];
function counting(delayMs = 0, failAt?: number): JobKind {
  return {
    kind: "counting",
    plan(input) {
      const targets = (input as { targets: number[] }).targets;
      return erasePlan<Counting, number>({
        points: targets.length,
        run: async (p, c) => {
          calls.push(`${p}:${c}`);
          if (delayMs) await new Promise((r) => setTimeout(r, delayMs));
          if (failAt === c) throw new Error(`chunk ${c} broke`);
          return c + 1;
        },
        fold: (_p, s, n) => ({ sum: (s?.sum ?? 0) + n, chunks: (s?.chunks ?? 0) + 1 }),
        stop: (p, s) => (s.sum >= targets[p]! ? `reached ${targets[p]}` : null),
        progress: (states) => states.map((s) => s?.chunks ?? 0),
        result: (states, stops) => states.map((s, i) => ({ ...s, stop: stops[i] })),
        units: (states) => states.reduce((u, s) => u + (s?.chunks ?? 0), 0),
      });
    },
  };
}

async function setup(targets: number[]) {
  const { org, keyId } = await makeOrgWithKey();
  const db = await getDb();
  const queue = databaseQueue(db);
  const id = newJobId("tst");
  await queue.enqueue({ id, orgId: org.id, apiKeyId: keyId, kind: "counting", input: { targets } });
  return { db, queue, id, org };
}
const never = () => false;
const parse = (s: string | null | undefined) => (s ? JSON.parse(s) : null);

describe("job ids", () => {
  it("are a kind prefix and 16 base-32 characters, different every time", () => {
    const ids = Array.from({ length: 1000 }, () => newJobId("sim"));
    for (const id of ids) expect(id).toMatch(JOB_ID_PATTERN);
    expect(new Set(ids).size).toBe(1000);
  });
});

describe("the runner", () => {
  it("runs a job to the end: points stop by their rule, chunks are recorded, units charged for folded chunks", async () => {
    const { db, queue, id, org } = await setup([10, 1, 3]);
    const job = (await queue.claim("runner-a", 10_000))!;
    expect(job).toMatchObject({ id, kind: "counting", attempts: 1, chunks: [] });
    expect(await runJob(job, { queue, kinds: [counting()], holder: "runner-a" }, never)).toBe("done");
    const row = (await findJob(db, org.id, id))!;
    expect(row.status).toBe("done");
    // 1+2+3+4 = 10 → 4 chunks; 1 → 1 chunk; 1+2 = 3 → 2 chunks.
    expect(parse(row.result)).toEqual([
      { sum: 10, chunks: 4, stop: "reached 10" },
      { sum: 1, chunks: 1, stop: "reached 1" },
      { sum: 3, chunks: 2, stop: "reached 3" },
    ]);
    expect(row.units).toBe(7);
    expect(row.lease_holder).toBeNull();
    // Metered once, with the job's id as the request id.
    expect(await db.selectFrom("usage_events").select(["endpoint", "method", "units"]).where("request_id", "=", id).execute()).toEqual([{ endpoint: "jobs.counting", method: "JOB", units: 7 }]);
    expect((await db.selectFrom("job_chunks").select(["point", "chunk"]).where("job_id", "=", id).execute()).length).toBe(7);
  });

  it("gives the same result with chunks in parallel, and charges nothing for chunks computed past a stop", async () => {
    const a = await setup([10, 21]);
    await runJob((await a.queue.claim("r", 10_000))!, { queue: a.queue, kinds: [counting(5)], holder: "r", parallel: 3 }, never);
    const row = (await findJob(a.db, a.org.id, a.id))!;
    expect(parse(row.result)).toEqual([
      { sum: 10, chunks: 4, stop: "reached 10" },
      { sum: 21, chunks: 6, stop: "reached 21" },
    ]);
    expect(row.units).toBe(10);
  });

  it("resumes after the chunks a lost runner recorded: same result as an uninterrupted run, attempts counted", async () => {
    const { db, queue, id, org } = await setup([15]);
    const first = (await queue.claim("dies", 50))!;
    // The first runner recorded chunks 0 and 1, then stopped without a word (kill -9).
    expect(await queue.saveChunk(id, "dies", 0, 0, 1)).toBe(true);
    expect(await queue.saveChunk(id, "dies", 0, 1, 2)).toBe(true);
    expect(first.attempts).toBe(1);
    // While its lease runs nobody else may take the job.
    expect(await queue.claim("other", 10_000)).toBeNull();
    await new Promise((r) => setTimeout(r, 80));
    const again = (await queue.claim("other", 10_000))!;
    expect(again).toMatchObject({ id, attempts: 2, chunks: [{ point: 0, chunk: 0, counts: 1 }, { point: 0, chunk: 1, counts: 2 }] });
    calls.length = 0;
    expect(await runJob(again, { queue, kinds: [counting()], holder: "other" }, never)).toBe("done");
    // 1+2+3+4+5 = 15: only chunks 2, 3 and 4 were computed again.
    expect(calls).toEqual(["0:2", "0:3", "0:4"]);
    expect(parse((await findJob(db, org.id, id))!.result)).toEqual([{ sum: 15, chunks: 5, stop: "reached 15" }]);
    // The runner that lost the job can no longer write to it.
    expect(await queue.saveChunk(id, "dies", 0, 9, 99)).toBe(false);
    expect(await queue.finish(id, "dies", { status: "failed", units: 0 })).toBe(false);
  });

  it("ends a running job as cancelled within a heartbeat of the request, charging the chunks it ran", async () => {
    const { db, queue, id, org } = await setup([1e9]);
    const job = (await queue.claim("r", 10_000))!;
    const run = runJob(job, { queue, kinds: [counting(10)], holder: "r", heartbeatMs: 50 }, never);
    await new Promise((r) => setTimeout(r, 120));
    const asked = Date.now();
    expect((await requestCancel(db, org.id, id, new Date().toISOString()))!.status).toBe("running");
    expect(await run).toBe("cancelled");
    expect(Date.now() - asked).toBeLessThan(1000);
    const row = (await findJob(db, org.id, id))!;
    expect(row.status).toBe("cancelled");
    const stored = await db.selectFrom("job_chunks").select("chunk").where("job_id", "=", id).execute();
    expect(stored.length).toBeGreaterThan(0);
    expect(row.units).toBe(stored.length);
  });

  it("cancels a queued job at once; no runner ever takes it", async () => {
    const { db, queue, id, org } = await setup([3]);
    expect((await requestCancel(db, org.id, id, new Date().toISOString()))!.status).toBe("cancelled");
    expect(await queue.claim("r", 10_000)).toBeNull();
  });

  it("fails a job whose computation throws, with the reason, keeps the chunks before and charges nothing", async () => {
    const { db, queue, id, org } = await setup([100]);
    expect(await runJob((await queue.claim("r", 10_000))!, { queue, kinds: [counting(0, 3)], holder: "r" }, never)).toBe("failed");
    const row = (await findJob(db, org.id, id))!;
    expect(row).toMatchObject({ status: "failed", units: 0 });
    expect(JSON.parse(row.progress!)).toEqual([3]);
    expect(row.reason).toMatch(/chunk 3 broke/);
  });

  it("gives the job back when the runner shuts down, and a runner loop takes it up and finishes it", async () => {
    const { db, queue, id, org } = await setup([28]);
    let stopping = false;
    const job = (await queue.claim("leaving", 10_000))!;
    const run = runJob(job, { queue, kinds: [counting(20)], holder: "leaving" }, () => stopping);
    await new Promise((r) => setTimeout(r, 50));
    stopping = true;
    expect(await run).toBe("released");
    expect((await findJob(db, org.id, id))!.status).toBe("queued");
    const ac = new AbortController();
    const loop = runJobs({ queue, kinds: [counting()], holder: "next", idleMs: 10 }, ac.signal);
    for (let i = 0; i < 100 && (await findJob(db, org.id, id))!.status !== "done"; i++) await new Promise((r) => setTimeout(r, 20));
    ac.abort();
    await loop;
    expect(parse((await findJob(db, org.id, id))!.result)).toEqual([{ sum: 28, chunks: 7, stop: "reached 28" }]);
  });
});
