import fc from "fast-check";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { distance } from "@/lib/api/endpoints/distance";
import { endpointRoute } from "@/lib/api/http";
import { endpoints } from "@/lib/api/registry";
import { resetRateLimits } from "@/lib/api/rate-limit";
import { allowHeader } from "@/lib/api/route-table";
import { api, expectNoStackTrace, expectProblem, getQuery, postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

const MiB = 1024 * 1024;
const REQUEST_ID = /^[A-Za-z0-9._:-]{8,128}$/;
const METHODS = ["GET", "POST", "PUT", "PATCH", "DELETE"] as const;

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey());
});

function send(method: (typeof METHODS)[number], path: string) {
  const a = api();
  const r = method === "GET" ? a.get(path) : method === "POST" ? a.post(path) : method === "PUT" ? a.put(path) : method === "PATCH" ? a.patch(path) : a.delete(path);
  return r.set("authorization", auth);
}

/** A JSON body of exactly `bytes` bytes: a valid distance request padded with spaces. */
function paddedBody(bytes: number): string {
  const core = '{"a":"1","b":"0"}';
  return core.slice(0, -1) + " ".repeat(bytes - core.length) + "}";
}

describe("unknown paths and wrong methods", () => {
  it.each(["/api/v1", "/api/v1/nope", "/api/v1/distance/extra", "/api/v1/codes/analyze/x/y"])("GET %s → 404 problem naming the path", async (path) => {
    const p = expectProblem(await api().get(path), 404, "not-found");
    expect(p.detail).toContain(path);
  });

  it("any method on an unknown path → 404 problem", async () => {
    for (const m of METHODS) expectProblem(await send(m, "/api/v1/nope"), 404, "not-found");
  });

  // Per path, the methods of its endpoints (GET and POST /claims share one); a path parameter gets a well-formed id.
  const served = [...new Set(endpoints.map((e) => e.path))].map((path) => ({ path: path.replace("{id}", "clm-0000000000000000"), methods: endpoints.filter((e) => e.path === path).map((e) => e.method as string) }));
  it.each(served.flatMap(({ path, methods }) => METHODS.filter((m) => !methods.includes(m)).map((m) => ({ m, path, methods, label: `${m} ${path}` }))))(
    "$label → 405 problem with Allow",
    async ({ m, path, methods }) => {
      const res = await send(m, `/api/v1${path}`);
      const p = expectProblem(res, 405, "method-not-allowed");
      expect(res.headers["allow"]).toBe(allowHeader(methods));
      expect(p.detail).toContain(m);
    },
  );
});

describe("request bodies", () => {
  it("a body of exactly 4 MiB is accepted", async () => {
    const body = paddedBody(4 * MiB);
    expect(Buffer.byteLength(body)).toBe(4 * MiB);
    const res = await postJson("/api/v1/distance", body, auth);
    expect(res.status, res.text).toBe(200);
  });

  it("a body of 4 MiB + 1 byte → 413 problem", async () => {
    const p = expectProblem(await postJson("/api/v1/distance", paddedBody(4 * MiB + 1), auth), 413, "payload-too-large");
    expect(p.detail).toMatch(/4 MiB|4194304/);
  });

  it("the limit counts bytes, not characters: 2.1 million 'é' (4.2 MB of UTF-8) → 413", async () => {
    const body = `{"a":"${"é".repeat(2_100_000)}","b":"0"}`;
    expect(body.length).toBeLessThan(4 * MiB);
    expectProblem(await postJson("/api/v1/distance", body, auth), 413, "payload-too-large");
  });

  it("a streamed body without Content-Length is cut off after 4 MiB (an endless stream still gets 413)", async () => {
    const chunk = new Uint8Array(64 * 1024).fill(0x20);
    let pulled = 0;
    const stream = new ReadableStream<Uint8Array>({
      pull(controller) {
        pulled++;
        controller.enqueue(chunk);
      },
    });
    const req = new Request("http://localhost/api/v1/distance", {
      method: "POST",
      headers: { authorization: auth, "content-type": "application/json" },
      body: stream,
      duplex: "half",
    } as RequestInit);
    const res = await endpointRoute(distance)(req);
    expect(res.status).toBe(413);
    expect(res.headers.get("content-type")).toMatch(/^application\/problem\+json/);
    // 4 MiB is 64 chunks; reading stopped soon after.
    expect(pulled).toBeLessThan(80);
  });

  it.each([
    ["text/plain", "text/plain"],
    ["form encoding", "application/x-www-form-urlencoded"],
    ["XML", "application/xml"],
  ])("Content-Type %s → 415 problem", async (_name, type) => {
    const res = await api().post("/api/v1/distance").set("authorization", auth).set("content-type", type).send('{"a":"1","b":"0"}');
    const p = expectProblem(res, 415, "unsupported-media-type");
    expect(p.detail).toContain(type);
  });

  it("no Content-Type → 415 problem saying it is missing", async () => {
    const res = await api().post("/api/v1/distance").set("authorization", auth).send(Buffer.from('{"a":"1","b":"0"}'));
    const p = expectProblem(res, 415, "unsupported-media-type");
    expect(p.detail).toMatch(/missing/i);
  });

  it.each(["application/json; charset=utf-8", "application/vnd.paritas+json", "APPLICATION/JSON"])("Content-Type %s is accepted", async (type) => {
    const res = await api().post("/api/v1/distance").set("authorization", auth).set("content-type", type).send('{"a":"1","b":"0"}');
    expect(res.status, res.text).toBe(200);
  });

  it.each([
    ["a missing brace", '{"a":"1","b":"0"'],
    ["single quotes", "{'a':'1','b':'0'}"],
    ["trailing garbage", '{"a":"1","b":"0"} x'],
    ["a trailing comma", '{"a":"1","b":"0",}'],
    ["bare words", "hello"],
  ])("malformed JSON (%s) → 400 problem whose detail mentions JSON", async (_name, body) => {
    const p = expectProblem(await postJson("/api/v1/distance", body, auth), 400, "bad-request");
    expect(p.detail).toMatch(/JSON/);
  });

  it.each([
    ["empty", ""],
    ["only whitespace", "  \n\t "],
  ])("an %s body → 400 problem", async (_name, body) => {
    const p = expectProblem(await postJson("/api/v1/distance", body, auth), 400, "bad-request");
    expect(p.detail).toMatch(/empty/i);
  });
});

describe("X-Request-Id", () => {
  it("every API response carries one, problems carry it as instance, and they are distinct", async () => {
    const { auth: reader } = await makeOrgWithKey({ scopes: ["usage:read"] });
    const responses = [
      await postJson("/api/v1/distance", { a: "1", b: "0" }, auth), // 200
      await getQuery("/api/v1/usage", {}, auth), // 200 GET
      await postJson("/api/v1/distance", { a: "1", b: "0" }), // 401
      await postJson("/api/v1/distance", { a: "1", b: "0" }, reader), // 403
      await api().get("/api/v1/nope"), // 404
      await api().get("/api/v1/distance"), // 405
      await postJson("/api/v1/distance", paddedBody(4 * MiB + 10), auth), // 413
      await api().post("/api/v1/distance").set("authorization", auth).set("content-type", "text/plain").send("x"), // 415
      await postJson("/api/v1/distance", "{", auth), // 400
      await postJson("/api/v1/distance", { a: 1 }, auth), // 422
    ];
    expect(responses.map((r) => r.status)).toEqual([200, 200, 401, 403, 404, 405, 413, 415, 400, 422]);
    const ids = responses.map((r) => r.headers["x-request-id"]);
    for (const id of ids) expect(id).toMatch(REQUEST_ID);
    expect(new Set(ids).size).toBe(ids.length);
    for (const r of responses.filter((x) => x.status >= 400)) expect(r.body.instance).toBe(r.headers["x-request-id"]);
  });

  it("GET /api/v1/openapi.json carries one too", async () => {
    const res = await api().get("/api/v1/openapi.json");
    expect(res.status).toBe(200);
    expect(res.headers["x-request-id"]).toMatch(REQUEST_ID);
  });

  it("a valid client-sent X-Request-Id is echoed, on success and on every kind of problem", async () => {
    const id = "trace.2026-12-01:abc_DEF-123";
    const responses = [
      await postJson("/api/v1/distance", { a: "1", b: "0" }, auth, { "x-request-id": id }),
      await postJson("/api/v1/distance", { a: "1", b: "0" }, undefined, { "x-request-id": id }),
      await postJson("/api/v1/distance", { a: 5 }, auth, { "x-request-id": id }),
      await api().get("/api/v1/nope").set("x-request-id", id),
      await api().put("/api/v1/distance").set("x-request-id", id),
    ];
    expect(responses.map((r) => r.status)).toEqual([200, 401, 422, 404, 405]);
    for (const r of responses) expect(r.headers["x-request-id"]).toBe(id);
    for (const r of responses.slice(1)) expect(r.body.instance).toBe(id);
  });

  it.each([
    ["too short", "abc"],
    ["too long", "x".repeat(129)],
    ["with a space", "has a space in it"],
    ["with a slash", "../../etc/passwd"],
    ["with markup", "<script>alert(1)</script>"],
  ])("an invalid client X-Request-Id (%s) is replaced by a generated one", async (_name, id) => {
    const res = await postJson("/api/v1/distance", { a: "1", b: "0" }, auth, { "x-request-id": id });
    expect(res.status).toBe(200);
    expect(res.headers["x-request-id"]).not.toBe(id);
    expect(res.headers["x-request-id"]).toMatch(REQUEST_ID);
  });
});

describe("RateLimit headers", () => {
  const POLICY = /^"[^"]+";q=(\d+);w=(\d+)$/;
  const LIMIT = /^"[^"]+";r=(\d+);t=(\d+)$/;

  it("are on every response to a known key: success and every kind of refusal after authentication", async () => {
    const { auth: reader } = await makeOrgWithKey({ scopes: ["usage:read"] });
    const responses = [
      await postJson("/api/v1/distance", { a: "1", b: "0" }, auth), // 200
      await getQuery("/api/v1/usage", {}, auth), // 200 GET
      await postJson("/api/v1/distance", { a: "1", b: "0" }, reader), // 403
      await postJson("/api/v1/distance", paddedBody(4 * MiB + 10), auth), // 413
      await api().post("/api/v1/distance").set("authorization", auth).set("content-type", "text/plain").send("x"), // 415
      await postJson("/api/v1/distance", "{", auth), // 400
      await postJson("/api/v1/distance", { a: 1 }, auth), // 422
      await postJson("/api/v1/distance", { a: "1", b: "0" }, auth, { "idempotency-key": "" }), // 400 bad key
    ];
    expect(responses.map((r) => r.status)).toEqual([200, 200, 403, 413, 415, 400, 422, 400]);
    for (const r of responses) {
      expect(r.headers["ratelimit-policy"], `status ${r.status}`).toMatch(POLICY);
      expect(r.headers["ratelimit"], `status ${r.status}`).toMatch(LIMIT);
    }
  });

  it("the policy states the per-minute quota and the remaining count goes down by one per call", async () => {
    const { auth: fresh } = await makeOrgWithKey();
    const a = await postJson("/api/v1/distance", { a: "1", b: "0" }, fresh);
    const b = await postJson("/api/v1/distance", { a: "1", b: "0" }, fresh);
    const [, q, w] = POLICY.exec(a.headers["ratelimit-policy"]!)!;
    expect(Number(w)).toBe(60);
    const limit = Number(process.env.PARITAS_RATE_LIMIT_PER_MINUTE ?? 600);
    expect(Number(q)).toBe(limit);
    const r1 = Number(LIMIT.exec(a.headers["ratelimit"]!)![1]);
    const r2 = Number(LIMIT.exec(b.headers["ratelimit"]!)![1]);
    expect(r1).toBe(limit - 1);
    expect(r2).toBe(limit - 2);
    const t = Number(LIMIT.exec(a.headers["ratelimit"]!)![2]);
    expect(t).toBeGreaterThanOrEqual(0);
    expect(t).toBeLessThanOrEqual(60);
  });

  it("a refused credential (401) gets none", async () => {
    const res = await postJson("/api/v1/distance", { a: "1", b: "0" });
    expect(res.status).toBe(401);
    expect(res.headers["ratelimit"]).toBeUndefined();
  });
});

describe("429 once the per-key limit is exceeded", () => {
  const saved = process.env.PARITAS_RATE_LIMIT_PER_MINUTE;
  beforeAll(() => {
    process.env.PARITAS_RATE_LIMIT_PER_MINUTE = "3";
    resetRateLimits();
  });
  afterAll(() => {
    if (saved === undefined) delete process.env.PARITAS_RATE_LIMIT_PER_MINUTE;
    else process.env.PARITAS_RATE_LIMIT_PER_MINUTE = saved;
    resetRateLimits();
  });

  it("the 4th call in a minute with a limit of 3 → 429 problem with Retry-After and the RateLimit fields", async () => {
    const { auth: k } = await makeOrgWithKey();
    const ok = [];
    for (let i = 0; i < 3; i++) ok.push(await postJson("/api/v1/distance", { a: "1", b: "0" }, k));
    expect(ok.map((r) => r.status)).toEqual([200, 200, 200]);
    expect(ok.map((r) => /r=(\d+)/.exec(r.headers["ratelimit"]!)![1])).toEqual(["2", "1", "0"]);
    expect(ok[0]!.headers["ratelimit-policy"]).toMatch(/;q=3;w=60$/);

    const res = await postJson("/api/v1/distance", { a: "1", b: "0" }, k);
    const p = expectProblem(res, 429, "rate-limited");
    const retry = res.headers["retry-after"]!;
    // RFC 9110 §10.2.3: delay-seconds, a non-negative integer.
    expect(retry).toMatch(/^\d+$/);
    expect(Number(retry)).toBeGreaterThanOrEqual(1);
    expect(Number(retry)).toBeLessThanOrEqual(60);
    expect(res.headers["ratelimit"]).toMatch(/;r=0;t=\d+$/);
    expect(res.headers["ratelimit-policy"]).toMatch(/;q=3;w=60$/);
    expect(p.detail).toContain("3");
    // Also on a GET, and the body is never read.
    expectProblem(await getQuery("/api/v1/usage", {}, k), 429, "rate-limited");
    expectProblem(await postJson("/api/v1/distance", "{not json", k), 429, "rate-limited");
  });

  it("the limit is per key: another key of the same org is not affected", async () => {
    const first = await makeOrgWithKey();
    for (let i = 0; i < 4; i++) await postJson("/api/v1/distance", { a: "1", b: "0" }, first.auth);
    const { createKey } = await import("@/lib/api/key-service");
    const { key } = await createKey(first.db, { orgId: first.org.id, name: "second", mode: "test", scopes: ["compute"] }, "test");
    const res = await postJson("/api/v1/distance", { a: "1", b: "0" }, `Bearer ${key}`);
    expect(res.status).toBe(200);
  });
});

describe("no stack traces, never a 500 for bad input", () => {
  const value = fc.oneof(
    fc.double(),
    fc.integer({ min: -2_000_000, max: 2_000_000 }),
    fc.string({ maxLength: 20 }),
    fc.boolean(),
    fc.constant(null),
    fc.array(fc.oneof(fc.integer({ min: -2, max: 3 }), fc.string({ maxLength: 4 })), { maxLength: 8 }),
    fc.dictionary(fc.string({ maxLength: 5 }), fc.integer(), { maxKeys: 3 }),
  );
  const fields = ["a", "b", "codebook", "n", "p", "flips", "t", "channel", "erasure", "snr", "snrDb", "ebN0Db", "esN0Db", "rate", "bandwidthHz", "modulation", "order", "targetBer", "code", "hex"];
  const channelish = fc.constantFrom("bsc", "bec", "awgn", "bpsk-awgn", "bpsk", "qpsk", "psk", "qam");
  // Edge numbers that a handler (not only the schema) must survive.
  const edge = fc.oneof(
    fc.constantFrom(0, 1, 2, 0.5, -1, 1e-300, 5e-324, 1e-15, 1 - 1e-16, 7, 100, -100, 4096, 1e6, 1e10),
    fc.double({ noNaN: true, min: -200, max: 200 }),
  );
  const junk = fc.oneof(
    fc.dictionary(fc.constantFrom(...fields), fc.oneof(value, channelish), { maxKeys: 5 }),
    fc.jsonValue({ maxDepth: 3 }),
  );
  const bitsLike = fc.oneof(fc.stringMatching(/^[01 _]{0,16}$/), fc.array(fc.integer({ min: 0, max: 1 }), { maxLength: 16 }));
  const replacement = fc.oneof(edge, edge, edge, bitsLike, value, channelish, fc.constant(undefined));
  /** A documented example with one or two fields replaced, dropped or added: mostly valid, so handlers run. */
  const mutated = (examples: Record<string, unknown>[]) =>
    fc
      .tuple(fc.constantFrom(...examples), fc.array(fc.tuple(fc.nat(), fc.nat({ max: 4 }), fc.constantFrom(...fields), replacement), { minLength: 1, maxLength: 2 }))
      .map(([ex, changes]) => {
        const out: Record<string, unknown> = { ...ex };
        const own = Object.keys(ex);
        for (const [i, pick, other, v] of changes) {
          // Four times in five change a field the example has, so that the rest stays valid.
          const key = pick < 4 && own.length ? own[i % own.length]! : other;
          if (v === undefined) delete out[key];
          else out[key] = v;
        }
        return out;
      });

  /** A documented example with its numbers scaled (0, tiny, half, double, ten-fold, huge): mostly in range, so handlers meet edge values. */
  const scaled = (examples: Record<string, unknown>[]) =>
    fc.tuple(fc.constantFrom(...examples), fc.array(fc.constantFrom(0, 1e-9, 0.5, 1, 1, 1, 2, 10, 1e6), { minLength: 8, maxLength: 8 })).map(([ex, f]) => {
      let i = 0;
      const walk = (v: unknown): unknown => {
        if (typeof v === "number") {
          const x = v * f[i++ % f.length]!;
          return Number.isInteger(v) ? Math.round(x) : x;
        }
        if (Array.isArray(v)) return v.map(walk);
        if (v && typeof v === "object") return Object.fromEntries(Object.entries(v).map(([k, x]) => [k, walk(x)]));
        return v;
      };
      return walk(ex);
    });

  it.each(endpoints.filter((e) => e.method === "POST"))("POST $path: random bodies get a success or a clean problem (seeded property test)", async (e) => {
    const { auth: k } = await makeOrgWithKey();
    const examples = Object.values(e.examples).map((x) => x.value as Record<string, unknown>);
    const body = fc.oneof({ arbitrary: scaled(examples), weight: 3 }, { arbitrary: mutated(examples), weight: 3 }, { arbitrary: junk, weight: 1 });
    await fc.assert(
      fc.asyncProperty(body, async (b) => {
        const res = await postJson(`/api/v1${e.path}`, JSON.stringify(b) ?? "null", k);
        expect(res.status, `${JSON.stringify(b)} → ${res.text}`).not.toBe(500);
        if (res.status >= 300) expectProblem(res, res.status, res.body.type.replace("/problems/", ""));
        expectNoStackTrace(res.text);
      }),
      { seed: 20261201, numRuns: 150 },
    );
  });

  it("GET /usage: random query strings get 200 or a clean problem (seeded property test)", async () => {
    const { auth: k } = await makeOrgWithKey();
    const query = fc.dictionary(fc.constantFrom("from", "to", "limit", "cursor", "x"), fc.oneof(fc.string({ maxLength: 12 }), fc.integer().map(String), fc.date({ noInvalidDate: true }).map((d) => d.toISOString().slice(0, 10))), { maxKeys: 4 });
    await fc.assert(
      fc.asyncProperty(query, async (q) => {
        const res = await getQuery("/api/v1/usage", q, k);
        expect(res.status, `${JSON.stringify(q)} → ${res.text}`).not.toBe(500);
        if (res.status >= 300) expectProblem(res, res.status, res.body.type.replace("/problems/", ""));
      }),
      { seed: 20261201, numRuns: 150 },
    );
  });
});
