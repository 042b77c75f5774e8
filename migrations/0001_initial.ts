import { type Kysely, sql } from "kysely";

// Never edit a migration after it has landed: add a new one.

export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema
    .createTable("orgs")
    .addColumn("id", "integer", (c) => c.primaryKey().autoIncrement())
    .addColumn("slug", "text", (c) => c.notNull().unique())
    .addColumn("name", "text", (c) => c.notNull())
    .addColumn("plan", "text", (c) => c.notNull().defaultTo("starter"))
    .addColumn("created_at", "text", (c) => c.notNull())
    .execute();

  await db.schema
    .createTable("users")
    .addColumn("id", "integer", (c) => c.primaryKey().autoIncrement())
    .addColumn("email", "text", (c) => c.notNull().unique())
    .addColumn("name", "text")
    .addColumn("created_at", "text", (c) => c.notNull())
    .execute();

  await db.schema
    .createTable("memberships")
    .addColumn("id", "integer", (c) => c.primaryKey().autoIncrement())
    .addColumn("org_id", "integer", (c) => c.notNull().references("orgs.id").onDelete("cascade"))
    .addColumn("user_id", "integer", (c) => c.notNull().references("users.id").onDelete("cascade"))
    .addColumn("role", "text", (c) => c.notNull().check(sql`role in ('owner', 'developer', 'billing')`))
    .addColumn("created_at", "text", (c) => c.notNull())
    .addUniqueConstraint("memberships_org_user", ["org_id", "user_id"])
    .execute();

  await db.schema
    .createTable("api_keys")
    .addColumn("id", "integer", (c) => c.primaryKey().autoIncrement())
    .addColumn("org_id", "integer", (c) => c.notNull().references("orgs.id").onDelete("cascade"))
    .addColumn("name", "text", (c) => c.notNull())
    .addColumn("mode", "text", (c) => c.notNull().check(sql`mode in ('live', 'test')`))
    .addColumn("prefix", "text", (c) => c.notNull())
    .addColumn("key_hash", "text", (c) => c.notNull().unique())
    .addColumn("scopes", "text", (c) => c.notNull())
    .addColumn("created_by_user_id", "integer", (c) => c.references("users.id").onDelete("set null"))
    .addColumn("created_at", "text", (c) => c.notNull())
    .addColumn("expires_at", "text")
    .addColumn("revoked_at", "text")
    .addColumn("last_used_at", "text")
    .execute();
  await db.schema.createIndex("api_keys_org").on("api_keys").column("org_id").execute();

  await db.schema
    .createTable("usage_events")
    .addColumn("id", "integer", (c) => c.primaryKey().autoIncrement())
    .addColumn("org_id", "integer", (c) => c.notNull().references("orgs.id").onDelete("cascade"))
    .addColumn("api_key_id", "integer", (c) => c.references("api_keys.id").onDelete("set null"))
    .addColumn("endpoint", "text", (c) => c.notNull())
    .addColumn("method", "text", (c) => c.notNull())
    .addColumn("status", "integer", (c) => c.notNull())
    .addColumn("units", "integer", (c) => c.notNull())
    .addColumn("duration_ms", "real", (c) => c.notNull())
    .addColumn("request_id", "text", (c) => c.notNull())
    .addColumn("created_at", "text", (c) => c.notNull())
    .addColumn("reported_at", "text")
    .execute();
  await db.schema.createIndex("usage_events_org_time").on("usage_events").columns(["org_id", "created_at"]).execute();
  await db.schema.createIndex("usage_events_unreported").on("usage_events").column("reported_at").execute();

  await db.schema
    .createTable("idempotency_records")
    .addColumn("id", "integer", (c) => c.primaryKey().autoIncrement())
    .addColumn("org_id", "integer", (c) => c.notNull().references("orgs.id").onDelete("cascade"))
    .addColumn("idem_key", "text", (c) => c.notNull())
    .addColumn("endpoint", "text", (c) => c.notNull())
    .addColumn("request_hash", "text", (c) => c.notNull())
    .addColumn("state", "text", (c) => c.notNull().check(sql`state in ('running', 'done')`))
    .addColumn("response_status", "integer")
    .addColumn("response_headers", "text")
    .addColumn("response_body", "text")
    .addColumn("created_at", "text", (c) => c.notNull())
    .addColumn("expires_at", "text", (c) => c.notNull())
    .addUniqueConstraint("idempotency_org_key", ["org_id", "idem_key"])
    .execute();

  await db.schema
    .createTable("audit_log")
    .addColumn("id", "integer", (c) => c.primaryKey().autoIncrement())
    .addColumn("org_id", "integer", (c) => c.notNull().references("orgs.id").onDelete("cascade"))
    .addColumn("actor", "text", (c) => c.notNull())
    .addColumn("action", "text", (c) => c.notNull())
    .addColumn("target_type", "text", (c) => c.notNull())
    .addColumn("target_id", "text", (c) => c.notNull())
    .addColumn("details", "text", (c) => c.notNull().defaultTo("{}"))
    .addColumn("created_at", "text", (c) => c.notNull())
    .execute();
  await db.schema.createIndex("audit_log_org_time").on("audit_log").columns(["org_id", "created_at"]).execute();
}

export async function down(db: Kysely<unknown>): Promise<void> {
  for (const t of ["audit_log", "idempotency_records", "usage_events", "api_keys", "memberships", "users", "orgs"]) {
    await db.schema.dropTable(t).execute();
  }
}
