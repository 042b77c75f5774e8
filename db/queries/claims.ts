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

/**
 * The org's labels, most recently claimed first: each with its claim count per verdict, its latest claim's
 * time and verdict (the newest by (created_at, id), the order listClaims pages in).
 */
export function claimLabels(db: Db, orgId: number, limit: number) {
  return db
    .selectFrom("claims as c")
    .where("c.org_id", "=", orgId)
    .groupBy("c.label")
    .select((eb) => [
      "c.label",
      eb.fn.countAll<number>().as("total"),
      eb.fn.max("c.created_at").as("latestAt"),
      eb.fn.sum<number>(eb.case().when("c.verdict", "=", "supported").then(1).else(0).end()).as("supported"),
      eb.fn.sum<number>(eb.case().when("c.verdict", "=", "refuted").then(1).else(0).end()).as("refuted"),
      eb.fn.sum<number>(eb.case().when("c.verdict", "=", "inconclusive").then(1).else(0).end()).as("inconclusive"),
      eb.fn.sum<number>(eb.case().when("c.verdict", "=", "pending").then(1).else(0).end()).as("pending"),
      eb
        .selectFrom("claims as l")
        .select("l.verdict")
        .whereRef("l.org_id", "=", "c.org_id")
        .whereRef("l.label", "=", "c.label")
        .orderBy("l.created_at", "desc")
        .orderBy("l.id", "desc")
        .limit(1)
        .as("latestVerdict"),
    ])
    .orderBy("latestAt", "desc")
    .orderBy("c.label")
    .limit(limit)
    .execute();
}

/** Write a pending claim's verdict, once: a claim already decided is left as it is. */
export const settleClaim = (db: Db, id: string, verdict: Claim["verdict"], outcome: string, decidedAt: string) =>
  db.updateTable("claims").set({ verdict, outcome, decided_at: decidedAt }).where("id", "=", id).where("verdict", "=", "pending").execute();
