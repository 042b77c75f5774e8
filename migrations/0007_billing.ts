import { type Kysely, sql } from "kysely";

// Plans from the catalogue, quota counters, billing accounts, webhook events seen, and the usage outbox's key mode. Never edit after landing.

export async function up(db: Kysely<unknown>): Promise<void> {
  // Plan ids of the catalogue (lib/billing/plans.ts): the earlier placeholder names map onto it.
  await sql`update orgs set plan = case plan when 'team' then 'beacon' when 'lighthouse' then 'lighthouse' when 'beacon' then 'beacon' else 'lantern' end`.execute(db);

  // Which allowance a usage row drew on; only live rows are reported to the billing provider.
  await db.schema.alterTable("usage_events").addColumn("mode", "text", (c) => c.notNull().defaultTo("live").check(sql`mode in ('live', 'test')`)).execute();
  await sql`update usage_events set mode = coalesce((select mode from api_keys where api_keys.id = usage_events.api_key_id), 'live')`.execute(db);
  await db.schema.createIndex("usage_events_outbox").on("usage_events").columns(["reported_at", "mode", "id"]).execute();

  // Units a job reserved from the quota when it was queued; settled against what it used when it ends.
  await db.schema.alterTable("jobs").addColumn("reserved_units", "integer", (c) => c.notNull().defaultTo(0)).execute();

  await db.schema
    .createTable("quota_counters")
    .addColumn("org_id", "integer", (c) => c.notNull().references("orgs.id").onDelete("cascade"))
    .addColumn("mode", "text", (c) => c.notNull().check(sql`mode in ('live', 'test')`))
    .addColumn("period", "text", (c) => c.notNull())
    .addColumn("used", "integer", (c) => c.notNull())
    .addPrimaryKeyConstraint("quota_counters_pk", ["org_id", "mode", "period"])
    .execute();

  await db.schema
    .createTable("quota_notices")
    .addColumn("org_id", "integer", (c) => c.notNull().references("orgs.id").onDelete("cascade"))
    .addColumn("period", "text", (c) => c.notNull())
    .addColumn("threshold", "integer", (c) => c.notNull())
    .addColumn("sent_at", "text", (c) => c.notNull())
    .addPrimaryKeyConstraint("quota_notices_pk", ["org_id", "period", "threshold"])
    .execute();

  await db.schema
    .createTable("billing_accounts")
    .addColumn("org_id", "integer", (c) => c.primaryKey().references("orgs.id").onDelete("cascade"))
    .addColumn("customer_id", "text", (c) => c.notNull().unique())
    .addColumn("subscription_id", "text")
    .addColumn("subscription_status", "text")
    .addColumn("card_brand", "text")
    .addColumn("card_last4", "text")
    .addColumn("card_exp_month", "integer")
    .addColumn("card_exp_year", "integer")
    .addColumn("payment_failed_at", "text")
    .addColumn("grace_until", "text")
    .addColumn("updated_at", "text", (c) => c.notNull())
    .execute();

  await db.schema
    .createTable("billing_events")
    .addColumn("event_id", "text", (c) => c.primaryKey())
    .addColumn("type", "text", (c) => c.notNull())
    .addColumn("received_at", "text", (c) => c.notNull())
    .addColumn("outcome", "text", (c) => c.notNull())
    .execute();
}

export async function down(db: Kysely<unknown>): Promise<void> {
  for (const t of ["billing_events", "billing_accounts", "quota_notices", "quota_counters"]) await db.schema.dropTable(t).execute();
  await db.schema.dropIndex("usage_events_outbox").execute();
  await db.schema.alterTable("jobs").dropColumn("reserved_units").execute();
  await db.schema.alterTable("usage_events").dropColumn("mode").execute();
}
