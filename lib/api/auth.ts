import type { Db } from "@/db";
import { findApiKeyByHash } from "@/db/queries/api-keys";
import type { KeyMode } from "@/db/schema";
import { ApiError } from "./errors";
import { keyState } from "./key-service";
import { hashKey, hashesEqual, isWellFormedKey } from "./keys";
import type { Scope } from "./scopes";

export interface KeyPrincipal {
  keyId: number;
  orgId: number;
  orgSlug: string;
  plan: string;
  mode: KeyMode;
  scopes: Scope[];
  lastUsedAt: string | null;
}

const challenge = { "www-authenticate": 'Bearer realm="paritas"' };
const unauthenticated = (detail: string) => new ApiError("unauthenticated", detail, { headers: challenge });

/** Resolve `Authorization: Bearer <key>` to the key and its org, or throw a 401 problem. */
export async function authenticate(db: Db, header: string | null, now = new Date()): Promise<KeyPrincipal> {
  if (!header) throw unauthenticated("No Authorization header. Send `Authorization: Bearer <key>`.");
  const m = /^Bearer\s+(\S+)\s*$/i.exec(header);
  if (!m) throw unauthenticated("The Authorization header must have the form `Bearer <key>`.");
  const key = m[1]!;
  if (!isWellFormedKey(key)) throw unauthenticated("The API key is malformed: it is not a Paritas key, or it was mistyped (its checksum does not match).");
  const hash = hashKey(key);
  const row = await findApiKeyByHash(db, hash);
  if (!row || !hashesEqual(row.key_hash, hash)) throw unauthenticated("The API key is not known.");
  const state = keyState(row, now);
  if (state === "revoked") throw unauthenticated("The API key has been revoked.");
  if (state === "expired") throw unauthenticated("The API key has expired.");
  return {
    keyId: row.id,
    orgId: row.org_id,
    orgSlug: row.org_slug,
    plan: row.org_plan,
    mode: row.mode,
    scopes: row.scopes.split(" ").filter(Boolean) as Scope[],
    lastUsedAt: row.last_used_at,
  };
}

export function requireScope(p: KeyPrincipal, scope: Scope): void {
  if (!p.scopes.includes(scope)) {
    throw new ApiError("forbidden", `This operation needs the scope \`${scope}\`; the key has ${p.scopes.length ? p.scopes.map((s) => `\`${s}\``).join(", ") : "no scopes"}.`);
  }
}
