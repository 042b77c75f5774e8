import { sql } from "kysely";
import type { Db } from "@/db";
import type { NewUsageEvent } from "@/db/schema";

export const insertUsageEvent = (db: Db, e: NewUsageEvent) => db.insertInto("usage_events").values(e).execute();

export interface UsageRow {
  day: string;
  endpoint: string;
  calls: number;
  units: number;
  errors: number;
}

/**
 * Usage of an org grouped by UTC day and endpoint, ordered by (day, endpoint),
 * starting strictly after `after` (keyset pagination).
 */
export async function usageByDayAndEndpoint(
  db: Db,
  q: { orgId: number; from: string; to: string; limit: number; after?: { day: string; endpoint: string } },
): Promise<UsageRow[]> {
  const day = sql<string>`substr(created_at, 1, 10)`;
  let query = db
    .selectFrom("usage_events")
    .select([
      day.as("day"),
      "endpoint",
      sql<number>`count(*)`.as("calls"),
      sql<number>`coalesce(sum(units), 0)`.as("units"),
      sql<number>`sum(case when status >= 400 then 1 else 0 end)`.as("errors"),
    ])
    .where("org_id", "=", q.orgId)
    .where("created_at", ">=", q.from)
    .where("created_at", "<", q.to)
    .groupBy([day, "endpoint"]);
  if (q.after) {
    const { day: d, endpoint: e } = q.after;
    query = query.having((eb) => eb.or([eb(day, ">", d), eb.and([eb(day, "=", d), eb("endpoint", ">", e)])]));
  }
  return query.orderBy(day).orderBy("endpoint").limit(q.limit).execute();
}

export const listUsageEvents = (db: Db, orgId: number) =>
  db.selectFrom("usage_events").selectAll().where("org_id", "=", orgId).orderBy("id").execute();
