import { getDb } from "@/db";
import { insertOrg } from "@/db/queries/orgs";
import { createKey } from "@/lib/api/key-service";
import { allScopes, type Scope } from "@/lib/api/scopes";
import type { PlanId } from "@/lib/billing/plans";

let counter = 0;

/**
 * A fresh org with one key; returns the plaintext key and ids. The org is on the largest plan unless told
 * otherwise, so suites about other things never run into a monthly allowance; the quota tests pick their plan.
 */
export async function makeOrgWithKey(opts: { scopes?: Scope[]; expiresAt?: string; mode?: "live" | "test"; plan?: PlanId } = {}) {
  const db = await getDb();
  const org = await insertOrg(db, { slug: `org-${process.pid}-${++counter}`, name: "Test org", plan: opts.plan ?? "lighthouse" });
  const { key, record } = await createKey(db, { orgId: org.id, name: "test key", mode: opts.mode ?? "test", scopes: opts.scopes ?? allScopes, expiresAt: opts.expiresAt ?? null }, "system");
  return { db, org, key, keyId: record.id, auth: `Bearer ${key}` };
}
