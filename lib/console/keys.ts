import { z } from "zod";
import { inTransaction, nowIso, type Db } from "@/db";
import { findBenchCredential, findKeyWithCreator, listKeysWithCreator, revokeBenchCredentials, updateApiKey, type KeyWithCreator } from "@/db/queries/api-keys";
import { insertAudit } from "@/db/queries/audit";
import { listOwnerEmails } from "@/db/queries/members";
import type { KeyMode, Org } from "@/db/schema";
import { ApiError } from "@/lib/api/errors";
import { createKey, keyState, revokeKey, storeNewKey, type KeyState } from "@/lib/api/key-service";
import { generateKey } from "@/lib/api/keys";
import { allScopes, type Scope } from "@/lib/api/scopes";
import { HOUR_MS, actorOf, type Caller } from "./common";
import type { Mail } from "@/lib/mail/send";
import { deliver, keyNotices, type KeyEvent } from "./notices";
import { MAX_OVERLAP_MINUTES, oldKeyEndsAt } from "./overlap";

export const BENCH_CREDENTIAL = { name: "bench credential", scopes: ["compute", "usage:read", "claims"] as Scope[], ttlMs: HOUR_MS };

const scopeSchema = z.enum(allScopes);

export const newKeyInput = z.strictObject({
  name: z.string().trim().min(1).max(80),
  scopes: z
    .array(scopeSchema)
    .min(1, "Give the key at least one scope.")
    .transform((s) => [...new Set(s)]),
  mode: z.enum(["test", "live"]),
  // Stored as toISOString(): expiry checks compare timestamps as text.
  expiresAt: z.iso
    .datetime({ offset: true })
    .refine((s) => Date.parse(s) > Date.now(), "Must lie in the future.")
    .transform((s) => new Date(s).toISOString())
    .nullish(),
});
export type NewKeyInput = z.input<typeof newKeyInput>;
const overlapIn = (unit: "minutes" | "hours", max: number) =>
  z
    .number({ error: `The overlap must be a whole number of ${unit}.` })
    .int(`The overlap must be a whole number of ${unit}.`)
    .min(0, "The overlap cannot be negative.")
    .max(max, `The overlap is at most ${max} ${unit} (7 days).`);
/**
 * The overlap in minutes, 0 to MAX_OVERLAP_MINUTES; `overlapHours` (whole hours, same bound)
 * is still accepted from clients written before minutes were offered. Exactly one of the two.
 */
export const rotateInput = z
  .strictObject({
    overlapMinutes: overlapIn("minutes", MAX_OVERLAP_MINUTES).optional(),
    overlapHours: overlapIn("hours", MAX_OVERLAP_MINUTES / 60).optional(),
  })
  .superRefine((v, ctx) => {
    if ((v.overlapMinutes === undefined) === (v.overlapHours === undefined)) {
      ctx.addIssue({ code: "custom", path: ["overlapMinutes"], message: "Give the overlap as overlapMinutes (or overlapHours), exactly one of them." });
    }
  })
  .transform((v) => v.overlapMinutes ?? v.overlapHours! * 60);

export type ConsoleKeyState = KeyState | "expiring";

export interface KeyRecord {
  id: number;
  name: string;
  prefix: string;
  mode: KeyMode;
  scopes: string[];
  createdBy: { id: number; email: string } | null;
  createdAt: string;
  lastUsedAt: string | null;
  expiresAt: string | null;
  revokedAt: string | null;
  state: ConsoleKeyState;
  rotatedFromKeyId: number | null;
}

/** "expiring": still active, with its end set by a rotation (a newer key replaced it). */
function consoleState(k: KeyWithCreator, now: Date): ConsoleKeyState {
  const s = keyState(k, now);
  return s === "active" && k.expires_at !== null && Boolean(k.replaced) ? "expiring" : s;
}

function keyRecord(k: KeyWithCreator, now = new Date()): KeyRecord {
  return {
    id: k.id,
    name: k.name,
    prefix: k.prefix,
    mode: k.mode,
    scopes: k.scopes.split(" ").filter(Boolean),
    createdBy: k.created_by_user_id !== null && k.created_by_email !== null ? { id: k.created_by_user_id, email: k.created_by_email } : null,
    createdAt: k.created_at,
    lastUsedAt: k.last_used_at,
    expiresAt: k.expires_at,
    revokedAt: k.revoked_at,
    state: consoleState(k, now),
    rotatedFromKeyId: k.rotated_from_key_id,
  };
}

/** Owners see every key of the org; developers only the keys they created. */
const visibleTo = (caller: Caller) => (caller.role === "owner" ? undefined : caller.id);

export async function listOrgKeys(db: Db, org: Org, caller: Caller): Promise<KeyRecord[]> {
  const now = new Date();
  return (await listKeysWithCreator(db, org.id, visibleTo(caller))).map((k) => keyRecord(k, now));
}

/** A key the caller may act on; another org's key, or for a developer another member's, is not there (404). */
export async function visibleKey(db: Db, org: Org, caller: Caller, id: number): Promise<KeyWithCreator> {
  const k = await findKeyWithCreator(db, org.id, id);
  const mine = visibleTo(caller);
  if (!k || (mine !== undefined && k.created_by_user_id !== mine)) throw new ApiError("not-found", `No key ${id} in ${org.slug} that you can manage.`);
  return k;
}

async function recordOf(db: Db, org: Org, id: number): Promise<KeyRecord> {
  return keyRecord((await findKeyWithCreator(db, org.id, id))!);
}

const eventOf = (k: { prefix: string; name: string; mode: KeyMode }) => ({ prefix: k.prefix, name: k.name, mode: k.mode });

export async function createOrgKey(db: Db, org: Org, caller: Caller, input: z.output<typeof newKeyInput>): Promise<{ key: string; record: KeyRecord }> {
  const out = await inTransaction(db, async (tx) => {
    const { key, record } = await createKey(tx, { orgId: org.id, name: input.name, mode: input.mode, scopes: input.scopes, expiresAt: input.expiresAt ?? null, createdByUserId: caller.id }, actorOf(caller));
    return { key, record: await recordOf(tx, org, record.id), owners: await listOwnerEmails(tx, org.id) };
  });
  deliver(keyNotices(out.owners, org, caller.email, { kind: "created", ...eventOf(out.record) }));
  return { key: out.key, record: out.record };
}

/**
 * Replace a key by a new one with the same name, scopes and mode. The old key keeps working for
 * `overlapMinutes` (0: it stops at once), never longer than it would have anyway. The new key belongs
 * to the old key's creator, so a developer still sees a key an owner rotated for them.
 */
export async function rotateOrgKey(db: Db, org: Org, caller: Caller, id: number, overlapMinutes: number) {
  const now = new Date();
  const out = await inTransaction(db, async (tx) => {
    const old = await visibleKey(tx, org, caller, id);
    const state = keyState(old, now);
    if (state !== "active") throw new ApiError("key-inactive", `Key ${old.prefix}… is ${state}; only an active key can be rotated.`);
    const oldEndsAt = oldKeyEndsAt(now, overlapMinutes, old.expires_at);
    await updateApiKey(tx, org.id, old.id, { expires_at: oldEndsAt });
    const { key, record } = await storeNewKey(tx, {
      orgId: org.id,
      name: old.name,
      mode: old.mode,
      scopes: old.scopes.split(" ").filter(Boolean) as Scope[],
      createdByUserId: old.created_by_user_id ?? caller.id,
      rotatedFromKeyId: old.id,
    });
    await insertAudit(tx, {
      orgId: org.id,
      actor: actorOf(caller),
      action: "key.rotated",
      targetType: "api_key",
      targetId: old.id,
      // overlapHours kept beside the minutes: audit readers from before minutes look for it.
      details: { prefix: old.prefix, newKeyId: record.id, newPrefix: record.prefix, overlapMinutes, overlapHours: overlapMinutes / 60, oldKeyEndsAt: oldEndsAt },
    });
    return { key, record: await recordOf(tx, org, record.id), previous: { id: old.id, expiresAt: oldEndsAt }, old, owners: await listOwnerEmails(tx, org.id) };
  });
  const event: KeyEvent = { kind: "rotated", ...eventOf(out.old), newPrefix: out.record.prefix, oldKeyEndsAt: out.previous.expiresAt };
  deliver(keyNotices(out.owners, org, caller.email, event));
  return { key: out.key, record: out.record, previous: out.previous };
}

/** Revoke a key at once. Revoking a revoked key changes nothing and notifies no one. */
export async function revokeOrgKey(db: Db, org: Org, caller: Caller, id: number): Promise<{ record: KeyRecord }> {
  const out = await inTransaction(db, async (tx) => {
    const k = await visibleKey(tx, org, caller, id);
    const changed = k.revoked_at === null;
    if (changed) await revokeKey(tx, org.id, id, actorOf(caller));
    return { record: await recordOf(tx, org, id), k, owners: changed ? await listOwnerEmails(tx, org.id) : [] };
  });
  deliver(keyNotices(out.owners, org, caller.email, { kind: "revoked", ...eventOf(out.k) }));
  return { record: out.record };
}

/**
 * Inside the caller's transaction: revoke every key `userId` created in the org that still works
 * (active or in a rotation overlap), audited one by one. Returns them with the owners' notices,
 * which the caller delivers after the commit.
 */
export async function revokeKeysCreatedBy(tx: Db, org: Org, caller: Caller, userId: number): Promise<{ keys: { id: number; prefix: string; name: string }[]; mails: Mail[] }> {
  const now = new Date();
  const working = (await listKeysWithCreator(tx, org.id, userId)).filter((k) => keyState(k, now) === "active");
  for (const k of working) await revokeKey(tx, org.id, k.id, actorOf(caller));
  const owners = working.length ? await listOwnerEmails(tx, org.id) : [];
  return {
    keys: working.map((k) => ({ id: k.id, prefix: k.prefix, name: k.name })),
    mails: working.flatMap((k) => keyNotices(owners, org, caller.email, { kind: "revoked", ...eventOf(k) })),
  };
}

/**
 * The caller's bench credential: one per person and org, a test key for compute, usage:read and claims
 * that lasts an hour from its latest renewal. Only a hash is stored, so a renewal gives the same
 * row a new secret (any earlier one stops); the first issue is audited, renewals are not. Owners
 * get no mail for it, and it is kept out of the keys list: it is not a key anyone manages.
 */
export async function issueBenchCredential(db: Db, org: Org, caller: Caller): Promise<{ key: string; expiresAt: string; holder: number }> {
  const expiresAt = new Date(Date.now() + BENCH_CREDENTIAL.ttlMs).toISOString();
  return inTransaction(db, async (tx) => {
    const held = await findBenchCredential(tx, org.id, caller.id);
    if (held) {
      const { key, prefix, hash } = generateKey("test");
      await updateApiKey(tx, org.id, held.id, { key_hash: hash, prefix, expires_at: expiresAt });
      return { key, expiresAt, holder: caller.id };
    }
    const { key, record } = await storeNewKey(tx, {
      orgId: org.id,
      name: BENCH_CREDENTIAL.name,
      mode: "test",
      scopes: BENCH_CREDENTIAL.scopes,
      expiresAt,
      createdByUserId: caller.id,
      purpose: "bench",
    });
    await insertAudit(tx, {
      orgId: org.id,
      actor: actorOf(caller),
      action: "bench.credential_issued",
      targetType: "user",
      targetId: caller.id,
      details: { email: caller.email, keyId: record.id, scopes: BENCH_CREDENTIAL.scopes, hours: BENCH_CREDENTIAL.ttlMs / HOUR_MS },
    });
    return { key, expiresAt, holder: caller.id };
  });
}

/** Inside the caller's transaction: the member's bench credential stops (they left, or their role no longer has the bench). */
export const endBenchCredential = (tx: Db, org: Org, userId: number) => revokeBenchCredentials(tx, org.id, userId, nowIso());
