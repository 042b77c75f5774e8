import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { findApiKeyById } from "@/db/queries/api-keys";
import { listUsageEvents } from "@/db/queries/usage";
import { unitsOf, type Endpoint } from "@/lib/api/endpoint";

import { bsc } from "@/lib/api/endpoints/bsc";
import { capacity } from "@/lib/api/endpoints/capacity";
import { distance } from "@/lib/api/endpoints/distance";
import { linkBer } from "@/lib/api/endpoints/links";
import { usage } from "@/lib/api/endpoints/usage";
import { resetRateLimits } from "@/lib/api/rate-limit";
import { api, getQuery, postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

const today = () => new Date().toISOString().slice(0, 10);

async function totalUsageRows(): Promise<number> {
  const db = await getDb();
  const r = await db.selectFrom("usage_events").select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow();
  return Number(r.n);
}

/** The definition's charge for this input. */
function costOf(e: Endpoint, input: unknown): number {
  return unitsOf(e, e.input.parse(input));
}

describe("metering: one usage row per authenticated call", () => {
  it("N successful calls → N rows with the endpoint, status, the units of X-Compute-Units and the definition's cost, and the X-Request-Id", async () => {
    const { db, org, keyId, auth } = await makeOrgWithKey();
    const calls: { e: Endpoint; input: Record<string, unknown> }[] = [
      { e: distance as unknown as Endpoint, input: { a: "1011", b: "1001" } },
      // Two 600,000-bit words: 4·2·600,000 + 64 = 4,800,064 work → 2 units.
      { e: distance as unknown as Endpoint, input: { a: "0".repeat(600_000), b: "1".repeat(600_000) } },
      { e: bsc as unknown as Endpoint, input: { n: 7, p: 0.001, t: 1 } },
      { e: capacity as unknown as Endpoint, input: { channel: "bsc", p: 0.11 } },
      // 64 8-PSK points with the nearest-neighbour BER: 256 + 64·2^16 = 4,194,560 work → 2 units.
      { e: linkBer as unknown as Endpoint, input: { modulation: "psk", order: 8, berFormula: "nearest-neighbour", ebN0Db: Array.from({ length: 64 }, (_, i) => i / 10) } },
      { e: usage as unknown as Endpoint, input: {} },
    ];
    const seen: { id: string; units: number; endpoint: string; method: string }[] = [];
    const before = new Date().toISOString();
    for (const { e, input } of calls) {
      const url = `/api/v1${e.path}`;
      const res = e.method === "GET" ? await getQuery(url, input as Record<string, string>, auth) : await postJson(url, input, auth);
      expect(res.status, res.text).toBe(200);
      const units = Number(res.headers["x-compute-units"]);
      expect(units).toBe(costOf(e, input));
      seen.push({ id: res.headers["x-request-id"]!, units, endpoint: e.id, method: e.method });
    }
    const after = new Date().toISOString();
    // The documented rules, by hand (1 unit per started 2^22 work units, at least 1; GET /usage is free):
    // distance 4·(4 + 4) + 64; distance 4·1,200,000 + 64; bsc n + 64; capacity BSC 256; links 256 + 64·2^16; usage 0.
    const charge = (work: number) => Math.max(1, Math.ceil(work / 2 ** 22));
    const byHand = [charge(4 * 8 + 64), charge(4 * 1_200_000 + 64), charge(7 + 64), charge(256), charge(256 + 64 * 2 ** 16), 0];
    expect(byHand).toEqual([1, 2, 1, 1, 2, 0]);
    expect(seen.map((s) => s.units)).toEqual(byHand);

    const rows = await listUsageEvents(db, org.id);
    expect(rows).toHaveLength(calls.length);
    rows.forEach((r, i) => {
      expect(r.request_id).toBe(seen[i]!.id);
      expect(r.units).toBe(seen[i]!.units);
      expect(r.endpoint).toBe(seen[i]!.endpoint);
      expect(r.method).toBe(seen[i]!.method);
      expect(r.status).toBe(200);
      expect(r.api_key_id).toBe(keyId);
      expect(r.duration_ms).toBeGreaterThanOrEqual(0);
      expect(r.created_at >= before && r.created_at <= after).toBe(true);
      expect(r.reported_at).toBeNull();
    });
    // Request ids are distinct.
    expect(new Set(rows.map((r) => r.request_id)).size).toBe(rows.length);
  });

  it("a valid client-sent X-Request-Id is echoed and stored on the row", async () => {
    const { db, org, auth } = await makeOrgWithKey();
    const id = "client-trace-0001:abc";
    const res = await postJson("/api/v1/distance", { a: "1", b: "1" }, auth, { "x-request-id": id });
    expect(res.headers["x-request-id"]).toBe(id);
    const rows = await listUsageEvents(db, org.id);
    expect(rows.map((r) => r.request_id)).toEqual([id]);
  });

  it("the key's last-used time is set by a call", async () => {
    const { db, org, keyId, auth } = await makeOrgWithKey();
    expect((await findApiKeyById(db, org.id, keyId))!.last_used_at).toBeNull();
    const before = new Date().toISOString();
    await postJson("/api/v1/distance", { a: "1", b: "1" }, auth);
    const used = (await findApiKeyById(db, org.id, keyId))!.last_used_at;
    expect(used).not.toBeNull();
    expect(used! >= before).toBe(true);
  });
});

describe("metering: refused calls", () => {
  it("401 calls write no usage row at all (no organisation is known)", async () => {
    const n0 = await totalUsageRows();
    await postJson("/api/v1/distance", { a: "1", b: "1" });
    await postJson("/api/v1/distance", { a: "1", b: "1" }, "Bearer prt_test_nope");
    await getQuery("/api/v1/usage", {});
    expect(await totalUsageRows()).toBe(n0);
  });

  it("404 and 405 answers are given before any key is looked at and write no row", async () => {
    const { auth } = await makeOrgWithKey();
    const n0 = await totalUsageRows();
    await api().get("/api/v1/no-such-thing").set("authorization", auth);
    await api().get("/api/v1/distance").set("authorization", auth);
    expect(await totalUsageRows()).toBe(n0);
  });

  it("403 (wrong scope, both ways) is recorded with 0 units", async () => {
    const reader = await makeOrgWithKey({ scopes: ["usage:read"] });
    const r1 = await postJson("/api/v1/distance", { a: "1", b: "1" }, reader.auth);
    expect(r1.status).toBe(403);
    const computer = await makeOrgWithKey({ scopes: ["compute"] });
    const r2 = await getQuery("/api/v1/usage", {}, computer.auth);
    expect(r2.status).toBe(403);
    const rows1 = await listUsageEvents(reader.db, reader.org.id);
    expect(rows1.map((r) => [r.endpoint, r.status, r.units, r.request_id])).toEqual([["distance", 403, 0, r1.headers["x-request-id"]]]);
    const rows2 = await listUsageEvents(computer.db, computer.org.id);
    expect(rows2.map((r) => [r.endpoint, r.status, r.units, r.request_id])).toEqual([["usage", 403, 0, r2.headers["x-request-id"]]]);
  });

  it("422, 400, 415 and 413 are recorded with their status and 0 units", async () => {
    const { db, org, auth } = await makeOrgWithKey();
    const statuses: number[] = [];
    statuses.push((await postJson("/api/v1/distance", { a: "1", b: "10" }, auth)).status);
    statuses.push((await postJson("/api/v1/distance", "{oops", auth)).status);
    statuses.push((await api().post("/api/v1/distance").set("authorization", auth).set("content-type", "text/plain").send("a=1")).status);
    statuses.push((await postJson("/api/v1/distance", `{"a":"${"1".repeat(4 * 1024 * 1024)}"}`, auth)).status);
    expect(statuses).toEqual([422, 400, 415, 413]);
    const rows = await listUsageEvents(db, org.id);
    expect(rows.map((r) => [r.status, r.units])).toEqual([
      [422, 0],
      [400, 0],
      [415, 0],
      [413, 0],
    ]);
  });

  describe("429", () => {
    const saved = process.env.PARITAS_RATE_LIMIT_PER_MINUTE;
    beforeAll(() => {
      process.env.PARITAS_RATE_LIMIT_PER_MINUTE = "2";
      resetRateLimits();
    });
    afterAll(() => {
      if (saved === undefined) delete process.env.PARITAS_RATE_LIMIT_PER_MINUTE;
      else process.env.PARITAS_RATE_LIMIT_PER_MINUTE = saved;
      resetRateLimits();
    });

    it("a rate-limited call is recorded with 0 units", async () => {
      const { db, org, auth } = await makeOrgWithKey();
      const statuses = [];
      for (let i = 0; i < 3; i++) statuses.push((await postJson("/api/v1/distance", { a: "1", b: "1" }, auth)).status);
      expect(statuses).toEqual([200, 200, 429]);
      const rows = await listUsageEvents(db, org.id);
      expect(rows.map((r) => [r.status, r.units])).toEqual([
        [200, 1],
        [200, 1],
        [429, 0],
      ]);
    });
  });
});

describe("metering: idempotent replays", () => {
  it("a replay is recorded with 0 units and says so in X-Compute-Units; the org is charged once", async () => {
    const { db, org, auth } = await makeOrgWithKey();
    // 4·1,200,000 + 64 work: 2 units by the documented rule.
    const body = { a: "0".repeat(600_000), b: "1".repeat(600_000) };
    const first = await postJson("/api/v1/distance", body, auth, { "idempotency-key": "meter-once-1" });
    const again = await postJson("/api/v1/distance", body, auth, { "idempotency-key": "meter-once-1" });
    expect(first.status).toBe(200);
    expect(again.status).toBe(200);
    expect(again.headers["idempotency-replayed"]).toBe("true");
    expect(first.headers["x-compute-units"]).toBe("2");
    expect(again.headers["x-compute-units"]).toBe("0");
    const rows = await listUsageEvents(db, org.id);
    expect(rows.map((r) => [r.status, r.units, r.request_id])).toEqual([
      [200, 2, first.headers["x-request-id"]],
      [200, 0, again.headers["x-request-id"]],
    ]);
    expect(rows.reduce((s, r) => s + r.units, 0)).toBe(2);
  });
});

describe("GET /usage reflects the metered calls", () => {
  it("calls, units and errors per endpoint for today match what was done", async () => {
    const { auth } = await makeOrgWithKey();
    const day = today();
    // distance: 3 calls, 2 ok (1 + 2 units: 4·2 + 64 and 4·1,200,000 + 64 work), 1 refused (422).
    await postJson("/api/v1/distance", { a: "1", b: "0" }, auth);
    await postJson("/api/v1/distance", { a: "0".repeat(600_000), b: "0".repeat(600_000) }, auth);
    await postJson("/api/v1/distance", { a: "1" }, auth);
    // channels.bsc: 2 calls, one of them replayed: 1 unit in all.
    await postJson("/api/v1/channels/bsc", { n: 7, p: 0.01 }, auth, { "idempotency-key": "usage-view-1" });
    await postJson("/api/v1/channels/bsc", { n: 7, p: 0.01 }, auth, { "idempotency-key": "usage-view-1" });
    // capacity: 1 bad call.
    await postJson("/api/v1/capacity", { channel: "nope" }, auth);

    const res = await getQuery("/api/v1/usage", { from: day, to: day }, auth);
    expect(res.status, res.text).toBe(200);
    expect(res.body.data).toEqual([
      { day, endpoint: "capacity", calls: 1, units: 0, errors: 1 },
      { day, endpoint: "channels.bsc", calls: 2, units: 1, errors: 0 },
      { day, endpoint: "distance", calls: 3, units: 3, errors: 1 },
    ]);

    // The usage call itself is metered too (0 units), and shows on the next read.
    const again = await getQuery("/api/v1/usage", { from: day, to: day }, auth);
    expect(again.body.data).toContainEqual({ day, endpoint: "usage", calls: 1, units: 0, errors: 0 });
  });
});
