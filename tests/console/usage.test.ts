import { beforeAll, describe, expect, it, vi } from "vitest";
import { insertUsageEvent } from "@/db/queries/usage";
import { expectFieldError } from "../helpers/api";
import { consoleCall, makeConsoleOrg, type ConsoleFixture } from "../helpers/console";

vi.mock(import("@/lib/mail/send"), async (orig) => ({ ...(await orig()), sendMail: vi.fn(async () => {}) }));

interface Event {
  at: string;
  endpoint: string;
  keyId: number | null;
  status: number;
  units: number;
}

let fx: ConsoleFixture;
let inPeriod: Event[];
let prefixOf: Map<number | null, string>;
const FROM = "2026-03-01";
const TO = "2026-03-10";

beforeAll(async () => {
  fx = await makeConsoleOrg();
  const keys = [fx.keys.owner.record, fx.keys.developer.record, fx.keys.spare.record];
  prefixOf = new Map<number | null, string>([...keys.map((k) => [k.id, k.prefix] as [number, string]), [null, ""]]);
  const endpoints = ["capacity", "distance", "channels.bsc"];
  inPeriod = [];
  // A fixed spread: not every day, endpoint or key has traffic; some calls fail (0 units); one row has no key.
  for (let i = 0; i < 60; i++) {
    const day = 1 + ((i * 7) % 10);
    if (day === 4 || day === 8) continue;
    inPeriod.push({
      at: `2026-03-${String(day).padStart(2, "0")}T${String((i * 5) % 24).padStart(2, "0")}:${String(i % 60).padStart(2, "0")}:00.000Z`,
      endpoint: endpoints[i % 3]!,
      keyId: i % 11 === 0 ? null : keys[i % 2 === 0 ? 0 : (i % 3) % 2 === 0 ? 1 : 2]!.id,
      status: i % 9 === 0 ? 422 : 200,
      units: i % 9 === 0 ? 0 : 1 + (i % 4),
    });
  }
  // The first and last instants of the period.
  inPeriod.push({ at: "2026-03-01T00:00:00.000Z", endpoint: "capacity", keyId: keys[0]!.id, status: 200, units: 5 });
  inPeriod.push({ at: "2026-03-10T23:59:59.999Z", endpoint: "capacity", keyId: keys[0]!.id, status: 500, units: 0 });
  const outside: Event[] = [
    { at: "2026-02-28T23:59:59.999Z", endpoint: "capacity", keyId: keys[0]!.id, status: 200, units: 100 },
    { at: "2026-03-11T00:00:00.000Z", endpoint: "capacity", keyId: keys[0]!.id, status: 200, units: 100 },
  ];
  let n = 0;
  const insert = (orgId: number, e: Event) =>
    insertUsageEvent(fx.db, { org_id: orgId, api_key_id: e.keyId, endpoint: e.endpoint, method: "POST", status: e.status, units: e.units, duration_ms: 1, request_id: `req_usage_${++n}`, created_at: e.at, reported_at: null });
  for (const e of [...inPeriod, ...outside]) await insert(fx.org.id, e);
  // Another org's traffic inside the period must not show.
  await insert(fx.other.id, { at: "2026-03-05T12:00:00.000Z", endpoint: "capacity", keyId: fx.otherKey.record.id, status: 200, units: 1000 });
});

const usage = (query: string, cookie = fx.billing.cookie) => consoleCall("GET", `/api/console/orgs/${fx.org.slug}/usage${query}`, { cookie });

/** Sums of calls, units and errors of events grouped by `key`, computed here from the raw events. */
function expected<K>(events: Event[], key: (e: Event) => K) {
  const m = new Map<K, { calls: number; units: number; errors: number }>();
  for (const e of events) {
    const s = m.get(key(e)) ?? { calls: 0, units: 0, errors: 0 };
    s.calls += 1;
    s.units += e.units;
    s.errors += e.status >= 400 ? 1 : 0;
    m.set(key(e), s);
  }
  return m;
}

describe("usage of a period", () => {
  it("totals, the daily series zero-filled over every day, and the split by endpoint and by key add up to the events", async () => {
    const res = await usage(`?from=${FROM}&to=${TO}`);
    expect(res.status, res.text).toBe(200);
    const body = res.body;
    expect(body.from).toBe(FROM);
    expect(body.to).toBe(TO);
    expect(body.totals).toMatchObject({ calls: inPeriod.length, units: inPeriod.reduce((s, e) => s + e.units, 0) });

    const perDay = expected(inPeriod, (e) => e.at.slice(0, 10));
    const days = Array.from({ length: 10 }, (_, i) => `2026-03-${String(i + 1).padStart(2, "0")}`);
    expect(body.daily).toEqual(days.map((day) => ({ day, ...(perDay.get(day) ?? { calls: 0, units: 0, errors: 0 }) })));
    expect(body.daily.find((d: { day: string }) => d.day === "2026-03-04")).toEqual({ day: "2026-03-04", calls: 0, units: 0, errors: 0 });

    const perEndpoint = expected(inPeriod, (e) => e.endpoint);
    expect(new Map(body.byEndpoint.map((r: { endpoint: string }) => [r.endpoint, r]))).toEqual(new Map([...perEndpoint].map(([endpoint, s]) => [endpoint, { endpoint, ...s }])));

    const perKey = expected(inPeriod, (e) => e.keyId);
    expect(body.byKey).toHaveLength(perKey.size);
    for (const row of body.byKey as { keyId: number | null; prefix: string | null; calls: number; units: number }[]) {
      expect(row).toMatchObject({ calls: perKey.get(row.keyId)!.calls, units: perKey.get(row.keyId)!.units });
      expect(row.prefix ?? "").toBe(prefixOf.get(row.keyId));
    }
    // Busiest first.
    const calls = body.byKey.map((r: { calls: number }) => r.calls);
    expect(calls).toEqual([...calls].sort((a, b) => b - a));
  });

  it("CSV: the header and one line per (day, endpoint, key), as an attachment", async () => {
    const res = await usage(`?from=${FROM}&to=${TO}&format=csv`, fx.developer.cookie);
    expect(res.status, res.text).toBe(200);
    expect(res.headers["content-type"]).toMatch(/^text\/csv/);
    expect(res.headers["content-disposition"]).toMatch(/^attachment; filename="[^"]+\.csv"$/);
    const [header, ...lines] = res.text.trimEnd().split("\r\n");
    expect(header).toBe("day,endpoint,key_prefix,calls,units,errors");
    // The counts are named as in the JSON report (and in GET /api/v1/usage): "errors", the word the console pages use too.
    const json = await usage(`?from=${FROM}&to=${TO}`, fx.developer.cookie);
    expect(header!.split(",").slice(3)).toEqual(Object.keys(json.body.totals));
    const cells = expected(inPeriod, (e) => `${e.at.slice(0, 10)},${e.endpoint},${prefixOf.get(e.keyId)}`);
    expect(lines).toHaveLength(cells.size);
    expect(new Set(lines)).toEqual(new Set([...cells].map(([k, s]) => `${k},${s.calls},${s.units},${s.errors}`)));
  });

  it("defaults to the last 30 days up to today", async () => {
    const res = await usage("");
    expect(res.status).toBe(200);
    const today = new Date().toISOString().slice(0, 10);
    expect(res.body.to).toBe(today);
    expect(res.body.daily).toHaveLength(30);
    expect(res.body.daily.at(-1).day).toBe(today);
    expect(res.body.from).toBe(res.body.daily[0].day);
  });

  it("accepts a period of exactly 400 days", async () => {
    const res = await usage("?from=2025-02-07&to=2026-03-13");
    expect(res.status, res.text).toBe(200);
    expect(res.body.daily).toHaveLength(400);
    expect(res.body.totals.calls).toBe(inPeriod.length + 2);
  });

  it.each([
    ["from after to", "?from=2026-03-10&to=2026-03-01", "/from"],
    ["a period of 401 days", "?from=2025-02-06&to=2026-03-13", "/from"],
    ["a day that does not exist", "?from=2026-02-30&to=2026-03-10", "/from"],
    ["another date format", "?from=01.03.2026", "/from"],
    ["an unknown format", "?format=xlsx", "/format"],
    ["an unknown parameter", "?key=1", "/key"],
  ])("422 for %s", async (_name, query, pointer) => {
    expectFieldError(await usage(query), pointer);
  });
});
