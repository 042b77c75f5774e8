import { sql } from "kysely";
import type { Db } from "@/db";
import type { KeyMode } from "@/db/schema";

/** The counter's month key, "YYYY-MM" (UTC), of a time. */
export const monthKey = (at: Date | string) => (typeof at === "string" ? at : at.toISOString()).slice(0, 7);

const monthBounds = (month: string) => {
  const [y, m] = month.split("-").map(Number) as [number, number];
  return { from: new Date(Date.UTC(y, m - 1, 1)).toISOString(), to: new Date(Date.UTC(y, m, 1)).toISOString() };
};

/**
 * Create the month's counter if it is missing, starting from the ledger (usage rows of the month) plus the
 * units still reserved by the org's unfinished jobs queued that month, so a counter made late agrees with both.
 */
/** The month's counter, or undefined when the month has none yet. */
const readCounter = async (db: Db, q: { orgId: number; mode: KeyMode; month: string }) =>
  (await db.selectFrom("quota_counters").select("used").where("org_id", "=", q.orgId).where("mode", "=", q.mode).where("period", "=", q.month).executeTakeFirst())?.used;

async function ensureCounter(db: Db, orgId: number, mode: KeyMode, month: string): Promise<void> {
  // A point lookup first: the insert's ledger sum would be evaluated (a scan of the month) even when the row exists.
  if ((await readCounter(db, { orgId, mode, month })) !== undefined) return;
  const { from, to } = monthBounds(month);
  await sql`
    insert into quota_counters (org_id, mode, period, used)
    select ${orgId}, ${mode}, ${month},
      coalesce((select sum(units) from usage_events where org_id = ${orgId} and mode = ${mode} and created_at >= ${from} and created_at < ${to}), 0)
      + coalesce((select sum(jobs.reserved_units) from jobs left join api_keys on api_keys.id = jobs.api_key_id
          where jobs.org_id = ${orgId} and coalesce(api_keys.mode, 'live') = ${mode} and jobs.status in ('queued', 'running')
          and jobs.created_at >= ${from} and jobs.created_at < ${to}), 0)
    on conflict do nothing`.execute(db);
}

/** Units used so far this month (reservations included). */
export async function unitsUsed(db: Db, orgId: number, mode: KeyMode, month: string): Promise<number> {
  const used = await readCounter(db, { orgId, mode, month });
  if (used !== undefined) return used;
  await ensureCounter(db, orgId, mode, month);
  return (await readCounter(db, { orgId, mode, month }))!;
}

const counter = (db: Db, q: { orgId: number; mode: KeyMode; month: string }) =>
  db.updateTable("quota_counters").where("org_id", "=", q.orgId).where("mode", "=", q.mode).where("period", "=", q.month);

/**
 * Take `units` from the month's counter in one conditional update: with `cap`, only while used + units ≤ cap.
 * Returns the counter after the update, or null (and changes nothing) when the cap would be passed.
 * The update is tried first: the counter exists on every call but a month's first, which makes it and tries again.
 */
export async function reserveUnits(db: Db, q: { orgId: number; mode: KeyMode; month: string; units: number; cap: number | null }): Promise<number | null> {
  const take = async () => {
    let update = counter(db, q).set({ used: sql`used + ${q.units}` });
    if (q.cap !== null) update = update.where(sql<boolean>`used + ${q.units} <= ${q.cap}`);
    return (await update.returning("used").executeTakeFirst())?.used;
  };
  const used = await take();
  if (used !== undefined) return used;
  if ((await readCounter(db, q)) !== undefined) return null;
  await ensureCounter(db, q.orgId, q.mode, q.month);
  return (await take()) ?? null;
}

/** Add `delta` (negative to give back) to the month's counter; returns the counter after. */
export async function adjustUnits(db: Db, q: { orgId: number; mode: KeyMode; month: string; delta: number }): Promise<number> {
  const add = async () => (await counter(db, q).set({ used: sql`used + ${q.delta}` }).returning("used").executeTakeFirst())?.used;
  const used = await add();
  if (used !== undefined) return used;
  await ensureCounter(db, q.orgId, q.mode, q.month);
  return (await add())!;
}

/** Record that the org was told about `threshold` percent this month: true the first time only. */
export async function claimQuotaNotice(db: Db, orgId: number, month: string, threshold: number, at: string): Promise<boolean> {
  const r = await db.insertInto("quota_notices").values({ org_id: orgId, period: month, threshold, sent_at: at }).onConflict((oc) => oc.doNothing()).executeTakeFirst();
  return Number(r.numInsertedOrUpdatedRows ?? 0) > 0;
}

/** Forget a notice whose e-mail could not be sent, so the next call past the threshold tries again. */
export const dropQuotaNotice = (db: Db, orgId: number, month: string, threshold: number) =>
  db.deleteFrom("quota_notices").where("org_id", "=", orgId).where("period", "=", month).where("threshold", "=", threshold).execute();
