import { spawn, type ChildProcess } from "node:child_process";
import { fileURLToPath } from "node:url";
import { afterAll, describe, expect, it } from "vitest";
import { engineRules, simulatorFor } from "@/lib/api/simulation-spec";
import { runPoint } from "@/lib/core/sim/run";
import type { SimulationJobInput } from "@/lib/jobs/simulation-kind";
import { finished, runnerForThisFile, until } from "../helpers/jobs";
import { api, expectFieldError, expectProblem, getQuery, postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";
import { clopperPearson } from "../helpers/sim-interval";

/**
 * POST/GET/DELETE /simulations and the event stream, with a runner in this process (and, for the crash, as
 * a process of its own). Counts are checked against lib/core/sim run directly with the same seed, which is
 * what "the same request and seed give the same counts" means; the (7,4) Hamming BER against the exact
 * value from all 128 error patterns (as tests/unit/sim-engine.test.ts does for the engine alone).
 */
const ROOT = fileURLToPath(new URL("../../", import.meta.url));

const runner = runnerForThisFile("test-runner");

/** Exact post-decoding BER of (7,4) Hamming with syndrome decoding on a BSC: every one of the 128 error patterns, the message bits of the decoded word counted. */
function hamming74Ber(p: number): number {
  // Systematic (7,4) Hamming, parity-check columns 1..7 in binary: a single error at position s is corrected.
  let ber = 0;
  for (let e = 0; e < 128; e++) {
    const w = [...Array(7)].map((_, i) => (e >> i) & 1);
    const weight = w.reduce((a, b) => a + b, 0);
    let s = 0;
    for (let i = 0; i < 7; i++) if (w[i]) s ^= i + 1;
    if (s) w[s - 1]! ^= 1;
    // Message bits at the positions that are not powers of two (3, 5, 6, 7 → indexes 2, 4, 5, 6).
    const wrong = [2, 4, 5, 6].reduce((a, i) => a + w[i]!, 0);
    ber += (wrong / 4) * p ** weight * (1 - p) ** (7 - weight);
  }
  return ber;
}

describe("a simulation from request to result", () => {
  it("202 with Location; the runner finishes it; counts equal the engine's for that seed; BER within its interval of the exact value", async () => {
    const { auth } = await makeOrgWithKey();
    // A fixed seed: the interval check below is then a fixed fact, not a 1 % chance of failing each run.
    const body = { code: { family: "hamming", r: 3 }, channel: { type: "bsc" }, points: [0.02, 0.01], stop: { minBitErrors: 200, maxBits: 1e8 }, seed: 20261203 };
    const res = await postJson("/api/v1/simulations", body, auth);
    expect(res.status, res.text).toBe(202);
    expect(res.headers.location).toBe(`/api/v1/simulations/${res.body.id}`);
    expect(res.body.status).toBe("queued");
    expect(res.body.seed).toBe(20261203);
    const done = await until(async () => (await getQuery(res.headers.location!, {}, auth)).body, finished);
    expect(done.status).toBe("done");
    const input = { ...res.body.request, seed: res.body.seed } as SimulationJobInput;
    const sim = simulatorFor(input);
    for (const [i, p] of [0.02, 0.01].entries()) {
      const direct = runPoint(sim, i, engineRules(input));
      expect(done.points[i].counts).toEqual(direct.counts);
      expect(done.points[i].stoppedBy).toBe("minBitErrors");
      // 99 % Clopper–Pearson around the seeded estimate holds the exact BER (Clopper & Pearson 1934; exact value by enumeration).
      const [lo, hi] = clopperPearson(direct.counts.bitErrors, direct.counts.infoBits, 0.99);
      expect(hamming74Ber(p)).toBeGreaterThan(lo);
      expect(hamming74Ber(p)).toBeLessThan(hi);
      expect(done.points[i].ber.estimate).toBe(direct.counts.bitErrors / direct.counts.infoBits);
    }
    // Charged when it ended: 1 unit per started 2^26 information bits.
    const bits = done.points.reduce((s: number, p: { counts: { infoBits: number } }) => s + p.counts.infoBits, 0);
    expect(done.units).toBe(Math.ceil(bits / 2 ** 26));
  });

  it("the same request and seed give the same counts", async () => {
    const { auth } = await makeOrgWithKey();
    const body = { channel: { type: "awgn", modulation: "bpsk" }, points: [4], stop: { minBitErrors: 300, maxBits: 1e8 }, seed: 99 };
    const a = (await postJson("/api/v1/simulations", body, auth)).body;
    const b = (await postJson("/api/v1/simulations", body, auth)).body;
    const [ra, rb] = await Promise.all([a, b].map((s) => until(async () => (await getQuery(`/api/v1/simulations/${s.id}`, {}, auth)).body, finished)));
    expect(ra.points[0].counts).toEqual(rb.points[0].counts);
    expect(ra.points[0].counts.bitErrors).toBeGreaterThanOrEqual(300);
  });

  it("streams progress as Server-Sent Events and ends with an end event", async () => {
    const { auth } = await makeOrgWithKey();
    const res = await postJson("/api/v1/simulations", { channel: { type: "bsc" }, points: [0.001], stop: { maxBits: 3e8 }, gapSkipping: false, seed: 5 }, auth);
    const stream = await api().get(`${res.headers.location}/events`).set("authorization", auth).buffer(true).parse((r, cb) => {
      let text = "";
      r.on("data", (d: Buffer) => (text += d.toString()));
      r.on("end", () => cb(null, text));
    });
    expect(stream.status).toBe(200);
    expect(stream.headers["content-type"]).toMatch(/^text\/event-stream/);
    const events = (stream.body as string).split("\n\n").filter(Boolean).map((e) => ({ name: /^event: (\w+)/.exec(e)![1], data: JSON.parse(e.split("\ndata: ")[1]!) }));
    expect(events.at(-1)!.name).toBe("end");
    expect(events.at(-1)!.data.status).toBe("done");
    expect(events.slice(0, -1).every((e) => e.name === "progress")).toBe(true);
    // Progress never goes back.
    const bits = events.map((e) => e.data.points[0].counts.infoBits);
    expect(bits).toEqual([...bits].sort((x, y) => x - y));
  });

  it("cancels a running simulation within a second, keeping and charging the chunks it ran", async () => {
    const { auth, db } = await makeOrgWithKey();
    const res = await postJson("/api/v1/simulations", { channel: { type: "bsc" }, points: [0.001], stop: { maxBits: 2 ** 40 }, gapSkipping: false }, auth);
    // No seed given: one is drawn and returned.
    expect(Number.isInteger(res.body.seed) && res.body.seed >= 0 && res.body.seed < 2 ** 32).toBe(true);
    await until(async () => (await getQuery(res.headers.location!, {}, auth)).body, (s) => s.points[0].chunks > 2);
    const asked = Date.now();
    const del = await api().delete(res.headers.location!).set("authorization", auth);
    expect(del.status, del.text).toBe(202);
    const end = await until(async () => (await getQuery(res.headers.location!, {}, auth)).body, finished, 5000);
    expect(end.status).toBe("cancelled");
    expect(Date.now() - asked).toBeLessThan(1500);
    expect(end.points[0].counts.infoBits).toBeGreaterThan(0);
    expect(end.units).toBe(Math.ceil(end.points[0].counts.infoBits / 2 ** 26));
    const metered = await db.selectFrom("usage_events").select(["units"]).where("request_id", "=", end.id).execute();
    expect(metered).toEqual([{ units: end.units }]);
    // Cancelling again changes nothing.
    expect((await api().delete(res.headers.location!).set("authorization", auth)).status).toBe(200);
  });

  it("lists the organisation's simulations newest first, page by page; another organisation sees none of them", async () => {
    const { auth } = await makeOrgWithKey();
    const ids: string[] = [];
    for (const seed of [1, 2, 3]) ids.push((await postJson("/api/v1/simulations", { channel: { type: "bsc" }, points: [0.1], stop: { maxBits: 1000 }, seed }, auth)).body.id);
    const first = await getQuery("/api/v1/simulations", { limit: 2 }, auth);
    const second = await getQuery("/api/v1/simulations", { limit: 2, cursor: first.body.nextCursor }, auth);
    expect([...first.body.data, ...second.body.data].map((s: { id: string }) => s.id)).toEqual([...ids].reverse());
    const other = await makeOrgWithKey();
    expect((await getQuery("/api/v1/simulations", {}, other.auth)).body.data).toEqual([]);
    expectProblem(await getQuery(`/api/v1/simulations/${ids[0]}`, {}, other.auth), 404, "not-found");
  });
});

describe("idempotent submission", () => {
  it("the same Idempotency-Key and body start one simulation; the replay answers the same 202 and Location", async () => {
    const { auth, db, org } = await makeOrgWithKey();
    const body = { channel: { type: "bsc" }, points: [0.1], stop: { maxBits: 1000 }, seed: 3 };
    const first = await postJson("/api/v1/simulations", body, auth, { "idempotency-key": "nightly-run-318" });
    const again = await postJson("/api/v1/simulations", body, auth, { "idempotency-key": "nightly-run-318" });
    expect(first.status).toBe(202);
    expect(again.status).toBe(202);
    expect(again.headers["idempotency-replayed"]).toBe("true");
    expect(again.headers.location).toBe(first.headers.location);
    expect(again.body.id).toBe(first.body.id);
    const jobs = await db.selectFrom("jobs").select("id").where("org_id", "=", org.id).execute();
    expect(jobs).toEqual([{ id: first.body.id }]);
  });
});

describe("limits and bad requests", () => {
  it(`refuses a fifth job at once while four are queued or running on Beacon (429 job-limit with Retry-After)`, async () => {
    // A live key on a paid plan: its reservations never stop at the allowance, so only the job count can refuse.
    const { auth } = await makeOrgWithKey({ plan: "beacon", mode: "live" });
    const slow = { channel: { type: "bsc" }, points: [0.001], stop: { maxBits: 2 ** 40 }, gapSkipping: false };
    const made = [];
    for (let i = 0; i < 4; i++) made.push((await postJson("/api/v1/simulations", slow, auth)).headers.location!);
    const res = await postJson("/api/v1/simulations", slow, auth);
    const p = expectProblem(res, 429, "job-limit");
    expect(res.headers["retry-after"]).toBe("10");
    expect(p.detail).toMatch(/Beacon plan allows 4 at once/);
    for (const l of made) await api().delete(l).set("authorization", auth);
  });

  it.each([
    ["soft decisions on Reed–Solomon", { code: { family: "rs", m: 4, n: 15, k: 11 }, channel: { type: "awgn", modulation: "bpsk", decisions: "soft" }, points: [3] }, "/code"],
    ["a crossover probability above 1", { channel: { type: "bsc" }, points: [1.5] }, "/points/0"],
    ["seventeen points", { channel: { type: "bsc" }, points: Array(17).fill(0.1) }, "/points"],
    ["no bit or frame maximum", { channel: { type: "bsc" }, points: [0.1], stop: { minBitErrors: 10 } }, "/stop/maxBits"],
    ["a frame length with a code", { code: { family: "hamming", r: 3 }, frameBits: 8, channel: { type: "bsc" }, points: [0.1] }, "/frameBits"],
  ])("%s → 422 at the field", async (_name, body, pointer) => {
    expectFieldError(await postJson("/api/v1/simulations", body, (await makeOrgWithKey()).auth), pointer);
  });
});

describe("a runner killed mid-job", () => {
  let child: ChildProcess | undefined;
  afterAll(() => child?.kill("SIGKILL"));

  const startRunner = () =>
    spawn(process.execPath, ["--import", "tsx", "scripts/worker.ts"], { cwd: ROOT, env: { ...process.env, PARITAS_JOB_LEASE_MS: "1000", PARITAS_BATCH_THREADS: "1" }, stdio: ["ignore", "pipe", "pipe"] });

  it("loses nothing: after kill -9 and a restart the job resumes from its last chunk and its counts equal an uninterrupted run's", async () => {
    // This file's own runner stops first, so the process runner is the only one.
    await runner.stop();
    const { auth, db } = await makeOrgWithKey();
    const body = { code: { family: "hamming", r: 3 }, channel: { type: "bsc" }, points: [0.001], stop: { maxBits: 6e8 }, gapSkipping: false, seed: 4242 };
    const res = await postJson("/api/v1/simulations", body, auth);
    child = startRunner();
    const id = res.body.id as string;
    const chunks = () => db.selectFrom("job_chunks").select((eb) => eb.fn.countAll<number>().as("n")).where("job_id", "=", id).executeTakeFirstOrThrow();
    await until(chunks, (c) => Number(c.n) >= 3, 60_000);
    child.kill("SIGKILL");
    await new Promise((r) => child!.once("exit", r));
    const before = Number((await chunks()).n);
    expect((await getQuery(res.headers.location!, {}, auth)).body.status).toBe("running");
    child = startRunner();
    const end = await until(async () => (await getQuery(res.headers.location!, {}, auth)).body, finished, 120_000);
    child.kill("SIGTERM");
    expect(end.status).toBe("done");
    const job = await db.selectFrom("jobs").select(["attempts"]).where("id", "=", id).executeTakeFirstOrThrow();
    expect(job.attempts).toBe(2);
    expect(Number((await chunks()).n)).toBeGreaterThan(before);
    const input = { ...end.request, seed: end.seed } as SimulationJobInput;
    expect(end.points[0].counts).toEqual(runPoint(simulatorFor(input), 0, engineRules(input)).counts);
  }, 240_000);
});
