import type { Db } from "@/db";

// Only a type import of the database: lib/auth/session.ts takes the connection from its caller.

/** What a console request needs of its signed-in user: one primary-key lookup. */
export const findSessionUser = (db: Db, id: number) =>
  db.selectFrom("users").select(["id", "email", "name", "session_epoch"]).where("id", "=", id).executeTakeFirst();

/** Ends every session the user has: each token carries the epoch it was issued under. */
export async function bumpSessionEpoch(db: Db, userId: number): Promise<void> {
  await db.updateTable("users").set((eb) => ({ session_epoch: eb("session_epoch", "+", 1) })).where("id", "=", userId).execute();
}
