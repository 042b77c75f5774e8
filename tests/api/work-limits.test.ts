import type { Server } from "node:http";
import request, { type Response } from "supertest";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import type { Db } from "@/db";
import { listUsageEvents } from "@/db/queries/usage";
import { closePools, poolLimits } from "@/lib/jobs/pool";
import { expectProblem, expectWorkLimit, postJson } from "../helpers/api";
import { createApp } from "../helpers/app";
import { makeOrgWithKey } from "../helpers/fixtures";
import { rng } from "../helpers/rng";

/**
 * Requests whose math would hold a core for seconds or more: each is refused before the work starts (422
 * work-limit, charged nothing) or runs on the worker pool, and meanwhile the event loop keeps answering a
 * cheap request. Expected figures come from the published work rules, written out here:
 * 1 compute unit per started 2^22 work units (at least 1), at most 2^32 work units per call.
 */
const MAX_WORK = 2 ** 32;
const unitsFor = (work: number) => Math.max(1, Math.ceil(work / 2 ** 22));

let auth: string;
let cheapAuth: string;
let db: Db;
let orgId: number;
// The cheap probes go to one server that stays listening, so that their time is the event loop's, not a new socket's.
let probeServer: Server;
const cheapCall = () => request(probeServer).post("/api/v1/distance").set("content-type", "application/json").set("authorization", cheapAuth).send({ a: "1011", b: "1001" });

beforeAll(async () => {
  const heavy = await makeOrgWithKey({ scopes: ["compute"] });
  ({ auth, db } = heavy);
  orgId = heavy.org.id;
  // The cheap probes use their own key, so that their rate and usage rows stay apart from the heavy calls'.
  ({ auth: cheapAuth } = await makeOrgWithKey({ scopes: ["compute"] }));
  probeServer = createApp();
  await new Promise<void>((resolve) => probeServer.listen(0, "127.0.0.1", resolve));
  expect((await cheapCall()).status).toBe(200);
});
afterAll(() => new Promise<void>((resolve) => probeServer.close(() => resolve())));

/** A random word of `bits` bits as { hex, length }. */
const hexWord = (next: () => number, bits: number) => ({
  hex: Array.from({ length: Math.ceil(bits / 4) }, () => Math.floor(next() * 16).toString(16)).join(""),
  length: bits,
});
const bitString = (next: () => number, bits: number) => Array.from({ length: bits }, () => (next() < 0.5 ? "1" : "0")).join("");

/**
 * Send the heavy request without awaiting it, and until it is answered keep timing a cheap POST /distance
 * (one every 50 ms): the heavy math must be refused before it starts or run on the pool, so each cheap call
 * is answered within 100 ms.
 */
async function meanwhile(path: string, body: unknown): Promise<Response> {
  let done = false;
  const heavy = postJson(path, body, auth).then((r) => {
    done = true;
    return r;
  });
  const cheapMs: number[] = [];
  do {
    const t0 = performance.now();
    const cheap = await cheapCall();
    cheapMs.push(performance.now() - t0);
    expect(cheap.status, cheap.text).toBe(200);
    expect(cheap.body.distance).toBe(1);
    if (!done) await new Promise((r) => setTimeout(r, 50));
  } while (!done);
  expect(Math.max(...cheapMs), `cheap calls took ${cheapMs.map(Math.round).join(", ")} ms`).toBeLessThan(100);
  return heavy;
}

/** The usage row of a response, by its request id. */
async function usageRow(res: Response) {
  const rows = await listUsageEvents(db, orgId);
  const row = rows.find((r) => r.request_id === res.headers["x-request-id"]);
  expect(row, `no usage row for ${res.headers["x-request-id"]}`).toBeDefined();
  return row!;
}

/** A refusal is metered with its status and 0 units. */
async function expectRefusalFree(res: Response): Promise<void> {
  const row = await usageRow(res);
  expect([row.status, row.units]).toEqual([res.status, 0]);
}

describe("codes whose construction alone is beyond one call: refused before building", () => {
  // The documented rule: building a Reed–Solomon generator over GF(2^16) costs 8·2^16 + 6·(n − k)²; the largest n − k within 2^32.
  const largestRsRedundancy = Math.floor(Math.sqrt((MAX_WORK - 8 * 2 ** 16) / 6));

  it.each([
    ["POST /codes/analyze", "/api/v1/codes/analyze", { code: { family: "rs", m: 16, k: 2 } }],
    ["POST /distance", "/api/v1/distance", { code: { family: "rs", m: 16, k: 2 } }],
    ["POST /encode, firstRoot 5", "/api/v1/encode", { code: { family: "rs", m: 16, k: 2, firstRoot: 5 }, messages: [[1, 2]] }],
  ])("RS (65535, 2) over GF(2^16) in %s → 422 work-limit at /code naming the largest n − k", async (_name, path, body) => {
    const res = await meanwhile(path, body);
    const p = expectWorkLimit(res, "/code", new RegExp(`n − k at most ${largestRsRedundancy}\\b`));
    expect(largestRsRedundancy).toBe(26_753);
    expect(p.limit.quantity).toMatch(/^Building this code/);
    expect(p.limit.requested).toBeGreaterThanOrEqual(6 * 65533 ** 2);
    expect(p.limit.allowed).toBe(MAX_WORK);
    await expectRefusalFree(res);
  });

  it("RS m = 16, k = 32,768 (n − k = 32,767): decoding 4 words → 422 work-limit at /code before building", async () => {
    const next = rng(11);
    const words = Array.from({ length: 4 }, () => hexWord(next, 65535 * 16));
    const res = await meanwhile("/api/v1/decode", { code: { family: "rs", m: 16, k: 32768 }, words });
    const p = expectWorkLimit(res, "/code", new RegExp(`n − k at most ${largestRsRedundancy}\\b`));
    expect(p.limit.requested).toBeGreaterThanOrEqual(6 * 32767 ** 2);
    expect(6 * 32767 ** 2).toBeGreaterThan(MAX_WORK);
    await expectRefusalFree(res);
  });
});

describe("decoding batches beyond one call: refused naming how many words fit", () => {
  it("BCH m = 16, t = 4,000, 64 words → 422 work-limit at /words: 1 word fits", async () => {
    const next = rng(12);
    const words = Array.from({ length: 64 }, () => hexWord(next, 65535));
    const res = await meanwhile("/api/v1/decode", { code: { family: "bch", m: 16, t: 4000 }, words });
    // The documented rule: construction 8·2^m + (m·t)²/4, per word 6·n·t + 4·t² + 16·n.
    const [m, t, n] = [16, 4000, 65535];
    const allowed = Math.floor((MAX_WORK - 8 * 2 ** m - (m * t) ** 2 / 4) / (6 * n * t + 4 * t ** 2 + 16 * n));
    expect(allowed).toBe(1);
    const p = expectWorkLimit(res, "/words", /at most 1 word per call/);
    expect(p.limit.requested).toBeGreaterThanOrEqual((m * t) ** 2 / 4 + 64 * (6 * n * t + 4 * t ** 2 + 16 * n));
    await expectRefusalFree(res);
  });

  it("a [48,24] linear code (n − k = 24 > 20: pattern search), 1,024 words → refused with the allowed count; that many words are answered", async () => {
    const next = rng(13);
    const [n, k] = [48, 24];
    const generator = Array.from({ length: k }, (_, i) => "0".repeat(i) + "1" + "0".repeat(k - 1 - i) + bitString(next, n - k));
    const words = Array.from({ length: 1024 }, () => bitString(next, n));
    const res = await meanwhile("/api/v1/decode", { code: { family: "linear", generator }, words });
    // The documented rule: construction 2·rows·n·⌈n/32⌉, the minimum distance 4·min(2^min(k, n−k)·⌈n/32⌉, 2^28), no coset-leader
    // table above n − k = 20 (the family's description), per word 8·(n − k)·⌈n/32⌉ + 16·n + 4·2^22·⌈(n − k)/32⌉.
    const r = n - k;
    const base = 2 * k * n * Math.ceil(n / 32) + 4 * Math.min(2 ** Math.min(k, r) * Math.ceil(n / 32), 2 ** 28);
    const perWord = 8 * r * Math.ceil(n / 32) + 16 * n + 4 * 2 ** 22 * Math.ceil(r / 32);
    const allowed = Math.floor((MAX_WORK - base) / perWord);
    expect(allowed).toBe(247);
    expectWorkLimit(res, "/words", new RegExp(`at most ${allowed} words per call`));
    await expectRefusalFree(res);

    // The allowed batch runs (on the pool): done, or stopped for a documented reason; never a 5xx.
    const fits = await postJson("/api/v1/decode", { code: { family: "linear", generator }, words: words.slice(0, allowed) }, auth);
    if (fits.status === 200) {
      expect(fits.body.results).toHaveLength(allowed);
      expect(Number(fits.headers["x-compute-units"])).toBe(unitsFor(base + allowed * perWord));
    } else {
      expect(fits.status, fits.text.slice(0, 500)).toBe(422);
      const type = (JSON.parse(fits.text) as { type: string }).type;
      expect(["/problems/deadline-exceeded", "/problems/memory-limit"]).toContain(type);
      expectProblem(fits, 422, type.slice("/problems/".length));
    }
  }, 60_000);
});

describe("encoding with a large matrix code", () => {
  it("a 3,000 × 4,096 generator ({ hex, length } rows) with 1,024 messages → 422 work-limit at /messages, naming how many fit", async () => {
    // 4,000 rows of 4,096 bits are 4,096,000 hex digits alone: no such request fits the 4 MiB body limit, so 3,000 rows it is.
    const next = rng(14);
    const [k, n] = [3000, 4096];
    const generator = Array.from({ length: k }, () => hexWord(next, n));
    const messages = Array.from({ length: 1024 }, () => hexWord(next, k));
    const body = { code: { family: "linear", generator }, messages };
    expect(JSON.stringify(body).length).toBeLessThan(4 * 1024 * 1024);
    // Reading and validating a 3 MB body stays on the event loop (bounded by the 4 MiB body limit); its first run in this
    // process also compiles the parsers of the server and of this test's own client, so it is sent once before the timing.
    expectWorkLimit(await postJson("/api/v1/encode", body, auth), "/messages", /split the batch/);
    const res = await meanwhile("/api/v1/encode", body);
    const p = expectWorkLimit(res, "/messages", /This code allows at most \d+ messages per call; split the batch\./);
    // The documented rule: construction 2·rows·n·⌈n/32⌉ + per message 8·k·⌈n/32⌉ + 16·n.
    expect(p.limit.requested).toBeGreaterThanOrEqual(2 * k * n * Math.ceil(n / 32) + 1024 * (8 * k * Math.ceil(n / 32) + 16 * n));
    const fits = Number(/at most (\d+) messages/.exec(p.detail)![1]);
    expect(fits).toBeGreaterThan(0);
    expect(fits).toBeLessThan(1024);
    await expectRefusalFree(res);
  }, 60_000);
});

describe("closed-form analysis: large repetition and parity codes", () => {
  it("repetition (65535,1) is analysed (closed forms, on the pool): dmin 65,535, t 32,767, perfect, V = 2^65534, A = {0: 1, 65535: 1}", async () => {
    const n = 65535;
    const res = await meanwhile("/api/v1/codes/analyze", { code: { family: "repetition", n } });
    expect(res.status, res.text.slice(0, 500)).toBe(200);
    expect(res.body).toMatchObject({ n, k: 1, minimumDistance: n, correctingRadius: 32767, detectionCapability: n - 1, perfect: true, mds: true });
    // Odd n: the spheres of radius (n − 1)/2 around the two codewords split the 2^n words in half, so V = Σ_{i≤t} C(n, i) = 2^(n−1) exactly.
    expect(res.body.sphereVolume).toBe((1n << BigInt(n - 1)).toString());
    expect(res.body.weightDistribution).toEqual({
      method: "closed-form",
      terms: [
        { weight: 0, count: "1" },
        { weight: n, count: "1" },
      ],
    });
    // The documented rule: building 64, the closed form 4·n·⌈n/64⌉, the bounds 8·min(n, 2^(n−k))·⌈(n−k+1)/64⌉ + 8·(t+1)·⌈n/64⌉
    // with t = (n − 1)/2 (no matrices: G and H are too large to return).
    expect(res.body.matricesOmitted).toBeDefined();
    const units = unitsFor(64 + 4 * n * Math.ceil(n / 64) + 8 * n * Math.ceil(n / 64) + 8 * ((n - 1) / 2 + 1) * Math.ceil(n / 64));
    expect(units).toBe(256);
    expect(Number(res.headers["x-compute-units"])).toBe(units);
    expect((await usageRow(res)).units).toBe(units);
  }, 60_000);

  it("even parity n = 8,192: the exact weight distribution is refused at /weightDistribution; without it the code is analysed", async () => {
    const n = 8192;
    const res = await meanwhile("/api/v1/codes/analyze", { code: { family: "parity", n } });
    const p = expectWorkLimit(res, "/weightDistribution", /weightDistribution: false/);
    expect(p.limit.unit).toBe("decimal digits");
    expect(p.limit.allowed).toBe(2 ** 22);
    // The refusal is real, not only estimated: the counts C(8192, w) for even w have more than 2^22 decimal digits in all.
    let log10C = 0;
    let digits = 1;
    for (let w = 1; w <= n; w++) {
      log10C += Math.log10((n - w + 1) / w);
      if (w % 2 === 0) digits += Math.floor(log10C + 1e-9) + 1;
    }
    expect(digits).toBeGreaterThan(2 ** 22);
    await expectRefusalFree(res);

    const without = await meanwhile("/api/v1/codes/analyze", { code: { family: "parity", n }, weightDistribution: false });
    expect(without.status, without.text.slice(0, 500)).toBe(200);
    expect(without.body).toMatchObject({ n, k: n - 1, minimumDistance: 2, correctingRadius: 0, mds: true, perfect: false });
    expect(without.body.weightDistribution).toBeUndefined();
  }, 60_000);

  it("even parity n = 1,048,576 without the weight distribution: closed forms throughout (d = 2, t = 0), 1 unit", async () => {
    const n = 1_048_576;
    const res = await meanwhile("/api/v1/codes/analyze", { code: { family: "parity", n }, weightDistribution: false });
    expect(res.status, res.text.slice(0, 500)).toBe(200);
    expect(res.body).toMatchObject({ n, k: n - 1, minimumDistance: 2, correctingRadius: 0, detectionCapability: 1, sphereVolume: "1", mds: true, perfect: false });
    // The documented rule: building 64 + 32·n, no closed-form counts, the bounds 8·min(n, 2^1)·⌈2/64⌉ + 8·(0 + 1)·⌈n/64⌉.
    expect(Number(res.headers["x-compute-units"])).toBe(unitsFor(64 + 32 * n + 8 * 2 + 8 * Math.ceil(n / 64)));
  }, 60_000);
});

describe("the pool's limits", () => {
  const saved = { ...poolLimits };
  afterEach(async () => {
    Object.assign(poolLimits, saved);
    await closePools();
  });

  /** Reed–Solomon (4096, 3840) over GF(2^16), random words: allowed, and heavy enough to run on the pool. */
  const rsBatch = (count: number, seed: number) => {
    const next = rng(seed);
    return { code: { family: "rs", m: 16, n: 4096, k: 3840 }, words: Array.from({ length: count }, () => hexWord(next, 4096 * 16)) };
  };
  // The documented rule: construction 8·2^m + 6·(n − k)², per word 12·n·(n − k) + 6·(n − k)² + 16·n.
  const rsWork = (count: number) => 8 * 2 ** 16 + 6 * 256 ** 2 + count * (12 * 4096 * 256 + 6 * 256 ** 2 + 16 * 4096);

  it("a task past its deadline → 422 deadline-exceeded with limit {time}; the next pooled request works on a fresh worker", async () => {
    poolLimits.deadlineMs = 50;
    const slow = await postJson("/api/v1/decode", rsBatch(64, 21), auth);
    const p = expectProblem(slow, 422, "deadline-exceeded") as ReturnType<typeof expectProblem> & { limit: unknown };
    expect(p.limit).toEqual({ quantity: "time", allowed: 50, unit: "ms" });
    // Above the inline threshold of 2^20 work units, so it ran on the pool, whose worker was stopped.
    expect(rsWork(64)).toBeGreaterThan(2 ** 20);
    // A stopped computation is refused like any other: metered with 0 units.
    expect([(await usageRow(slow)).status, (await usageRow(slow)).units]).toEqual([422, 0]);

    poolLimits.deadlineMs = saved.deadlineMs;
    const next = await postJson("/api/v1/decode", rsBatch(4, 22), auth);
    expect(next.status, next.text.slice(0, 500)).toBe(200);
    expect(next.body.results).toHaveLength(4);
    expect(rsWork(4)).toBeGreaterThan(2 ** 20);
    expect(Number(next.headers["x-compute-units"])).toBe(unitsFor(rsWork(4)));
  }, 60_000);

  it("a full request lane → 503 server-busy with Retry-After for the overflow; the rest are answered", async () => {
    await closePools();
    poolLimits.requestThreads = 1;
    poolLimits.queuePerThread = 1;
    const all = await Promise.all(Array.from({ length: 6 }, (_, i) => postJson("/api/v1/decode", rsBatch(4, 30 + i), auth)));
    const busy = all.filter((r) => r.status === 503);
    expect(busy.length).toBeGreaterThan(0);
    for (const r of busy) {
      expectProblem(r, 503, "server-busy");
      expect(Number(r.headers["retry-after"])).toBeGreaterThan(0);
      expect((await usageRow(r)).units).toBe(0);
    }
    // One running and one waiting fit: at least those two are answered.
    expect(all.filter((r) => r.status === 200).length).toBeGreaterThanOrEqual(2);
    expect(all.every((r) => r.status === 200 || r.status === 503)).toBe(true);
  }, 60_000);
});
