import { z } from "zod";
import type { Db } from "@/db";
import { usageCells, type UsageCell } from "@/db/queries/console-usage";
import { DAY_MS, invalidField } from "./common";

export const MAX_PERIOD_DAYS = 400;
const DEFAULT_PERIOD_DAYS = 30;

// Date.parse rolls impossible days over (2026-02-30 → 2026-03-02), so a day must also read back unchanged.
const day = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, "Use a date as YYYY-MM-DD.")
  .refine((s) => !Number.isNaN(Date.parse(s)) && new Date(Date.parse(s)).toISOString().slice(0, 10) === s, "Not a calendar date.");

export const usageQuery = z.strictObject({
  from: day.optional(),
  to: day.optional(),
  format: z.enum(["json", "csv"]).default("json"),
});

export interface Period {
  from: string;
  to: string;
}

const addDays = (d: string, n: number) => new Date(Date.parse(d) + n * DAY_MS).toISOString().slice(0, 10);

/** The period asked for, both ends inclusive: by default the last 30 UTC days up to today. */
export function resolvePeriod(q: { from?: string; to?: string }, today = new Date()): Period {
  const to = q.to ?? today.toISOString().slice(0, 10);
  const from = q.from ?? addDays(to, 1 - DEFAULT_PERIOD_DAYS);
  if (from > to) throw invalidField("/from", "`from` is after `to`.");
  if ((Date.parse(to) - Date.parse(from)) / DAY_MS + 1 > MAX_PERIOD_DAYS) throw invalidField("/from", `The period is longer than ${MAX_PERIOD_DAYS} days.`);
  return { from, to };
}

/** Every (day, endpoint, key) with usage in the period. */
export const loadUsage = (db: Db, orgId: number, p: Period): Promise<UsageCell[]> =>
  usageCells(db, { orgId, from: `${p.from}T00:00:00.000Z`, to: `${addDays(p.to, 1)}T00:00:00.000Z` });

interface Sums {
  calls: number;
  units: number;
  errors: number;
}

const zero = (): Sums => ({ calls: 0, units: 0, errors: 0 });
const add = (s: Sums, c: Sums) => {
  s.calls += c.calls;
  s.units += c.units;
  s.errors += c.errors;
};

function sumBy<K>(cells: UsageCell[], keyOf: (c: UsageCell) => K): Map<K, Sums> {
  const m = new Map<K, Sums>();
  for (const c of cells) {
    const k = keyOf(c);
    const s = m.get(k) ?? zero();
    add(s, c);
    m.set(k, s);
  }
  return m;
}

const busiestFirst = <T extends Sums>(rows: T[], tie: (a: T, b: T) => number) => rows.sort((a, b) => b.calls - a.calls || tie(a, b));

/** Totals, a zero-filled daily series, and the split by endpoint and by key, all from the same cells so they add up. */
export function summarise(p: Period, cells: UsageCell[]) {
  const totals = zero();
  for (const c of cells) add(totals, c);
  const perDay = sumBy(cells, (c) => c.day);
  const daily = [];
  for (let d = p.from; d <= p.to; d = addDays(d, 1)) daily.push({ day: d, ...(perDay.get(d) ?? zero()) });
  const byEndpoint = busiestFirst(
    [...sumBy(cells, (c) => c.endpoint)].map(([endpoint, s]) => ({ endpoint, ...s })),
    (a, b) => a.endpoint.localeCompare(b.endpoint),
  );
  const keyInfo = new Map(cells.map((c) => [c.keyId, { prefix: c.prefix, name: c.name }]));
  const byKey = busiestFirst(
    [...sumBy(cells, (c) => c.keyId)].map(([keyId, s]) => ({ keyId, ...keyInfo.get(keyId)!, ...s })),
    (a, b) => (a.keyId ?? 0) - (b.keyId ?? 0),
  );
  return { from: p.from, to: p.to, totals, daily, byEndpoint, byKey };
}

// A field a spreadsheet would run as a formula (=, +, -, @) is prefixed with ' ; quotes are doubled (RFC 4180).
function csvField(v: string | number | null): string {
  const s = v === null ? "" : String(v);
  const safe = typeof v === "string" && /^[=+\-@\t\r]/.test(s) ? `'${s}` : s;
  return /[",\r\n]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
}

export const CSV_HEADER = "day,endpoint,key_prefix,calls,units,errors";

/** One line per (day, endpoint, key) with usage; a key deleted since has an empty prefix. */
export function usageCsv(cells: UsageCell[]): string {
  const lines = cells.map((c) => [c.day, c.endpoint, c.prefix, c.calls, c.units, c.errors].map(csvField).join(","));
  return [CSV_HEADER, ...lines].join("\r\n") + "\r\n";
}
