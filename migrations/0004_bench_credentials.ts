import type { Kysely } from "kysely";

// A key's purpose: "api" for the keys people manage, "bench" for the one credential per person that the console's bench renews. Never edit after landing.

export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable("api_keys").addColumn("purpose", "text", (c) => c.notNull().defaultTo("api")).execute();
  // The console's bench used to mint a listed key per tab: they stay what they were, keys people can see and revoke.
  await db.schema.createIndex("api_keys_bench_holder").on("api_keys").columns(["org_id", "created_by_user_id", "purpose"]).execute();
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.dropIndex("api_keys_bench_holder").execute();
  await db.schema.alterTable("api_keys").dropColumn("purpose").execute();
}
