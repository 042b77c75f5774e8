import { Migrator, type Kysely } from "kysely";
import { beforeAll, describe, expect, it } from "vitest";
import { openDb } from "@/db";
import {
  claimIdempotencyKey,
  completeIdempotencyRecord,
  findIdempotencyRecord,
  releaseIdempotencyKey,
  takeOverIdempotencyKey,
  type IdempotencyClaim,
} from "@/db/queries/idempotency";
import { listUsageEvents } from "@/db/queries/usage";
import { IDEMPOTENCY_LEASE_MARGIN_MS, IDEMPOTENCY_LEASE_MS } from "@/lib/api/idempotency";
import { poolLimits } from "@/lib/jobs/pool";
import { migrations } from "@/migrations";
import { expectProblem, getQuery, postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

type Ctx = Awaited<ReturnType<typeof makeOrgWithKey>>;
let ctx: Ctx;
beforeAll(async () => {
  ctx = await makeOrgWithKey();
});

const post = (path: string, body: unknown, key: string | undefined, auth = ctx.auth) => postJson(path, body, auth, key === undefined ? {} : { "idempotency-key": key });
const HOUR = 3600_000;

describe("Idempotency-Key: replay", () => {
  it("the same key and body replays the stored response: same status and body, idempotency-replayed: true, a new request id", async () => {
    const body = { codebook: ["00000", "01101", "10110", "11011"] };
    const first = await post("/api/v1/distance", body, "replay-1");
    expect(first.status).toBe(200);
    expect(first.headers["idempotency-replayed"]).toBeUndefined();
    const second = await post("/api/v1/distance", body, "replay-1");
    expect(second.status).toBe(200);
    expect(second.headers["idempotency-replayed"]).toBe("true");
    expect(second.text).toBe(first.text);
    expect(second.headers["content-type"]).toBe(first.headers["content-type"]);
    expect(second.headers["x-request-id"]).toBeTruthy();
    expect(second.headers["x-request-id"]).not.toBe(first.headers["x-request-id"]);
    expect(second.headers["ratelimit"]).toBeTruthy();
    expect(second.headers["ratelimit-policy"]).toBeTruthy();
    // A third time still replays.
    const third = await post("/api/v1/distance", body, "replay-1");
    expect(third.headers["idempotency-replayed"]).toBe("true");
    expect(third.text).toBe(first.text);
  });

  it("a refused request (422) is stored and replayed as well", async () => {
    const body = { n: 0, p: 0.1 };
    const first = await post("/api/v1/channels/bsc", body, "replay-422");
    expectProblem(first, 422, "validation-failed");
    const second = await post("/api/v1/channels/bsc", body, "replay-422");
    expect(second.status).toBe(422);
    expect(second.headers["idempotency-replayed"]).toBe("true");
    expect(second.text).toBe(first.text);
    expect(second.headers["content-type"]).toMatch(/^application\/problem\+json/);
  });

  it("without the header, the same body runs again each time", async () => {
    const a = await post("/api/v1/capacity", { channel: "bsc", p: 0.11 }, undefined);
    const b = await post("/api/v1/capacity", { channel: "bsc", p: 0.11 }, undefined);
    expect(a.headers["idempotency-replayed"]).toBeUndefined();
    expect(b.headers["idempotency-replayed"]).toBeUndefined();
  });

  it("GET ignores Idempotency-Key, even an invalid one", async () => {
    const res = await getQuery("/api/v1/usage", {}, ctx.auth, { "idempotency-key": "not valid because of spaces" });
    expect(res.status).toBe(200);
    expect(res.headers["idempotency-replayed"]).toBeUndefined();
  });
});

describe("Idempotency-Key: reuse with another request", () => {
  it("the same key with another body → 422 idempotency-key-reused, naming the key", async () => {
    expect((await post("/api/v1/distance", { a: "1", b: "0" }, "reuse-1")).status).toBe(200);
    const res = await post("/api/v1/distance", { a: "1", b: "1" }, "reuse-1");
    const p = expectProblem(res, 422, "idempotency-key-reused");
    expect(p.detail).toContain("reuse-1");
    expect(res.headers["idempotency-replayed"]).toBeUndefined();
  });

  it("the same key and body on another endpoint → 422 idempotency-key-reused", async () => {
    const body = { n: 7, p: 0.001 };
    expect((await post("/api/v1/channels/bsc", body, "reuse-2")).status).toBe(200);
    // A capacity body is different anyway; the endpoint alone must also make it another request.
    const res = await post("/api/v1/capacity", body, "reuse-2");
    expectProblem(res, 422, "idempotency-key-reused");
  });

  it("keys belong to one organisation: another org may use the same key for its own request", async () => {
    expect((await post("/api/v1/distance", { a: "11", b: "00" }, "shared-key")).status).toBe(200);
    const other = await makeOrgWithKey();
    const res = await post("/api/v1/distance", { a: "1", b: "1" }, "shared-key", other.auth);
    expect(res.status).toBe(200);
    expect(res.headers["idempotency-replayed"]).toBeUndefined();
    expect(res.body.distance).toBe(0);
  });

  it("a body that could not be read (malformed JSON) does not take the key", async () => {
    expect((await post("/api/v1/distance", "{broken", "unread-1")).status).toBe(400);
    const res = await post("/api/v1/distance", { a: "1", b: "0" }, "unread-1");
    expect(res.status).toBe(200);
    expect(res.headers["idempotency-replayed"]).toBeUndefined();
  });
});

describe("Idempotency-Key: a request still running", () => {
  it("→ 409 conflict with Retry-After while the first request holds the key", async () => {
    const body = { n: 7, p: 0.002, t: 1 };
    // The request fingerprint is taken from a real first use, so the test needs no knowledge of how it is computed.
    expect((await post("/api/v1/channels/bsc", body, "fingerprint-source")).status).toBe(200);
    const source = await findIdempotencyRecord(ctx.db, ctx.org.id, "fingerprint-source");
    expect(source?.state).toBe("done");
    const now = new Date();
    const claimed = await claimIdempotencyKey(ctx.db, {
      orgId: ctx.org.id,
      key: "running-1",
      endpoint: "channels.bsc",
      requestHash: source!.request_hash,
      holder: "first-request",
      now: now.toISOString(),
      leaseExpiresAt: new Date(now.getTime() + IDEMPOTENCY_LEASE_MS).toISOString(),
      expiresAt: new Date(now.getTime() + 24 * HOUR).toISOString(),
    });
    expect(claimed).toBe(true);

    const res = await post("/api/v1/channels/bsc", body, "running-1");
    const p = expectProblem(res, 409, "conflict");
    expect(p.detail).toContain("running-1");
    expect(Number(res.headers["retry-after"])).toBeGreaterThanOrEqual(1);
    // The running record is left alone.
    expect((await findIdempotencyRecord(ctx.db, ctx.org.id, "running-1"))?.state).toBe("running");
  });
});

/** A claim of `key` as a request would make it, `startedMsAgo` before now, with its lease ending `leaseEndsInMs` from now (negative: over). */
function claimOf(key: string, requestHash: string, holder: string, startedMsAgo: number, leaseEndsInMs: number): IdempotencyClaim {
  const now = Date.now();
  return {
    orgId: ctx.org.id,
    key,
    endpoint: "distance",
    requestHash,
    holder,
    now: new Date(now - startedMsAgo).toISOString(),
    leaseExpiresAt: new Date(now + leaseEndsInMs).toISOString(),
    expiresAt: new Date(now - startedMsAgo + 24 * HOUR).toISOString(),
  };
}

/** The request fingerprint of `body` on /distance, taken from a real first use under another key. */
async function fingerprintOf(body: unknown, sourceKey: string): Promise<string> {
  expect((await post("/api/v1/distance", body, sourceKey)).status).toBe(200);
  return (await findIdempotencyRecord(ctx.db, ctx.org.id, sourceKey))!.request_hash;
}

/** Leave `key` "running" for `body` as a server that stopped mid-request would. */
async function leaveRunning(key: string, body: unknown, leaseEndsInMs: number): Promise<void> {
  const hash = await fingerprintOf(body, `${key}-source`);
  expect(await claimIdempotencyKey(ctx.db, claimOf(key, hash, "stopped-server", 60_000, leaseEndsInMs))).toBe(true);
}

const unitsOf = async (requestIds: string[]) => (await listUsageEvents(ctx.db, ctx.org.id)).filter((r) => requestIds.includes(r.request_id)).map((r) => r.units);

describe("Idempotency-Key: the lease of a running request", () => {
  it("lasts the pool's per-task deadline plus a 15 s margin, so a live request always ends inside it", () => {
    expect(IDEMPOTENCY_LEASE_MARGIN_MS).toBe(15_000);
    expect(IDEMPOTENCY_LEASE_MS).toBe(poolLimits.deadlineMs + 15_000);
  });

  it("each claim has its own random holder and a lease of IDEMPOTENCY_LEASE_MS from its start", async () => {
    expect((await post("/api/v1/distance", { a: "1100", b: "0011" }, "lease-a")).status).toBe(200);
    expect((await post("/api/v1/distance", { a: "1100", b: "0011" }, "lease-b")).status).toBe(200);
    const [a, b] = [await findIdempotencyRecord(ctx.db, ctx.org.id, "lease-a"), await findIdempotencyRecord(ctx.db, ctx.org.id, "lease-b")];
    expect(a!.holder).toMatch(/^[0-9a-f]{32}$/);
    expect(b!.holder).toMatch(/^[0-9a-f]{32}$/);
    expect(a!.holder).not.toBe(b!.holder);
    expect(Date.parse(a!.lease_expires_at!) - Date.parse(a!.created_at)).toBe(IDEMPOTENCY_LEASE_MS);
  });

  it("inside the lease → 409, its Retry-After the seconds left, at most 5", async () => {
    const body = { a: "101", b: "010" };
    await leaveRunning("lease-live", body, 60_000);
    const res = await post("/api/v1/distance", body, "lease-live");
    const p = expectProblem(res, 409, "conflict");
    expect(res.headers["retry-after"]).toBe("5");
    expect(p.detail).toMatch(/once its lease ends, in (59|60) s/);

    await leaveRunning("lease-ending", body, 1500);
    const soon = await post("/api/v1/distance", body, "lease-ending");
    expectProblem(soon, 409, "conflict");
    // 1.5 s were left when the record was written; less is left when the retry reads it.
    expect(Number(soon.headers["retry-after"])).toBeGreaterThanOrEqual(1);
    expect(Number(soon.headers["retry-after"])).toBeLessThanOrEqual(2);
    const rec = await findIdempotencyRecord(ctx.db, ctx.org.id, "lease-live");
    expect([rec?.state, rec?.holder]).toEqual(["running", "stopped-server"]);
  });

  it("past its lease → the retry takes the record over and runs once (charged, not a replay); the next retry replays it", async () => {
    const body = { a: "1111", b: "0000" };
    await leaveRunning("lease-over", body, -1000);
    const retry = await post("/api/v1/distance", body, "lease-over", ctx.auth);
    expect(retry.status, retry.text).toBe(200);
    expect(retry.headers["idempotency-replayed"]).toBeUndefined();
    expect(retry.headers["x-compute-units"]).toBe("1");
    expect(retry.body.distance).toBe(4);
    const rec = await findIdempotencyRecord(ctx.db, ctx.org.id, "lease-over");
    expect(rec?.state).toBe("done");
    expect(rec?.holder).not.toBe("stopped-server");

    const again = await post("/api/v1/distance", body, "lease-over");
    expect(again.headers["idempotency-replayed"]).toBe("true");
    expect(again.text).toBe(retry.text);
    expect(again.headers["x-compute-units"]).toBe("0");
  });

  it("two retries racing for an abandoned record: exactly one runs, the other gets 409 or the replay", async () => {
    const body = { a: "110011", b: "001100" };
    await leaveRunning("lease-race", body, -1);
    const ids = ["race-retry-1", "race-retry-2"];
    const answers = await Promise.all(ids.map((id) => postJson("/api/v1/distance", body, ctx.auth, { "idempotency-key": "lease-race", "x-request-id": id })));
    const ran = answers.filter((r) => r.status === 200 && r.headers["idempotency-replayed"] === undefined);
    expect(ran).toHaveLength(1);
    const other = answers.find((r) => r !== ran[0])!;
    expect(other.status === 409 || other.headers["idempotency-replayed"] === "true", other.text).toBe(true);
    expect((await unitsOf(ids)).sort()).toEqual([0, 1]);
  });

  it("another body does not take over an abandoned record: 422, and the record stays as it was", async () => {
    await leaveRunning("lease-other-body", { a: "1", b: "1" }, -1000);
    const res = await post("/api/v1/distance", { a: "1", b: "0" }, "lease-other-body");
    expectProblem(res, 422, "idempotency-key-reused");
    const rec = await findIdempotencyRecord(ctx.db, ctx.org.id, "lease-other-body");
    expect([rec?.state, rec?.holder]).toEqual(["running", "stopped-server"]);
  });
});

describe("idempotency records: holders and takeovers (db/queries/idempotency.ts)", () => {
  it("a takeover needs a running record of the same request whose lease is over; of two takeovers, one wins", async () => {
    const hash = await fingerprintOf({ a: "10", b: "10" }, "takeover-source");
    expect(await claimIdempotencyKey(ctx.db, claimOf("takeover", hash, "first", 60_000, 5_000))).toBe(true);
    // Lease still running: refused.
    expect(await takeOverIdempotencyKey(ctx.db, claimOf("takeover", hash, "second", 0, 30_000))).toBe(false);
    await ctx.db.updateTable("idempotency_records").set({ lease_expires_at: new Date(Date.now() - 1).toISOString() }).where("idem_key", "=", "takeover").execute();
    // Another request's fingerprint: refused.
    expect(await takeOverIdempotencyKey(ctx.db, claimOf("takeover", "0".repeat(64), "second", 0, 30_000))).toBe(false);
    const racers = await Promise.all(["second", "third"].map((h) => takeOverIdempotencyKey(ctx.db, claimOf("takeover", hash, h, 0, 30_000))));
    expect(racers.filter(Boolean)).toHaveLength(1);
    const rec = await findIdempotencyRecord(ctx.db, ctx.org.id, "takeover");
    expect(rec?.holder).toBe(racers[0] ? "second" : "third");
    expect(Date.parse(rec!.lease_expires_at!)).toBeGreaterThan(Date.now());
  });

  it("only the holder completes or releases a record: a request that outlived its lease leaves the new holder's record alone", async () => {
    const hash = await fingerprintOf({ a: "01", b: "01" }, "holder-source");
    expect(await claimIdempotencyKey(ctx.db, claimOf("holder", hash, "slow", 60_000, -1))).toBe(true);
    expect(await takeOverIdempotencyKey(ctx.db, claimOf("holder", hash, "retry", 0, 30_000))).toBe(true);
    const response = { status: 200, headers: { "content-type": "application/json" }, body: '{"late":true}' };
    expect(await completeIdempotencyRecord(ctx.db, ctx.org.id, "holder", "slow", response)).toBe(false);
    await releaseIdempotencyKey(ctx.db, ctx.org.id, "holder", "slow");
    expect((await findIdempotencyRecord(ctx.db, ctx.org.id, "holder"))?.state).toBe("running");
    expect(await completeIdempotencyRecord(ctx.db, ctx.org.id, "holder", "retry", { ...response, body: '{"late":false}' })).toBe(true);
    const rec = await findIdempotencyRecord(ctx.db, ctx.org.id, "holder");
    expect([rec?.state, rec?.response_body]).toEqual(["done", '{"late":false}']);
    // Once done, no holder can release it.
    await releaseIdempotencyKey(ctx.db, ctx.org.id, "holder", "retry");
    expect((await findIdempotencyRecord(ctx.db, ctx.org.id, "holder"))?.state).toBe("done");
  });
});

describe("migration 0003_idempotency_lease", () => {
  it("gives records running before it a lease that ended when they started, and leaves done records without one", async () => {
    const db = openDb(":memory:");
    try {
      const migrator = new Migrator({ db, provider: { getMigrations: async () => migrations } });
      expect((await migrator.migrateTo("0002_console")).error).toBeUndefined();
      const old = db as unknown as Kysely<Record<string, Record<string, unknown>>>;
      await old.insertInto("orgs").values({ slug: "before", name: "Before", plan: "starter", created_at: "2026-01-01T00:00:00.000Z" }).execute();
      const row = { org_id: 1, endpoint: "distance", request_hash: "h", created_at: "2026-01-02T00:00:00.000Z", expires_at: "2026-01-03T00:00:00.000Z" };
      await old.insertInto("idempotency_records").values([{ ...row, idem_key: "was-running", state: "running" }, { ...row, idem_key: "was-done", state: "done", response_status: 200 }]).execute();
      expect((await migrator.migrateToLatest()).error).toBeUndefined();
      const running = await findIdempotencyRecord(db, 1, "was-running");
      const done = await findIdempotencyRecord(db, 1, "was-done");
      expect([running?.lease_expires_at, running?.holder]).toEqual(["2026-01-02T00:00:00.000Z", null]);
      expect([done?.lease_expires_at, done?.holder]).toEqual([null, null]);
    } finally {
      await db.destroy();
    }
  });
});

describe("Idempotency-Key: expiry after 24 h", () => {
  it("a stored response is kept for exactly 24 h", async () => {
    expect((await post("/api/v1/distance", { a: "10", b: "01" }, "ttl-1")).status).toBe(200);
    const rec = await findIdempotencyRecord(ctx.db, ctx.org.id, "ttl-1");
    expect(rec?.state).toBe("done");
    expect(Date.parse(rec!.expires_at) - Date.parse(rec!.created_at)).toBe(24 * HOUR);
  });

  it("just before expiry the response is still replayed", async () => {
    const body = { a: "10", b: "11" };
    await post("/api/v1/distance", body, "ttl-2");
    await ctx.db.updateTable("idempotency_records").set({ expires_at: new Date(Date.now() + 60_000).toISOString() }).where("idem_key", "=", "ttl-2").execute();
    const res = await post("/api/v1/distance", body, "ttl-2");
    expect(res.headers["idempotency-replayed"]).toBe("true");
  });

  it("after expiry the key is free: another body runs, and the same body runs (and is charged) again", async () => {
    const { db, org, auth } = await makeOrgWithKey();
    const expire = (key: string) =>
      db.updateTable("idempotency_records").set({ expires_at: new Date(Date.now() - 1000).toISOString() }).where("org_id", "=", org.id).where("idem_key", "=", key).execute();

    expect((await post("/api/v1/distance", { a: "1", b: "0" }, "ttl-3", auth)).status).toBe(200);
    await expire("ttl-3");
    const other = await post("/api/v1/distance", { a: "11", b: "00" }, "ttl-3", auth);
    expect(other.status).toBe(200);
    expect(other.headers["idempotency-replayed"]).toBeUndefined();
    expect(other.body.distance).toBe(2);

    await expire("ttl-3");
    const same = await post("/api/v1/distance", { a: "11", b: "00" }, "ttl-3", auth);
    expect(same.status).toBe(200);
    expect(same.headers["idempotency-replayed"]).toBeUndefined();
    expect(same.headers["x-compute-units"]).toBe("1");

    const rows = await listUsageEvents(db, org.id);
    expect(rows.map((r) => r.units)).toEqual([1, 1, 1]);
  });
});

describe("Idempotency-Key: invalid header", () => {
  it.each([
    ["empty", ""],
    ["256 characters (over 255)", "k".repeat(256)],
    ["with a space", "two words"],
    ["with a tab", "tab\there"],
  ])("%s → 400 bad-request naming the header", async (_name, key) => {
    const res = await post("/api/v1/distance", { a: "1", b: "0" }, key);
    const p = expectProblem(res, 400, "bad-request");
    expect(p.detail).toMatch(/Idempotency-Key/);
  });

  it.each([
    ["1 character", "x"],
    ["255 characters", "k".repeat(255)],
    ["all visible ASCII punctuation", "!\"#$%&'()*+,-./:;<=>?@[\\]^_`{|}~"],
  ])("%s is a valid key", async (_name, key) => {
    const res = await post("/api/v1/distance", { a: "1", b: "0" }, key);
    expect(res.status, res.text).toBe(200);
  });
});
