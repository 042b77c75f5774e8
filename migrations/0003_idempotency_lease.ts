import { type Kysely, sql } from "kysely";

// Idempotency records get a holder and a lease, so that a record left "running" by a crashed server can be taken over. Never edit after landing.

export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable("idempotency_records").addColumn("holder", "text").execute();
  await db.schema.alterTable("idempotency_records").addColumn("lease_expires_at", "text").execute();
  // A record running before this migration was held by a process that no longer runs: its lease is over.
  await sql`update idempotency_records set lease_expires_at = created_at where state = 'running'`.execute(db);
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable("idempotency_records").dropColumn("lease_expires_at").execute();
  await db.schema.alterTable("idempotency_records").dropColumn("holder").execute();
}
