import type { Db } from "@/db";
import { nowIso } from "@/db";
import type { Role } from "@/db/schema";

export const findUserByEmail = (db: Db, email: string) =>
  db.selectFrom("users").selectAll().where("email", "=", email.toLowerCase()).executeTakeFirst();

export async function insertUser(db: Db, user: { email: string; name?: string }) {
  return db
    .insertInto("users")
    .values({ email: user.email.toLowerCase(), name: user.name ?? null, created_at: nowIso() })
    .returningAll()
    .executeTakeFirstOrThrow();
}

export async function insertMembership(db: Db, m: { orgId: number; userId: number; role: Role }) {
  return db
    .insertInto("memberships")
    .values({ org_id: m.orgId, user_id: m.userId, role: m.role, created_at: nowIso() })
    .returningAll()
    .executeTakeFirstOrThrow();
}

export const findMembership = (db: Db, orgId: number, userId: number) =>
  db.selectFrom("memberships").selectAll().where("org_id", "=", orgId).where("user_id", "=", userId).executeTakeFirst();
