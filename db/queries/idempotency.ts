import type { Db } from "@/db";
import type { IdempotencyRecord } from "@/db/schema";

export const findIdempotencyRecord = (db: Db, orgId: number, key: string): Promise<IdempotencyRecord | undefined> =>
  db.selectFrom("idempotency_records").selectAll().where("org_id", "=", orgId).where("idem_key", "=", key).executeTakeFirst();

/** Claim a key for a running request; false when another request holds it already. */
export async function claimIdempotencyKey(
  db: Db,
  r: { orgId: number; key: string; endpoint: string; requestHash: string; now: string; expiresAt: string },
): Promise<boolean> {
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
      created_at: r.now,
      expires_at: r.expiresAt,
    })
    .onConflict((oc) => oc.columns(["org_id", "idem_key"]).doNothing())
    .executeTakeFirst();
  return Number(res.numInsertedOrUpdatedRows ?? 0) === 1;
}

export const completeIdempotencyRecord = (
  db: Db,
  orgId: number,
  key: string,
  response: { status: number; headers: Record<string, string>; body: string },
) =>
  db
    .updateTable("idempotency_records")
    .set({ state: "done", response_status: response.status, response_headers: JSON.stringify(response.headers), response_body: response.body })
    .where("org_id", "=", orgId)
    .where("idem_key", "=", key)
    .execute();

export const releaseIdempotencyKey = (db: Db, orgId: number, key: string) =>
  db.deleteFrom("idempotency_records").where("org_id", "=", orgId).where("idem_key", "=", key).where("state", "=", "running").execute();

export const purgeExpiredIdempotency = (db: Db, now: string) =>
  db.deleteFrom("idempotency_records").where("expires_at", "<=", now).execute();
