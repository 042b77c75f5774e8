import { type Kysely, sql } from "kysely";

// Error-rate claims and their verdicts, kept per label (firmware version, branch, build). Never edit after landing.

export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema
    .createTable("claims")
    .addColumn("id", "text", (c) => c.primaryKey())
    .addColumn("org_id", "integer", (c) => c.notNull().references("orgs.id").onDelete("cascade"))
    .addColumn("api_key_id", "integer", (c) => c.references("api_keys.id").onDelete("set null"))
    .addColumn("label", "text", (c) => c.notNull())
    .addColumn("mode", "text", (c) => c.notNull().check(sql`mode in ('analytic', 'measured', 'simulated')`))
    .addColumn("verdict", "text", (c) => c.notNull().check(sql`verdict in ('pending', 'supported', 'refuted', 'inconclusive')`))
    .addColumn("request", "text", (c) => c.notNull())
    .addColumn("outcome", "text")
    .addColumn("job_id", "text", (c) => c.references("jobs.id").onDelete("set null"))
    .addColumn("created_at", "text", (c) => c.notNull())
    .addColumn("decided_at", "text")
    .execute();
  await db.schema.createIndex("claims_label").on("claims").columns(["org_id", "label", "created_at"]).execute();
  await db.schema.createIndex("claims_org_time").on("claims").columns(["org_id", "created_at"]).execute();
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.dropTable("claims").execute();
}
