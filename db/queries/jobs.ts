import { sql } from "kysely";
import { inTransaction, type Db } from "@/db";
import { adjustUnits, monthKey } from "./quota";
import type { Job, NewJob } from "@/db/schema";

export const insertJob = (db: Db, job: NewJob) => db.insertInto("jobs").values(job).execute();

export const findJob = (db: Db, orgId: number, id: string) => db.selectFrom("jobs").selectAll().where("org_id", "=", orgId).where("id", "=", id).executeTakeFirst();

/** The org's jobs of a kind, newest first, after the cursor's (created_at, id) when given. */
export const listJobs = (db: Db, orgId: number, kind: string, limit: number, before?: { createdAt: string; id: string }) => {
  let q = db.selectFrom("jobs").selectAll().where("org_id", "=", orgId).where("kind", "=", kind);
  if (before) q = q.where((eb) => eb.or([eb("created_at", "<", before.createdAt), eb.and([eb("created_at", "=", before.createdAt), eb("id", "<", before.id)])]));
  return q.orderBy("created_at", "desc").orderBy("id", "desc").limit(limit).execute();
};

/** Jobs of the org not finished yet (the concurrency budget counts them). */
export const countUnfinishedJobs = async (db: Db, orgId: number) =>
  Number((await db.selectFrom("jobs").select((eb) => eb.fn.countAll<number>().as("n")).where("org_id", "=", orgId).where("status", "in", ["queued", "running"]).executeTakeFirstOrThrow()).n);

/**
 * Take the oldest job a runner may run — queued, or running under a lease that has passed (its runner
 * stopped) — in one statement, so two runners never take the same job.
 */
export const claimJob = (db: Db, holder: string, now: string, leaseEnds: string): Promise<Job | undefined> =>
  db
    .updateTable("jobs")
    .set((eb) => ({ status: "running", lease_holder: holder, lease_expires_at: leaseEnds, attempts: eb("attempts", "+", 1), started_at: sql`coalesce(started_at, ${now})`, updated_at: now }))
    .where(
      "id",
      "=",
      db
        .selectFrom("jobs")
        .select("id")
        .where((eb) => eb.or([eb("status", "=", "queued"), eb.and([eb("status", "=", "running"), eb("lease_expires_at", "<", now)])]))
        .orderBy("created_at")
        .orderBy("id")
        .limit(1),
    )
    .returningAll()
    .executeTakeFirst();

/** Extend the holder's lease and write progress; undefined when the holder lost the job. */
export const renewJob = (db: Db, id: string, holder: string, now: string, leaseEnds: string, progress?: string) =>
  db
    .updateTable("jobs")
    .set({ lease_expires_at: leaseEnds, updated_at: now, ...(progress !== undefined ? { progress } : {}) })
    .where("id", "=", id)
    .where("lease_holder", "=", holder)
    .where("status", "=", "running")
    .returning(["cancel_requested_at"])
    .executeTakeFirst();

export const listJobChunks = (db: Db, id: string) => db.selectFrom("job_chunks").selectAll().where("job_id", "=", id).orderBy("point").orderBy("chunk").execute();

/** Store a folded chunk, only while `holder` holds the job (a runner that lost it writes nothing). */
export async function insertJobChunk(db: Db, id: string, holder: string, point: number, chunk: number, counts: string): Promise<boolean> {
  const res = await sql`insert or ignore into job_chunks (job_id, point, chunk, counts)
    select ${id}, ${point}, ${chunk}, ${counts} where exists (select 1 from jobs where id = ${id} and lease_holder = ${holder} and status = 'running')`.execute(db);
  return Number(res.numAffectedRows ?? 0) > 0;
}

/** End the holder's job; false when it had lost it. */
export const finishJob = async (db: Db, id: string, holder: string, now: string, end: { status: "done" | "cancelled" | "failed"; result?: string; progress?: string; reason?: string; units: number }) =>
  Number(
    (
      await db
        .updateTable("jobs")
        .set({ status: end.status, result: end.result ?? null, reason: end.reason ?? null, units: end.units, ...(end.progress !== undefined ? { progress: end.progress } : {}), lease_holder: null, lease_expires_at: null, finished_at: now, updated_at: now })
        .where("id", "=", id)
        .where("lease_holder", "=", holder)
        .where("status", "=", "running")
        .executeTakeFirst()
    ).numUpdatedRows,
  ) === 1;

/** Give the holder's job back to the queue (a runner shutting down): any runner may take it at once. */
export const releaseJob = (db: Db, id: string, holder: string, now: string) =>
  db.updateTable("jobs").set({ status: "queued", lease_holder: null, lease_expires_at: null, updated_at: now }).where("id", "=", id).where("lease_holder", "=", holder).where("status", "=", "running").execute();

/**
 * Cancel: a queued job ends at once; a running one is marked and its runner ends it (within a second).
 * Returns the job as it stands after the call, undefined if the org has no such job.
 */
export async function requestCancel(db: Db, orgId: number, id: string, now: string): Promise<Job | undefined> {
  await inTransaction(db, async (tx) => {
    // A job cancelled before it started ran nothing: the units it held from the allowance go back at once.
    const dropped = await tx
      .updateTable("jobs")
      .set({ status: "cancelled", reason: "Cancelled before it started.", finished_at: now, updated_at: now })
      .where("org_id", "=", orgId)
      .where("id", "=", id)
      .where("status", "=", "queued")
      .returning(["reserved_units", "created_at", "api_key_id"])
      .executeTakeFirst();
    if (dropped && dropped.reserved_units > 0) {
      const key = dropped.api_key_id === null ? undefined : await tx.selectFrom("api_keys").select("mode").where("id", "=", dropped.api_key_id).executeTakeFirst();
      await adjustUnits(tx, { orgId, mode: key?.mode ?? "live", month: monthKey(dropped.created_at), delta: -dropped.reserved_units });
    }
    await tx.updateTable("jobs").set({ cancel_requested_at: now, updated_at: now }).where("org_id", "=", orgId).where("id", "=", id).where("status", "=", "running").where("cancel_requested_at", "is", null).execute();
  });
  return findJob(db, orgId, id);
}
