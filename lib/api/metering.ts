import type { Db } from "@/db";
import { touchApiKey } from "@/db/queries/api-keys";
import { insertUsageEvent } from "@/db/queries/usage";
import type { KeyPrincipal } from "./auth";

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

/** One usage row per authenticated call; refused calls and replays are recorded with 0 units. */
export async function meter(db: Db, m: Metered): Promise<void> {
  const at = m.at.toISOString();
  await insertUsageEvent(db, {
    org_id: m.principal.orgId,
    api_key_id: m.principal.keyId,
    endpoint: m.endpoint,
    method: m.method,
    status: m.status,
    units: m.status < 400 ? m.units : 0,
    duration_ms: Math.round(m.durationMs * 1000) / 1000,
    request_id: m.requestId,
    created_at: at,
    reported_at: null,
  });
  const last = m.principal.lastUsedAt ? Date.parse(m.principal.lastUsedAt) : 0;
  if (m.at.getTime() - last >= TOUCH_EVERY_MS) await touchApiKey(db, m.principal.keyId, at);
}
