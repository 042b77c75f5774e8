import { sql } from "kysely";
import type { Db } from "@/db";
import { nowIso } from "@/db";
import type { VerificationTokenTable } from "@/db/schema";

type Purpose = VerificationTokenTable["purpose"];

export const findAuthUser = (db: Db, id: number) => db.selectFrom("users").selectAll().where("id", "=", id).executeTakeFirst();

export async function insertAuthUser(db: Db, u: { email: string; name: string | null; passwordHash?: string | null; emailVerified?: string | null }) {
  return db
    .insertInto("users")
    .values({ email: u.email.toLowerCase(), name: u.name, created_at: nowIso(), password_hash: u.passwordHash ?? null, email_verified: u.emailVerified ?? null })
    .returningAll()
    .executeTakeFirstOrThrow();
}

export async function updateUserName(db: Db, id: number, name: string | null) {
  await db.updateTable("users").set({ name }).where("id", "=", id).execute();
}

/** A never-confirmed account signed up for again is created anew: new password, name and creation time. */
export async function renewPendingSignUp(db: Db, id: number, u: { name: string; passwordHash: string }) {
  await db
    .updateTable("users")
    .set({ name: u.name, password_hash: u.passwordHash, created_at: nowIso() })
    .where("id", "=", id)
    .where("email_verified", "is", null)
    .execute();
}

/**
 * Record that the owner of the address has proved it. A password set by a sign-up that nobody
 * confirmed within `pendingSince` may have been chosen by someone else, so it is dropped on the
 * first proof (the owner can set one with a reset).
 */
export async function markEmailVerified(db: Db, id: number, pendingSince: string) {
  return db
    .updateTable("users")
    .set({
      password_hash: sql<string | null>`case when email_verified is null and created_at < ${pendingSince} then null else password_hash end`,
      email_verified: sql<string>`coalesce(email_verified, ${nowIso()})`,
    })
    .where("id", "=", id)
    .returningAll()
    .executeTakeFirst();
}

/** Set a new password; a reset link proves the address, so the account counts as confirmed too. */
export async function setPassword(db: Db, id: number, passwordHash: string) {
  await db
    .updateTable("users")
    .set({ password_hash: passwordHash, email_verified: sql<string>`coalesce(email_verified, ${nowIso()})` })
    .where("id", "=", id)
    .execute();
}

/** Store a token's hash; expired tokens of every address are pruned on the way. */
export async function insertVerificationToken(db: Db, t: { identifier: string; tokenHash: string; purpose: Purpose; expiresAt: string }) {
  await db.deleteFrom("verification_tokens").where("expires_at", "<", nowIso()).execute();
  await db
    .insertInto("verification_tokens")
    .values({ identifier: t.identifier, token_hash: t.tokenHash, purpose: t.purpose, expires_at: t.expiresAt })
    .execute();
}

/**
 * Delete the token and return it, in one statement, so two concurrent uses cannot both succeed.
 * An expired token is deleted all the same and comes back as undefined.
 */
export async function takeVerificationToken(db: Db, t: { tokenHash: string; purpose: Purpose; identifier?: string }) {
  let q = db.deleteFrom("verification_tokens").where("token_hash", "=", t.tokenHash).where("purpose", "=", t.purpose);
  if (t.identifier !== undefined) q = q.where("identifier", "=", t.identifier);
  const row = await q.returningAll().executeTakeFirst();
  return row && row.expires_at > nowIso() ? row : undefined;
}

export async function deleteVerificationTokens(db: Db, identifier: string, purpose: Purpose) {
  await db.deleteFrom("verification_tokens").where("identifier", "=", identifier).where("purpose", "=", purpose).execute();
}
