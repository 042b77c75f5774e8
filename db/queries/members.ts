import type { Db } from "@/db";
import type { Role } from "@/db/schema";

export const findUsersByIds = (db: Db, ids: number[]) =>
  ids.length === 0 ? Promise.resolve([]) : db.selectFrom("users").select(["id", "email", "name"]).where("id", "in", ids).execute();

/** The orgs a user belongs to, with the user's role in each. */
export const listOrgsOfUser = (db: Db, userId: number) =>
  db
    .selectFrom("memberships")
    .innerJoin("orgs", "orgs.id", "memberships.org_id")
    .select(["orgs.slug", "orgs.name", "orgs.plan", "memberships.role"])
    .where("memberships.user_id", "=", userId)
    .orderBy("orgs.name")
    .orderBy("orgs.slug")
    .execute();

const members = (db: Db, orgId: number) =>
  db
    .selectFrom("memberships")
    .innerJoin("users", "users.id", "memberships.user_id")
    .select(["users.id as user_id", "users.email", "users.name", "memberships.role", "memberships.created_at"])
    .where("memberships.org_id", "=", orgId);

export type MemberRow = NonNullable<Awaited<ReturnType<typeof findMember>>>;

/** Members of an org in the order they joined. */
export const listMembers = (db: Db, orgId: number) => members(db, orgId).orderBy("memberships.created_at").orderBy("memberships.id").execute();

export const findMember = (db: Db, orgId: number, userId: number) => members(db, orgId).where("memberships.user_id", "=", userId).executeTakeFirst();

export const listOwnerEmails = async (db: Db, orgId: number) =>
  (await members(db, orgId).where("memberships.role", "=", "owner").execute()).map((m) => m.email);

/** Who hears about money: the owners and billing admins. */
export const listBillingEmails = async (db: Db, orgId: number) =>
  (await members(db, orgId).where("memberships.role", "in", ["owner", "billing"]).execute()).map((m) => m.email);

export async function countOwners(db: Db, orgId: number): Promise<number> {
  const row = await db
    .selectFrom("memberships")
    .select((eb) => eb.fn.countAll<number>().as("n"))
    .where("org_id", "=", orgId)
    .where("role", "=", "owner")
    .executeTakeFirstOrThrow();
  return Number(row.n);
}

export const setMemberRole = (db: Db, orgId: number, userId: number, role: Role) =>
  db.updateTable("memberships").set({ role }).where("org_id", "=", orgId).where("user_id", "=", userId).execute();

export const deleteMember = (db: Db, orgId: number, userId: number) =>
  db.deleteFrom("memberships").where("org_id", "=", orgId).where("user_id", "=", userId).execute();
