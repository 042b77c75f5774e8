import { z } from "zod";
import { inTransaction, type Db } from "@/db";
import { insertAudit } from "@/db/queries/audit";
import { listPendingInvitations } from "@/db/queries/invitations";
import { countOwners, deleteMember, findMember, listMembers, setMemberRole, type MemberRow } from "@/db/queries/members";
import { bumpSessionEpoch } from "@/db/queries/sessions";
import type { Org, Role } from "@/db/schema";
import { ApiError } from "@/lib/api/errors";
import { actorOf, invalidField, type Caller } from "./common";
import { endBenchCredential, revokeKeysCreatedBy } from "./keys";
import { deliver } from "./notices";

export const roleSchema = z.enum(["owner", "developer", "billing"]);
export const roleChangeInput = z.strictObject({ role: roleSchema });
/** DELETE …/members/:userId?revokeKeys=true also revokes the keys the member created. */
export const removeQuery = z.strictObject({ revokeKeys: z.stringbool().default(false) });
export const transferInput = z.strictObject({ userId: z.number().int().positive() });

export interface MemberView {
  userId: number;
  email: string;
  name: string | null;
  role: Role;
  joinedAt: string;
}

const memberView = (m: MemberRow): MemberView => ({ userId: m.user_id, email: m.email, name: m.name, role: m.role, joinedAt: m.created_at });

async function requireMember(db: Db, org: Org, userId: number): Promise<MemberRow> {
  const m = await findMember(db, org.id, userId);
  if (!m) throw new ApiError("not-found", `User ${userId} is not a member of ${org.slug}.`);
  return m;
}

/** Refuse a change that would leave the org without an owner. */
async function keepAnOwner(db: Db, org: Org, change: string): Promise<void> {
  if ((await countOwners(db, org.id)) <= 1) {
    throw new ApiError("last-owner", `${change} would leave ${org.slug} without an owner. Make another member an owner first.`);
  }
}

/** Members for everyone; pending invitations (those not accepted or revoked, expired included) for owners only. */
export async function listMembersOf(db: Db, org: Org, caller: Caller) {
  const members = (await listMembers(db, org.id)).map(memberView);
  const invitations =
    caller.role === "owner"
      ? (await listPendingInvitations(db, org.id)).map((i) => ({
          id: i.id,
          email: i.email,
          role: i.role,
          expiresAt: i.expires_at,
          invitedBy: i.invited_by_user_id !== null && i.invited_by_email !== null ? { id: i.invited_by_user_id, email: i.invited_by_email } : null,
        }))
      : [];
  return { members, invitations };
}

export async function changeRole(db: Db, org: Org, caller: Caller, userId: number, role: Role): Promise<MemberView> {
  return inTransaction(db, async (tx) => {
    const target = await requireMember(tx, org, userId);
    if (target.role === role) return memberView(target);
    if (target.role === "owner") await keepAnOwner(tx, org, "Demoting the last owner");
    await setMemberRole(tx, org.id, userId, role);
    if (role === "billing") await endBenchCredential(tx, org, userId);
    await insertAudit(tx, { orgId: org.id, actor: actorOf(caller), action: "member.role_changed", targetType: "user", targetId: userId, details: { email: target.email, from: target.role, to: role } });
    return memberView({ ...target, role });
  });
}

/**
 * An owner removes anyone; any member removes themselves (leaves). Their keys keep working unless
 * `revokeKeys` is set, which revokes, in the same transaction, every working key they created.
 */
export async function removeMember(db: Db, org: Org, caller: Caller, userId: number, opts: { revokeKeys?: boolean } = {}) {
  const leaving = userId === caller.id;
  if (!leaving && caller.role !== "owner") throw new ApiError("role-refused", "Only an owner can remove another member; any member can leave.");
  const out = await inTransaction(db, async (tx) => {
    const target = await requireMember(tx, org, userId);
    if (target.role === "owner") await keepAnOwner(tx, org, leaving ? "Leaving as the last owner" : "Removing the last owner");
    await deleteMember(tx, org.id, userId);
    // A removed person's open sessions end (they may be on a device the org no longer trusts); leaving keeps one's own.
    if (!leaving) await bumpSessionEpoch(tx, userId);
    await endBenchCredential(tx, org, userId);
    await insertAudit(tx, {
      orgId: org.id,
      actor: actorOf(caller),
      action: "member.removed",
      targetType: "user",
      targetId: userId,
      details: { email: target.email, role: target.role, left: leaving, keysRevoked: Boolean(opts.revokeKeys) },
    });
    const revoked = opts.revokeKeys ? await revokeKeysCreatedBy(tx, org, caller, userId) : { keys: [], mails: [] };
    return { member: memberView(target), revoked };
  });
  deliver(out.revoked.mails);
  return { member: out.member, revokedKeys: out.revoked.keys };
}

/** The target member becomes an owner and the calling owner a developer. */
export async function transferOwnership(db: Db, org: Org, caller: Caller, userId: number): Promise<{ owner: MemberView; previousOwner: MemberView }> {
  if (userId === caller.id) throw invalidField("/userId", "That is you; name the member who is to become the owner.");
  return inTransaction(db, async (tx) => {
    const target = await requireMember(tx, org, userId);
    const self = await requireMember(tx, org, caller.id);
    await setMemberRole(tx, org.id, userId, "owner");
    await setMemberRole(tx, org.id, caller.id, "developer");
    await insertAudit(tx, {
      orgId: org.id,
      actor: actorOf(caller),
      action: "org.ownership_transferred",
      targetType: "user",
      targetId: userId,
      details: { email: target.email, previousRole: target.role, fromUserId: caller.id },
    });
    return { owner: memberView({ ...target, role: "owner" }), previousOwner: memberView({ ...self, role: "developer" }) };
  });
}
