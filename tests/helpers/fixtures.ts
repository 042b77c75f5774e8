import { getDb } from "@/db";
import { insertOrg } from "@/db/queries/orgs";
import { createKey } from "@/lib/api/key-service";
import { allScopes, type Scope } from "@/lib/api/scopes";

let counter = 0;

/** A fresh org with one key; returns the plaintext key and ids. */
export async function makeOrgWithKey(opts: { scopes?: Scope[]; expiresAt?: string; mode?: "live" | "test" } = {}) {
  const db = await getDb();
  const org = await insertOrg(db, { slug: `org-${process.pid}-${++counter}`, name: "Test org" });
  const { key, record } = await createKey(db, { orgId: org.id, name: "test key", mode: opts.mode ?? "test", scopes: opts.scopes ?? allScopes, expiresAt: opts.expiresAt ?? null }, "system");
  return { db, org, key, keyId: record.id, auth: `Bearer ${key}` };
}
