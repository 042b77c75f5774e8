import { createHash, randomBytes } from "node:crypto";
import { z } from "zod";
import { inTransaction, type Db } from "@/db";
import { insertAudit } from "@/db/queries/audit";
import { findInvitationByTokenHash, insertInvitation, markInvitationAccepted, revokePendingInvitations } from "@/db/queries/invitations";
import { findMembership, findUserByEmail, insertMembership } from "@/db/queries/users";
import type { Org, Role } from "@/db/schema";
import { ApiError } from "@/lib/api/errors";
import { DAY_MS, actorOf, type Caller } from "./common";
import { roleSchema } from "./members";
import { deliver, invitationMail } from "./notices";

export const INVITATION_TTL_MS = 7 * DAY_MS;

export const inviteInput = z.strictObject({
  email: z.email().max(254).transform((e) => e.toLowerCase()),
  role: roleSchema,
});
export const acceptInput = z.strictObject({ token: z.string().min(16).max(128) });

/** Tokens are stored only as their SHA-256, like API keys: a copy of the database does not hold working links. */
export const hashInvitationToken = (token: string) => createHash("sha256").update(token).digest("hex");

export interface InvitationView {
  id: number;
  email: string;
  role: Role;
  expiresAt: string;
}

/**
 * Invite an address to the org and mail it a single-use link (after the commit). A new invitation
 * replaces any still pending for the same address, so only the latest link works.
 */
export async function inviteMember(db: Db, org: Org, caller: Caller, input: z.output<typeof inviteInput>, origin: string): Promise<InvitationView> {
  const token = randomBytes(32).toString("base64url");
  const now = new Date();
  const row = await inTransaction(db, async (tx) => {
    const user = await findUserByEmail(tx, input.email);
    if (user && (await findMembership(tx, org.id, user.id))) throw new ApiError("already-member", `${input.email} already belongs to ${org.slug}.`);
    const replaced = await revokePendingInvitations(tx, org.id, { email: input.email }, now.toISOString());
    const inv = await insertInvitation(tx, {
      org_id: org.id,
      email: input.email,
      role: input.role,
      token_hash: hashInvitationToken(token),
      invited_by_user_id: caller.id,
      created_at: now.toISOString(),
      expires_at: new Date(now.getTime() + INVITATION_TTL_MS).toISOString(),
      accepted_at: null,
      revoked_at: null,
    });
    await insertAudit(tx, { orgId: org.id, actor: actorOf(caller), action: "member.invited", targetType: "invitation", targetId: inv.id, details: { email: inv.email, role: inv.role, replaced } });
    return inv;
  });
  deliver([invitationMail({ to: row.email, org, role: row.role, invitedBy: caller.email, link: `${origin}/console/invite/${token}`, expiresAt: row.expires_at })]);
  return { id: row.id, email: row.email, role: row.role, expiresAt: row.expires_at };
}

/** Revoke a pending invitation of the org; one already accepted or revoked is no longer there to revoke (404). */
export async function revokeInvitation(db: Db, org: Org, caller: Caller, id: number): Promise<{ id: number; revokedAt: string }> {
  const at = new Date().toISOString();
  return inTransaction(db, async (tx) => {
    const [revoked] = await revokePendingInvitations(tx, org.id, { id }, at);
    if (revoked === undefined) throw new ApiError("not-found", `No pending invitation ${id} in ${org.slug}.`);
    await insertAudit(tx, { orgId: org.id, actor: actorOf(caller), action: "invitation.revoked", targetType: "invitation", targetId: id });
    return { id, revokedAt: at };
  });
}

/** Accept an invitation as the signed-in user, whose e-mail must be the invited one. */
export async function acceptInvitation(db: Db, user: { id: number; email: string }, token: string): Promise<{ org: { slug: string; name: string }; role: Role }> {
  const now = new Date().toISOString();
  return inTransaction(db, async (tx) => {
    const inv = await findInvitationByTokenHash(tx, hashInvitationToken(token));
    if (!inv) throw new ApiError("not-found", "No invitation has this link. Check that it was copied whole.");
    if (inv.accepted_at) throw new ApiError("gone", "This invitation has been used already.");
    if (inv.revoked_at) throw new ApiError("gone", "This invitation was withdrawn.");
    if (inv.expires_at <= now) throw new ApiError("gone", `This invitation expired at ${inv.expires_at}.`);
    if (inv.email !== user.email.toLowerCase()) throw new ApiError("invitation-mismatch", "This invitation was sent to another e-mail address than the one you are signed in with.");
    if (await findMembership(tx, inv.org_id, user.id)) throw new ApiError("already-member", `You already belong to ${inv.org_slug}.`);
    if (!(await markInvitationAccepted(tx, inv.id, now))) throw new ApiError("gone", "This invitation has been used already.");
    await insertMembership(tx, { orgId: inv.org_id, userId: user.id, role: inv.role });
    await insertAudit(tx, { orgId: inv.org_id, actor: actorOf(user), action: "member.joined", targetType: "user", targetId: user.id, details: { email: inv.email, role: inv.role, invitationId: inv.id } });
    return { org: { slug: inv.org_slug, name: inv.org_name }, role: inv.role };
  });
}
