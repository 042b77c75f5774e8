import { type Kysely, sql } from "kysely";

// Long-running work (simulations, simulated claims) as jobs that a runner process claims with a lease. Never edit after landing.

export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema
    .createTable("jobs")
    .addColumn("id", "text", (c) => c.primaryKey())
    .addColumn("org_id", "integer", (c) => c.notNull().references("orgs.id").onDelete("cascade"))
    .addColumn("api_key_id", "integer", (c) => c.references("api_keys.id").onDelete("set null"))
    .addColumn("kind", "text", (c) => c.notNull())
    .addColumn("input", "text", (c) => c.notNull())
    .addColumn("status", "text", (c) => c.notNull().check(sql`status in ('queued', 'running', 'done', 'cancelled', 'failed')`))
    .addColumn("reason", "text")
    .addColumn("progress", "text")
    .addColumn("result", "text")
    .addColumn("units", "integer", (c) => c.notNull().defaultTo(0))
    .addColumn("attempts", "integer", (c) => c.notNull().defaultTo(0))
    .addColumn("lease_holder", "text")
    .addColumn("lease_expires_at", "text")
    .addColumn("cancel_requested_at", "text")
    .addColumn("created_at", "text", (c) => c.notNull())
    .addColumn("started_at", "text")
    .addColumn("updated_at", "text", (c) => c.notNull())
    .addColumn("finished_at", "text")
    .execute();
  await db.schema.createIndex("jobs_claimable").on("jobs").columns(["status", "lease_expires_at", "created_at"]).execute();
  await db.schema.createIndex("jobs_org_time").on("jobs").columns(["org_id", "created_at"]).execute();

  // Each chunk's counts once folded into its point, in chunk order: a resumed job continues from the last one.
  await db.schema
    .createTable("job_chunks")
    .addColumn("job_id", "text", (c) => c.notNull().references("jobs.id").onDelete("cascade"))
    .addColumn("point", "integer", (c) => c.notNull())
    .addColumn("chunk", "integer", (c) => c.notNull())
    .addColumn("counts", "text", (c) => c.notNull())
    .addPrimaryKeyConstraint("job_chunks_pk", ["job_id", "point", "chunk"])
    .execute();
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.dropTable("job_chunks").execute();
  await db.schema.dropTable("jobs").execute();
}
