import type { Db } from "@/db";
import type { IdempotencyRecord } from "@/db/schema";

export const findIdempotencyRecord = (db: Db, orgId: number, key: string): Promise<IdempotencyRecord | undefined> =>
  db.selectFrom("idempotency_records").selectAll().where("org_id", "=", orgId).where("idem_key", "=", key).executeTakeFirst();

export interface IdempotencyClaim {
  orgId: number;
  key: string;
  endpoint: string;
  requestHash: string;
  /** Random token of the claiming request. */
  holder: string;
  now: string;
  leaseExpiresAt: string;
  expiresAt: string;
}

/** Claim a key for a running request; false when another request holds it already. */
export async function claimIdempotencyKey(db: Db, r: IdempotencyClaim): Promise<boolean> {
  // Expired records are dead: clear this key's one so it can be claimed again.
  await db.deleteFrom("idempotency_records").where("org_id", "=", r.orgId).where("idem_key", "=", r.key).where("expires_at", "<=", r.now).execute();
  const res = await db
    .insertInto("idempotency_records")
    .values({
      org_id: r.orgId,
      idem_key: r.key,
      endpoint: r.endpoint,
      request_hash: r.requestHash,
      state: "running",
      holder: r.holder,
      lease_expires_at: r.leaseExpiresAt,
      created_at: r.now,
      expires_at: r.expiresAt,
    })
    .onConflict((oc) => oc.columns(["org_id", "idem_key"]).doNothing())
    .executeTakeFirst();
  return Number(res.numInsertedOrUpdatedRows ?? 0) === 1;
}

/**
 * Take over a record whose holder's lease has run out (its server stopped mid-request), for the same request.
 * One conditional update: of several retries racing for the record, exactly one sees it abandoned and wins.
 */
export async function takeOverIdempotencyKey(db: Db, r: IdempotencyClaim): Promise<boolean> {
  const res = await db
    .updateTable("idempotency_records")
    .set({ holder: r.holder, lease_expires_at: r.leaseExpiresAt, created_at: r.now, expires_at: r.expiresAt })
    .where("org_id", "=", r.orgId)
    .where("idem_key", "=", r.key)
    .where("request_hash", "=", r.requestHash)
    .where("state", "=", "running")
    .where("lease_expires_at", "<=", r.now)
    .executeTakeFirst();
  return Number(res.numUpdatedRows) === 1;
}

/** Store the response of the request that holds the record; false when it lost the record (its lease ran out and a retry took over). */
export async function completeIdempotencyRecord(
  db: Db,
  orgId: number,
  key: string,
  holder: string,
  response: { status: number; headers: Record<string, string>; body: string },
): Promise<boolean> {
  const res = await db
    .updateTable("idempotency_records")
    .set({ state: "done", response_status: response.status, response_headers: JSON.stringify(response.headers), response_body: response.body })
    .where("org_id", "=", orgId)
    .where("idem_key", "=", key)
    .where("holder", "=", holder)
    .where("state", "=", "running")
    .executeTakeFirst();
  return Number(res.numUpdatedRows) === 1;
}

/** Free a running record so that a retry runs again; only its holder may. */
export const releaseIdempotencyKey = (db: Db, orgId: number, key: string, holder: string) =>
  db.deleteFrom("idempotency_records").where("org_id", "=", orgId).where("idem_key", "=", key).where("holder", "=", holder).where("state", "=", "running").execute();

export const purgeExpiredIdempotency = (db: Db, now: string) =>
  db.deleteFrom("idempotency_records").where("expires_at", "<=", now).execute();
