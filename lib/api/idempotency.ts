import { createHash } from "node:crypto";
import type { Db } from "@/db";
import { claimIdempotencyKey, completeIdempotencyRecord, findIdempotencyRecord, releaseIdempotencyKey } from "@/db/queries/idempotency";
import { ApiError } from "./errors";

/** How long a stored response is replayed: 24 h. */
export const IDEMPOTENCY_TTL_MS = 24 * 3600 * 1000;
/** An Idempotency-Key: 1 to 255 visible ASCII characters. */
export const IDEMPOTENCY_KEY_PATTERN = /^[\x21-\x7e]{1,255}$/;

export interface StoredResponse {
  status: number;
  headers: Record<string, string>;
  body: string;
}

export type IdempotencyOutcome = { kind: "claimed" } | { kind: "replay"; response: StoredResponse };

/**
 * Claim an Idempotency-Key for this request, or find the response it already has.
 * Same key and same body → replay; same key, other body → 422; first request still running → 409.
 */
export async function beginIdempotent(
  db: Db,
  q: { orgId: number; key: string; endpoint: string; bodyText: string; now?: Date },
): Promise<IdempotencyOutcome> {
  if (!IDEMPOTENCY_KEY_PATTERN.test(q.key)) {
    throw new ApiError("bad-request", "Idempotency-Key must be 1 to 255 visible ASCII characters.");
  }
  const now = q.now ?? new Date();
  const requestHash = createHash("sha256").update(q.endpoint).update("\n").update(q.bodyText).digest("hex");
  const claimed = await claimIdempotencyKey(db, {
    orgId: q.orgId,
    key: q.key,
    endpoint: q.endpoint,
    requestHash,
    now: now.toISOString(),
    expiresAt: new Date(now.getTime() + IDEMPOTENCY_TTL_MS).toISOString(),
  });
  if (claimed) return { kind: "claimed" };
  const rec = await findIdempotencyRecord(db, q.orgId, q.key);
  if (!rec) return beginIdempotent(db, q); // expired and purged between the two statements
  if (rec.request_hash !== requestHash) {
    throw new ApiError("idempotency-key-reused", `Idempotency-Key \`${q.key}\` was first used with another request body or endpoint.`);
  }
  if (rec.state === "running") {
    throw new ApiError("conflict", `A request with Idempotency-Key \`${q.key}\` is still running.`, { headers: { "retry-after": "1" } });
  }
  return {
    kind: "replay",
    response: { status: rec.response_status ?? 200, headers: JSON.parse(rec.response_headers ?? "{}"), body: rec.response_body ?? "" },
  };
}

/** Store the response for replay; server failures release the key so that a retry runs again. */
export async function finishIdempotent(db: Db, orgId: number, key: string, response: StoredResponse): Promise<void> {
  if (response.status >= 500) await releaseIdempotencyKey(db, orgId, key);
  else await completeIdempotencyRecord(db, orgId, key, response);
}
