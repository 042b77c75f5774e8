import { inTransaction, type Db } from "@/db";
import { claimJob, finishJob, insertJob, insertJobChunk, listJobChunks, releaseJob, renewJob } from "@/db/queries/jobs";
import { monthKey } from "@/db/queries/quota";
import { insertUsageEvent } from "@/db/queries/usage";
import { afterSettle, settleQuota } from "@/lib/api/quota";
import { logError } from "@/lib/api/redact";

/** A job as a runner receives it: its input and the chunks already folded (a resumed job continues after them). */
export interface ClaimedJob {
  id: string;
  orgId: number;
  apiKeyId: number | null;
  kind: string;
  input: unknown;
  attempts: number;
  chunks: { point: number; chunk: number; counts: unknown }[];
}

export interface JobEnd {
  status: "done" | "cancelled" | "failed";
  result?: unknown;
  progress?: unknown;
  reason?: string;
  units: number;
}

/**
 * Where jobs wait and how a runner takes them. A runner talks only to this, never to a table, so runners
 * on other machines can share one queue; the one implementation today is the database's `jobs` table.
 * A claim carries a lease that the holder renews; a job whose lease passes goes back to any runner.
 */
export interface JobQueue {
  /** `reservedUnits`: what the job holds from the org's allowance until it ends (lib/api/quota.ts). */
  enqueue(job: { id: string; orgId: number; apiKeyId: number | null; kind: string; input: unknown; reservedUnits?: number }): Promise<void>;
  claim(holder: string, leaseMs: number): Promise<ClaimedJob | null>;
  /** Renew the lease and write progress: `held` false when another runner has the job now. */
  heartbeat(id: string, holder: string, leaseMs: number, progress?: unknown): Promise<{ held: boolean; cancelRequested: boolean }>;
  /** Record a chunk folded into its point; false when the holder lost the job. */
  saveChunk(id: string, holder: string, point: number, chunk: number, counts: unknown): Promise<boolean>;
  finish(id: string, holder: string, end: JobEnd): Promise<boolean>;
  /** Give the job back (the runner stops): it waits for the next claim. */
  release(id: string, holder: string): Promise<void>;
}

const iso = (ms: number) => new Date(ms).toISOString();

export function databaseQueue(db: Db): JobQueue {
  return {
    async enqueue(job) {
      const now = iso(Date.now());
      await insertJob(db, { id: job.id, org_id: job.orgId, api_key_id: job.apiKeyId, kind: job.kind, input: JSON.stringify(job.input), status: "queued", created_at: now, updated_at: now, reserved_units: job.reservedUnits ?? 0 });
    },
    async claim(holder, leaseMs) {
      const t = Date.now();
      const row = await claimJob(db, holder, iso(t), iso(t + leaseMs));
      if (!row) return null;
      const chunks = (await listJobChunks(db, row.id)).map((c) => ({ point: c.point, chunk: c.chunk, counts: JSON.parse(c.counts) as unknown }));
      return { id: row.id, orgId: row.org_id, apiKeyId: row.api_key_id, kind: row.kind, input: JSON.parse(row.input) as unknown, attempts: row.attempts, chunks };
    },
    async heartbeat(id, holder, leaseMs, progress) {
      const t = Date.now();
      const row = await renewJob(db, id, holder, iso(t), iso(t + leaseMs), progress === undefined ? undefined : JSON.stringify(progress));
      return { held: Boolean(row), cancelRequested: Boolean(row?.cancel_requested_at) };
    },
    saveChunk: (id, holder, point, chunk, counts) => insertJobChunk(db, id, holder, point, chunk, JSON.stringify(counts)),
    // The job's charge is metered, and its reservation settled, in the same transaction that ends it: never lost, never twice.
    async finish(id, holder, end) {
      const settled = await inTransaction(db, async (tx) => {
        const now = new Date();
        const ended = await finishJob(tx, id, holder, now.toISOString(), {
          status: end.status,
          units: end.units,
          reason: end.reason,
          result: end.result === undefined ? undefined : JSON.stringify(end.result),
          progress: end.progress === undefined ? undefined : JSON.stringify(end.progress),
        });
        if (!ended) return null;
        const job = await tx
          .selectFrom("jobs")
          .innerJoin("orgs", "orgs.id", "jobs.org_id")
          .leftJoin("api_keys", "api_keys.id", "jobs.api_key_id")
          .select(["jobs.org_id", "jobs.api_key_id", "jobs.kind", "jobs.started_at", "jobs.created_at", "jobs.reserved_units", "orgs.plan", "api_keys.mode"])
          .where("jobs.id", "=", id)
          .executeTakeFirstOrThrow();
        const payer = { orgId: job.org_id, plan: job.plan, mode: job.mode ?? ("live" as const) };
        const units = end.status === "failed" ? 0 : end.units;
        // Settled before the row is written: a counter created by the settling (a job ending in a later month) starts from the ledger without this row.
        const state = await settleQuota(tx, { payer, month: monthKey(job.created_at), units: job.reserved_units }, units, now);
        await insertUsageEvent(tx, {
          org_id: job.org_id,
          api_key_id: job.api_key_id,
          endpoint: `jobs.${job.kind}`,
          method: "JOB",
          status: end.status === "failed" ? 422 : 200,
          units,
          duration_ms: job.started_at ? now.getTime() - Date.parse(job.started_at) : 0,
          request_id: id,
          created_at: now.toISOString(),
          reported_at: null,
          mode: payer.mode,
        });
        return { state, orgId: job.org_id, units };
      });
      if (!settled) return false;
      if (settled.units > 0) await afterSettle(db, settled.state, settled.orgId).catch((e: unknown) => logError("allowance notice failed", e));
      return true;
    },
    async release(id, holder) {
      await releaseJob(db, id, holder, iso(Date.now()));
    },
  };
}
