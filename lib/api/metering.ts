import { inTransaction, type Db } from "@/db";
import { touchApiKey } from "@/db/queries/api-keys";
import { insertUsageEvent } from "@/db/queries/usage";
import type { KeyPrincipal } from "./auth";
import { afterSettle, reserveQuota, settleQuota, type Payer, type QuotaState, type Reservation } from "./quota";
import { logError } from "@/lib/api/redact";

export interface Metered {
  principal: KeyPrincipal;
  endpoint: string;
  method: string;
  status: number;
  units: number;
  durationMs: number;
  requestId: string;
  at: Date;
}

// last_used_at is coarse on purpose: one write a minute per key, not one per request.
const TOUCH_EVERY_MS = 60_000;

/**
 * One usage row per authenticated call, and the quota reservation settled with what was charged, in one
 * transaction; refused calls and replays are recorded with 0 units (and give their reservation back).
 * Returns where the key's allowance stands after the call.
 */
export async function meter(db: Db, m: Metered, reservation?: Reservation): Promise<QuotaState> {
  const { principal: p } = m;
  const state = await recordUsage(db, { payer: { orgId: p.orgId, plan: p.plan, mode: p.mode }, keyId: p.keyId, endpoint: m.endpoint, method: m.method, status: m.status, units: m.units, durationMs: m.durationMs, requestId: m.requestId, at: m.at }, reservation);
  const last = p.lastUsedAt ? Date.parse(p.lastUsedAt) : 0;
  if (m.at.getTime() - last >= TOUCH_EVERY_MS) await touchApiKey(db, p.keyId, m.at.toISOString());
  return state;
}

/** A usage row (no key for work started in the console) with its reservation settled, in one transaction; then the allowance notices. */
export async function recordUsage(
  db: Db,
  u: { payer: Payer; keyId: number | null; endpoint: string; method: string; status: number; units: number; durationMs: number; requestId: string; at: Date },
  reservation?: Reservation,
): Promise<QuotaState> {
  const units = u.status < 400 ? u.units : 0;
  const held = reservation ?? (await reserveQuota(db, u.payer, 0, u.at));
  const state = await inTransaction(db, async (tx) => {
    // Settled before the row is written: a counter created by the settling starts from the ledger without this row.
    const after = await settleQuota(tx, held, units, u.at);
    await insertUsageEvent(tx, {
      org_id: u.payer.orgId,
      api_key_id: u.keyId,
      endpoint: u.endpoint,
      method: u.method,
      status: u.status,
      units,
      duration_ms: Math.round(u.durationMs * 1000) / 1000,
      request_id: u.requestId,
      created_at: u.at.toISOString(),
      reported_at: null,
      mode: u.payer.mode,
    });
    return after;
  });
  if (units > 0) void afterSettle(db, state, u.payer.orgId).catch((e: unknown) => logError("allowance notice failed", e));
  return state;
}
