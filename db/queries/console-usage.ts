import { sql } from "kysely";
import type { Db } from "@/db";

/** Usage of one (UTC day, endpoint, key): the finest grain the console shows. */
export interface UsageCell {
  day: string;
  endpoint: string;
  keyId: number | null;
  prefix: string | null;
  name: string | null;
  calls: number;
  units: number;
  errors: number;
}

/** An org's usage events in [from, to) grouped by day, endpoint and key, ordered by those. */
export async function usageCells(db: Db, q: { orgId: number; from: string; to: string }): Promise<UsageCell[]> {
  const day = sql<string>`substr(usage_events.created_at, 1, 10)`;
  const rows = await db
    .selectFrom("usage_events")
    .leftJoin("api_keys", "api_keys.id", "usage_events.api_key_id")
    .select([
      day.as("day"),
      "usage_events.endpoint",
      "usage_events.api_key_id",
      "api_keys.prefix",
      "api_keys.name",
      sql<number>`count(*)`.as("calls"),
      sql<number>`coalesce(sum(usage_events.units), 0)`.as("units"),
      sql<number>`sum(case when usage_events.status >= 400 then 1 else 0 end)`.as("errors"),
    ])
    .where("usage_events.org_id", "=", q.orgId)
    .where("usage_events.created_at", ">=", q.from)
    .where("usage_events.created_at", "<", q.to)
    .groupBy([day, "usage_events.endpoint", "usage_events.api_key_id", "api_keys.prefix", "api_keys.name"])
    .orderBy(day)
    .orderBy("usage_events.endpoint")
    .orderBy("usage_events.api_key_id")
    .execute();
  return rows.map((r) => ({
    day: r.day,
    endpoint: r.endpoint,
    keyId: r.api_key_id,
    prefix: r.prefix,
    name: r.name,
    calls: Number(r.calls),
    units: Number(r.units),
    errors: Number(r.errors),
  }));
}
