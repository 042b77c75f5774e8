import type { Insertable } from "kysely";
import type { Db } from "@/db";
import type { InvitationTable } from "@/db/schema";

export const insertInvitation = (db: Db, inv: Insertable<InvitationTable>) =>
  db.insertInto("invitations").values(inv).returningAll().executeTakeFirstOrThrow();

/** The invitation a link's token hash names, with its org's slug and name. */
export const findInvitationByTokenHash = (db: Db, tokenHash: string) =>
  db
    .selectFrom("invitations")
    .innerJoin("orgs", "orgs.id", "invitations.org_id")
    .selectAll("invitations")
    .select(["orgs.slug as org_slug", "orgs.name as org_name"])
    .where("invitations.token_hash", "=", tokenHash)
    .executeTakeFirst();

export const findInvitation = (db: Db, orgId: number, id: number) =>
  db.selectFrom("invitations").selectAll().where("org_id", "=", orgId).where("id", "=", id).executeTakeFirst();

/** Invitations neither accepted nor revoked (expired ones included: the owner sees them lapse), oldest first, with the inviter's e-mail. */
export const listPendingInvitations = (db: Db, orgId: number) =>
  db
    .selectFrom("invitations")
    .leftJoin("users", "users.id", "invitations.invited_by_user_id")
    .selectAll("invitations")
    .select("users.email as invited_by_email")
    .where("invitations.org_id", "=", orgId)
    .where("invitations.accepted_at", "is", null)
    .where("invitations.revoked_at", "is", null)
    .orderBy("invitations.id")
    .execute();

/** Mark a pending invitation accepted; false when it was accepted or revoked meanwhile (single use). */
export async function markInvitationAccepted(db: Db, id: number, at: string): Promise<boolean> {
  const res = await db
    .updateTable("invitations")
    .set({ accepted_at: at })
    .where("id", "=", id)
    .where("accepted_at", "is", null)
    .where("revoked_at", "is", null)
    .executeTakeFirst();
  return Number(res.numUpdatedRows) === 1;
}

/** Revoke the org's pending invitations of one id, or of one e-mail address; returns the ids revoked. */
export async function revokePendingInvitations(db: Db, orgId: number, which: { id: number } | { email: string }, at: string): Promise<number[]> {
  let q = db
    .updateTable("invitations")
    .set({ revoked_at: at })
    .where("org_id", "=", orgId)
    .where("accepted_at", "is", null)
    .where("revoked_at", "is", null);
  q = "id" in which ? q.where("id", "=", which.id) : q.where("email", "=", which.email);
  return (await q.returning("id").execute()).map((r) => r.id);
}
