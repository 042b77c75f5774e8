import { createHash, randomBytes } from "node:crypto";
import type { Db } from "@/db";
import { claimIdempotencyKey, completeIdempotencyRecord, findIdempotencyRecord, releaseIdempotencyKey, takeOverIdempotencyKey } from "@/db/queries/idempotency";
import { poolLimits } from "@/lib/jobs/pool";
import { ApiError } from "./errors";
import { redactSecrets } from "./redact";

/** How long a stored response is replayed: 24 h. */
export const IDEMPOTENCY_TTL_MS = 24 * 3600 * 1000;
/** An Idempotency-Key: 1 to 255 visible ASCII characters. */
export const IDEMPOTENCY_KEY_PATTERN = /^[\x21-\x7e]{1,255}$/;

const leaseMargin = Number(process.env.PARITAS_IDEMPOTENCY_LEASE_MARGIN_MS);
/** What the lease adds to the per-task deadline, ms (PARITAS_IDEMPOTENCY_LEASE_MARGIN_MS, default 15 s): reading the body, waiting for the pool, database writes. */
export const IDEMPOTENCY_LEASE_MARGIN_MS = Number.isSafeInteger(leaseMargin) && leaseMargin > 0 ? leaseMargin : 15_000;
/**
 * How long a record stays "running" for the request that claimed it: the pool's per-task deadline plus the
 * margin, so a live request always finishes inside it (30 s by default). A record still running after its
 * lease was left by a server that stopped mid-request; the next retry with the same body takes it over and runs.
 */
export const IDEMPOTENCY_LEASE_MS = poolLimits.deadlineMs + IDEMPOTENCY_LEASE_MARGIN_MS;
/** Longest Retry-After of a 409: a live request usually answers well before its lease ends. */
const MAX_RETRY_AFTER_S = 5;

export interface StoredResponse {
  status: number;
  headers: Record<string, string>;
  body: string;
}

/** `holder` is the claim's token: pass it to finishIdempotent. */
export type IdempotencyOutcome = { kind: "claimed"; holder: string } | { kind: "replay"; response: StoredResponse };

/**
 * Claim an Idempotency-Key for this request, or find the response it already has.
 * Same key and same body → replay; same key, other body → 422; first request still running → 409,
 * unless its lease has run out: then this request takes the record over and runs.
 */
export async function beginIdempotent(
  db: Db,
  q: { orgId: number; key: string; endpoint: string; bodyText: string; now?: Date },
): Promise<IdempotencyOutcome> {
  if (!IDEMPOTENCY_KEY_PATTERN.test(q.key)) {
    throw new ApiError("bad-request", "Idempotency-Key must be 1 to 255 visible ASCII characters.");
  }
  // Idempotency keys are stored and quoted back; a secret sent as one (an API key in the wrong header) is refused unseen.
  if (redactSecrets(q.key) !== q.key) {
    throw new ApiError("bad-request", "Idempotency-Key looks like an API key or another credential. Send a random value of your own, such as a UUID, never a secret.");
  }
  const now = q.now ?? new Date();
  const requestHash = createHash("sha256").update(q.endpoint).update("\n").update(q.bodyText).digest("hex");
  const claim = {
    orgId: q.orgId,
    key: q.key,
    endpoint: q.endpoint,
    requestHash,
    holder: randomBytes(16).toString("hex"),
    now: now.toISOString(),
    leaseExpiresAt: new Date(now.getTime() + IDEMPOTENCY_LEASE_MS).toISOString(),
    expiresAt: new Date(now.getTime() + IDEMPOTENCY_TTL_MS).toISOString(),
  };
  if (await claimIdempotencyKey(db, claim)) return { kind: "claimed", holder: claim.holder };
  const rec = await findIdempotencyRecord(db, q.orgId, q.key);
  if (!rec) return beginIdempotent(db, q); // expired and purged between the two statements
  if (rec.request_hash !== requestHash) {
    throw new ApiError("idempotency-key-reused", `Idempotency-Key \`${q.key}\` was first used with another request body or endpoint.`);
  }
  if (rec.state === "running") {
    const leaseEnd = rec.lease_expires_at === null ? Infinity : Date.parse(rec.lease_expires_at);
    if (leaseEnd <= now.getTime()) {
      if (await takeOverIdempotencyKey(db, claim)) return { kind: "claimed", holder: claim.holder };
      // Another retry took it over (or it finished) in between: answer from what the record holds now.
      return beginIdempotent(db, { ...q, now });
    }
    const seconds = Math.ceil((leaseEnd - now.getTime()) / 1000);
    throw new ApiError(
      "conflict",
      `A request with Idempotency-Key \`${q.key}\` is still running. If the server running it stopped, a retry runs it again once its lease ends, in ${seconds} s.`,
      { headers: { "retry-after": String(Math.min(seconds, MAX_RETRY_AFTER_S)) } },
    );
  }
  return {
    kind: "replay",
    response: { status: rec.response_status ?? 200, headers: JSON.parse(rec.response_headers ?? "{}"), body: rec.response_body ?? "" },
  };
}

/**
 * Store the response for replay; server failures release the key so that a retry runs again. Both only while
 * `holder` still holds the record: a request that outlived its lease leaves the record to the retry that took it over.
 */
export async function finishIdempotent(db: Db, orgId: number, key: string, holder: string, response: StoredResponse): Promise<void> {
  if (response.status >= 500) await releaseIdempotencyKey(db, orgId, key, holder);
  else await completeIdempotencyRecord(db, orgId, key, holder, response);
}
