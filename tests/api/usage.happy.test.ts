import { describe, expect, it } from "vitest";
import type { Db } from "@/db";
import { insertUsageEvent } from "@/db/queries/usage";
import { getQuery } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

interface Row {
  day: string;
  endpoint: string;
  calls: number;
  units: number;
  errors: number;
}

const DAY = 86_400_000;
const isoDay = (ms: number) => new Date(ms).toISOString().slice(0, 10);

let seq = 0;
async function insert(db: Db, orgId: number, keyId: number, e: { at: string; endpoint: string; status?: number; units?: number }) {
  await insertUsageEvent(db, {
    org_id: orgId,
    api_key_id: keyId,
    endpoint: e.endpoint,
    method: e.endpoint === "usage" ? "GET" : "POST",
    status: e.status ?? 200,
    units: e.units ?? 1,
    duration_ms: 1,
    request_id: `req_test_${++seq}`,
    created_at: e.at,
    reported_at: null,
  });
}

/** The expected page rows, grouped and ordered by (day, endpoint) here from what the test inserted. */
function expectedRows(events: { at: string; endpoint: string; status: number; units: number }[]): Row[] {
  const groups = new Map<string, Row>();
  for (const e of events) {
    const day = e.at.slice(0, 10);
    const key = `${day}|${e.endpoint}`;
    const g = groups.get(key) ?? { day, endpoint: e.endpoint, calls: 0, units: 0, errors: 0 };
    g.calls += 1;
    g.units += e.units;
    g.errors += e.status >= 400 ? 1 : 0;
    groups.set(key, g);
  }
  return [...groups.values()].sort((a, b) => (a.day === b.day ? (a.endpoint < b.endpoint ? -1 : 1) : a.day < b.day ? -1 : 1));
}

/** A deterministic spread of events over five days and four endpoints, some refused. */
function spread(): { at: string; endpoint: string; status: number; units: number }[] {
  const endpoints = ["capacity", "channels.bsc", "distance", "links.ber"];
  const out: { at: string; endpoint: string; status: number; units: number }[] = [];
  for (let d = 0; d < 5; d++) {
    for (let e = 0; e < endpoints.length; e++) {
      // Skip some (day, endpoint) pairs so the groups are uneven: 4·4 − 4 + 4 = 16 groups in all.
      if ((d + e) % 4 === 3 && d !== 4) continue;
      const count = 1 + ((d * 7 + e * 3) % 4);
      for (let i = 0; i < count; i++) {
        const status = i === 2 ? 422 : 200;
        out.push({
          at: `2026-06-0${d + 1}T${String(i * 5).padStart(2, "0")}:${String(e * 10).padStart(2, "0")}:00.000Z`,
          endpoint: endpoints[e]!,
          status,
          units: status === 200 ? 1 + i + e : 0,
        });
      }
    }
  }
  return out;
}

describe("GET /usage", () => {
  it("groups calls, units and errors by UTC day and endpoint, ordered by (day, endpoint)", async () => {
    const { db, org, keyId, auth } = await makeOrgWithKey({ scopes: ["usage:read"] });
    const events = spread();
    for (const e of events) await insert(db, org.id, keyId, e);
    const res = await getQuery("/api/v1/usage", { from: "2026-06-01", to: "2026-06-05", limit: 500 }, auth);
    expect(res.status, res.text).toBe(200);
    expect(res.body).toMatchObject({ org: org.slug, from: "2026-06-01", to: "2026-06-05", nextCursor: null });
    const want = expectedRows(events);
    expect(want.length).toBe(16);
    expect(res.body.data).toEqual(want);
    expect(res.headers["x-compute-units"]).toBe("0");
  });

  it.each([1, 2, 3, 15, 16, 17])("cursor pagination with limit %d walks every row once, with no duplicates or gaps", async (limit) => {
    const { db, org, keyId, auth } = await makeOrgWithKey({ scopes: ["usage:read"] });
    const events = spread();
    for (const e of events) await insert(db, org.id, keyId, e);
    const want = expectedRows(events);

    const seen: Row[] = [];
    let cursor: string | null = null;
    let pages = 0;
    do {
      const query: Record<string, string | number> = { from: "2026-06-01", to: "2026-06-05", limit };
      if (cursor) query.cursor = cursor;
      const res = await getQuery("/api/v1/usage", query, auth);
      expect(res.status, res.text).toBe(200);
      const page: Row[] = res.body.data;
      expect(page.length).toBeLessThanOrEqual(limit);
      // A page that says there is more is full; the last page says there is no more.
      if (res.body.nextCursor !== null) expect(page.length).toBe(limit);
      seen.push(...page);
      cursor = res.body.nextCursor;
      expect(++pages).toBeLessThan(100);
    } while (cursor);

    expect(seen).toEqual(want);
    expect(new Set(seen.map((r) => `${r.day}|${r.endpoint}`)).size).toBe(seen.length);
    expect(pages).toBe(Math.max(1, Math.ceil(want.length / limit)));
  });

  it("from and to are inclusive UTC days: 00:00:00.000 of from and 23:59:59.999 of to count; the days around do not", async () => {
    const { db, org, keyId, auth } = await makeOrgWithKey({ scopes: ["usage:read"] });
    await insert(db, org.id, keyId, { at: "2026-03-09T23:59:59.999Z", endpoint: "distance" });
    await insert(db, org.id, keyId, { at: "2026-03-10T00:00:00.000Z", endpoint: "distance", units: 2 });
    await insert(db, org.id, keyId, { at: "2026-03-12T23:59:59.999Z", endpoint: "distance", units: 3 });
    await insert(db, org.id, keyId, { at: "2026-03-13T00:00:00.000Z", endpoint: "distance" });
    const res = await getQuery("/api/v1/usage", { from: "2026-03-10", to: "2026-03-12" }, auth);
    expect(res.body.data).toEqual([
      { day: "2026-03-10", endpoint: "distance", calls: 1, units: 2, errors: 0 },
      { day: "2026-03-12", endpoint: "distance", calls: 1, units: 3, errors: 0 },
    ]);
  });

  it("a one-day period (from = to)", async () => {
    const { db, org, keyId, auth } = await makeOrgWithKey({ scopes: ["usage:read"] });
    await insert(db, org.id, keyId, { at: "2026-04-01T12:00:00.000Z", endpoint: "capacity", units: 5 });
    await insert(db, org.id, keyId, { at: "2026-04-01T13:00:00.000Z", endpoint: "capacity", status: 429, units: 0 });
    const res = await getQuery("/api/v1/usage", { from: "2026-04-01", to: "2026-04-01" }, auth);
    expect(res.body.data).toEqual([{ day: "2026-04-01", endpoint: "capacity", calls: 2, units: 5, errors: 1 }]);
  });

  it("by default covers the 30 days up to today: 29 days ago counts, 30 days ago does not", async () => {
    const { db, org, keyId, auth } = await makeOrgWithKey({ scopes: ["usage:read"] });
    const now = Date.now();
    const today = isoDay(now);
    const day29 = isoDay(now - 29 * DAY);
    const day30 = isoDay(now - 30 * DAY);
    await insert(db, org.id, keyId, { at: `${day29}T00:00:00.000Z`, endpoint: "distance", units: 7 });
    await insert(db, org.id, keyId, { at: `${day30}T23:59:59.999Z`, endpoint: "distance", units: 11 });
    const res = await getQuery("/api/v1/usage", {}, auth);
    expect(res.status, res.text).toBe(200);
    expect(res.body.to).toBe(today);
    expect(res.body.from).toBe(day29);
    expect(res.body.data).toEqual([{ day: day29, endpoint: "distance", calls: 1, units: 7, errors: 0 }]);
  });

  it("only to given: from defaults to 29 days before it", async () => {
    const { auth } = await makeOrgWithKey({ scopes: ["usage:read"] });
    const res = await getQuery("/api/v1/usage", { to: "2026-03-30" }, auth);
    expect(res.body.from).toBe("2026-03-01");
  });

  it("an empty period gives an empty page and no cursor", async () => {
    const { auth } = await makeOrgWithKey({ scopes: ["usage:read"] });
    const res = await getQuery("/api/v1/usage", { from: "2020-01-01", to: "2020-01-31" }, auth);
    expect(res.body).toMatchObject({ data: [], nextCursor: null });
  });

  it("the longest period, 400 days, is accepted (edge case)", async () => {
    const { auth } = await makeOrgWithKey({ scopes: ["usage:read"] });
    const to = "2026-06-30";
    const from = isoDay(Date.parse(to) - 399 * DAY);
    const res = await getQuery("/api/v1/usage", { from, to }, auth);
    expect(res.status, res.text).toBe(200);
  });

  it("limit 500 (the largest) is accepted; the default is 100 rows", async () => {
    const { db, org, keyId, auth } = await makeOrgWithKey({ scopes: ["usage:read"] });
    // 120 groups: one call a day for 120 days.
    const start = Date.parse("2025-01-01T00:00:00.000Z");
    for (let d = 0; d < 120; d++) await insert(db, org.id, keyId, { at: new Date(start + d * DAY + 3600_000).toISOString(), endpoint: "distance" });
    const range = { from: "2025-01-01", to: isoDay(start + 119 * DAY) };
    const dflt = await getQuery("/api/v1/usage", range, auth);
    expect(dflt.body.data).toHaveLength(100);
    expect(dflt.body.nextCursor).not.toBeNull();
    const big = await getQuery("/api/v1/usage", { ...range, limit: 500 }, auth);
    expect(big.body.data).toHaveLength(120);
    expect(big.body.nextCursor).toBeNull();
  });
});
