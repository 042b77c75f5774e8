import { beforeAll, describe, expect, it } from "vitest";
import { claimIdempotencyKey, findIdempotencyRecord } from "@/db/queries/idempotency";
import { listUsageEvents } from "@/db/queries/usage";
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
      now: now.toISOString(),
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
