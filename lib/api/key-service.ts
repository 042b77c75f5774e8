import type { Db } from "@/db";
import { inTransaction, nowIso } from "@/db";
import { insertAudit } from "@/db/queries/audit";
import { findApiKeyById, insertApiKey, listApiKeys, updateApiKey } from "@/db/queries/api-keys";
import type { ApiKey, KeyMode, KeyPurpose } from "@/db/schema";
import { generateKey } from "./keys";
import type { Scope } from "./scopes";

export interface CreateKeyInput {
  orgId: number;
  name: string;
  mode: KeyMode;
  scopes: Scope[];
  expiresAt?: string | null;
  createdByUserId?: number | null;
  purpose?: KeyPurpose;
}

/** Generate a key and store its hash, without an audit row: the caller writes the one that fits (created, rotated). */
export async function storeNewKey(db: Db, input: CreateKeyInput & { rotatedFromKeyId?: number }): Promise<{ key: string; record: ApiKey }> {
  const { key, prefix, hash } = generateKey(input.mode);
  const record = await insertApiKey(db, {
    org_id: input.orgId,
    name: input.name,
    mode: input.mode,
    prefix,
    key_hash: hash,
    scopes: input.scopes.join(" "),
    created_by_user_id: input.createdByUserId ?? null,
    created_at: nowIso(),
    expires_at: input.expiresAt ?? null,
    rotated_from_key_id: input.rotatedFromKeyId ?? null,
    purpose: input.purpose ?? "api",
  });
  return { key, record };
}

/** Create a key and its audit row in one transaction. The plaintext key is returned once and never stored. */
export async function createKey(db: Db, input: CreateKeyInput, actor: string): Promise<{ key: string; record: ApiKey }> {
  return inTransaction(db, async (tx) => {
    const created = await storeNewKey(tx, input);
    const row = created.record;
    await insertAudit(tx, {
      orgId: input.orgId,
      actor,
      action: "key.created",
      targetType: "api_key",
      targetId: row.id,
      details: { name: row.name, mode: row.mode, prefix: row.prefix, scopes: input.scopes, expiresAt: row.expires_at },
    });
    return created;
  });
}

/** Revoke a key now; its audit row is written in the same transaction. Undefined if the org has no such key. */
export async function revokeKey(db: Db, orgId: number, keyId: number, actor: string): Promise<ApiKey | undefined> {
  return inTransaction(db, async (tx) => {
    const existing = await findApiKeyById(tx, orgId, keyId);
    if (!existing) return undefined;
    if (existing.revoked_at) return existing;
    const row = await updateApiKey(tx, orgId, keyId, { revoked_at: nowIso() });
    await insertAudit(tx, { orgId, actor, action: "key.revoked", targetType: "api_key", targetId: keyId, details: { prefix: existing.prefix } });
    return row;
  });
}

export type KeyState = "active" | "expired" | "revoked";

export function keyState(k: Pick<ApiKey, "revoked_at" | "expires_at">, now = new Date()): KeyState {
  if (k.revoked_at && k.revoked_at <= now.toISOString()) return "revoked";
  if (k.expires_at && k.expires_at <= now.toISOString()) return "expired";
  return "active";
}

export const listKeys = listApiKeys;
