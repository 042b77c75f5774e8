import type { Db } from "@/db";
import type { Claim } from "@/db/schema";

export const insertClaim = (db: Db, claim: Claim) => db.insertInto("claims").values(claim).execute();

export const findClaim = (db: Db, orgId: number, id: string) => db.selectFrom("claims").selectAll().where("org_id", "=", orgId).where("id", "=", id).executeTakeFirst();

/** The org's claims, newest first (one label's when given), after the cursor's (created_at, id). */
export function listClaims(db: Db, orgId: number, q: { label?: string; verdict?: string; limit: number; before?: { createdAt: string; id: string } }) {
  let sel = db.selectFrom("claims").selectAll().where("org_id", "=", orgId);
  if (q.label !== undefined) sel = sel.where("label", "=", q.label);
  if (q.verdict !== undefined) sel = sel.where("verdict", "=", q.verdict as Claim["verdict"]);
  const before = q.before;
  if (before) sel = sel.where((eb) => eb.or([eb("created_at", "<", before.createdAt), eb.and([eb("created_at", "=", before.createdAt), eb("id", "<", before.id)])]));
  return sel.orderBy("created_at", "desc").orderBy("id", "desc").limit(q.limit).execute();
}
