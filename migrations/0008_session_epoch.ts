import type { Kysely } from "kysely";

// A per-user counter written into each session token at sign-in: raising it ends every session
// issued before (password reset, removal from an organisation). Never edit after landing.

export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable("users").addColumn("session_epoch", "integer", (c) => c.notNull().defaultTo(0)).execute();
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable("users").dropColumn("session_epoch").execute();
}
