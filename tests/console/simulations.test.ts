/**
 * The console's simulation routes: started, read, listed, followed and cancelled by a signed-in member, through the
 * same checks and queue as /api/v1/simulations (tests/jobs/simulations.test.ts covers those in depth). A runner runs
 * in this process; the counts are checked against lib/core/sim run directly with the same seed, and the uncoded BSC
 * BER against its exact value p inside a 99 % Clopper–Pearson interval (Clopper & Pearson 1934, scipy-checked helper).
 */
import { setOrgPlan } from "@/db/queries/billing";
import { describe, expect, it, vi } from "vitest";
import { engineRules, simulatorFor } from "@/lib/api/simulation-spec";
import { runPoint } from "@/lib/core/sim/run";
import type { SimulationJobInput } from "@/lib/jobs/simulation-kind";
import { finished, runnerForThisFile, until } from "../helpers/jobs";
import { api, expectProblem, postJson } from "../helpers/api";
import { consoleCall, makeConsoleOrg } from "../helpers/console";
import { clopperPearson } from "../helpers/sim-interval";

vi.mock(import("@/lib/mail/send"), async (orig) => ({ ...(await orig()), sendMail: vi.fn(async () => {}) }));

runnerForThisFile("console-test-runner");

const UNCODED = { channel: { type: "bsc" }, points: [0.02, 0.005], stop: { minBitErrors: 300, maxBits: 1e8 }, seed: 41 };

describe("a simulation started from the console", () => {
  it("202; belongs to no key; the runner finishes it with the engine's counts for its seed; metered and audited", async () => {
    const fx = await makeConsoleOrg();
    const base = `/api/console/orgs/${fx.org.slug}/simulations`;
    const res = await consoleCall("POST", base, { cookie: fx.developer.cookie, body: UNCODED });
    expect(res.status, res.text).toBe(202);
    const id = res.body.simulation.id as string;
    expect(res.body.simulation.status).toBe("queued");
    expect(res.body.simulation.seed).toBe(41);
    const row = await fx.db.selectFrom("jobs").selectAll().where("id", "=", id).executeTakeFirstOrThrow();
    expect(row.api_key_id).toBeNull();

    const done = await until(async () => (await consoleCall("GET", `${base}/${id}`, { cookie: fx.billing.cookie })).body.simulation, finished);
    expect(done.status).toBe("done");
    const input = { ...done.request, seed: done.seed } as SimulationJobInput;
    const sim = simulatorFor(input);
    for (const [i, p] of UNCODED.points.entries()) {
      const direct = runPoint(sim, i, engineRules(input));
      expect(done.points[i].counts).toEqual(direct.counts);
      // Uncoded BSC: the exact BER is p; its 99 % Clopper–Pearson interval around the count holds it.
      const [lo, hi] = clopperPearson(direct.counts.bitErrors, direct.counts.infoBits, 0.99);
      expect(p).toBeGreaterThan(lo);
      expect(p).toBeLessThan(hi);
    }

    // The fixture's queued job runs too: its end is metered under its own id.
    const usage = (await fx.db.selectFrom("usage_events").selectAll().where("org_id", "=", fx.org.id).orderBy("id").execute()).filter((u) => u.endpoint === "simulations.create" || u.request_id === id);
    expect(usage.map((u) => [u.endpoint, u.api_key_id, u.units])).toEqual([
      ["simulations.create", null, 1],
      // 1 unit per started 2^26 information bits, when the job ends.
      ["jobs.simulation", null, Math.ceil(done.points.reduce((s: number, q: { counts: { infoBits: number } }) => s + q.counts.infoBits, 0) / 2 ** 26)],
    ]);
    const audit = await fx.db.selectFrom("audit_log").selectAll().where("org_id", "=", fx.org.id).where("action", "like", "simulation.%").execute();
    expect(audit.map((a) => [a.action, a.actor, a.target_id])).toEqual([["simulation.started", `user:${fx.developer.id}`, id]]);
  });

  it("the API's validation: a bad body is a 422 with the field's pointer, and nothing is queued", async () => {
    const fx = await makeConsoleOrg();
    const res = await consoleCall("POST", `/api/console/orgs/${fx.org.slug}/simulations`, { cookie: fx.owner.cookie, body: { ...UNCODED, points: [1.5] } });
    expectProblem(res, 422, "validation-failed");
    expect(JSON.stringify(res.body.errors)).toContain("/points/0");
    // Only the fixture's own two jobs (this file's runner may have taken the queued one already).
    const jobs = await fx.db.selectFrom("jobs").select("id").where("org_id", "=", fx.org.id).execute();
    expect(jobs.map((j) => j.id).sort()).toEqual([fx.simulations.queued, fx.simulations.done].sort());
  });

  it("the plan's job limit holds for the console too (429 job-limit)", async () => {
    const fx = await makeConsoleOrg();
    // Beacon: 4 jobs at once (the fixture's org is on Lighthouse, which allows 8).
    await setOrgPlan(fx.db, fx.org.id, "beacon");
    const base = `/api/console/orgs/${fx.org.slug}/simulations`;
    // The fixture has one queued; a runner may take them, so slow ones (10^12 bits) are queued until the limit answers.
    const slow = { channel: { type: "bsc" }, points: [0.5], stop: { maxBits: 1e12 }, gapSkipping: false, seed: 2 };
    const started: string[] = [];
    let last;
    for (let i = 0; i < 6; i++) {
      last = await consoleCall("POST", base, { cookie: fx.owner.cookie, body: slow });
      if (last.status !== 202) break;
      started.push(last.body.simulation.id);
    }
    expect(expectProblem(last!, 429, "job-limit").detail).toMatch(/Beacon plan allows 4 at once/);
    for (const id of started) await consoleCall("DELETE", `${base}/${id}`, { cookie: fx.owner.cookie });
  });

  it("cancel: a running one answers 202 and its runner ends it; a second cancel is not audited again", async () => {
    const fx = await makeConsoleOrg();
    const base = `/api/console/orgs/${fx.org.slug}/simulations`;
    const res = await consoleCall("POST", base, { cookie: fx.owner.cookie, body: { channel: { type: "bsc" }, points: [0.5], stop: { maxBits: 1e12 }, gapSkipping: false, seed: 8 } });
    const id = res.body.simulation.id as string;
    await until(async () => (await consoleCall("GET", `${base}/${id}`, { cookie: fx.owner.cookie })).body.simulation, (s) => s.status === "running" && s.points[0].chunks > 0);
    const cancel = await consoleCall("DELETE", `${base}/${id}`, { cookie: fx.developer.cookie });
    expect(cancel.status).toBe(202);
    const end = await until(async () => (await consoleCall("GET", `${base}/${id}`, { cookie: fx.owner.cookie })).body.simulation, finished, 10_000);
    expect(end.status).toBe("cancelled");
    expect(end.points[0].counts.infoBits).toBeGreaterThan(0);
    expect((await consoleCall("DELETE", `${base}/${id}`, { cookie: fx.developer.cookie })).status).toBe(200);
    const audit = await fx.db.selectFrom("audit_log").select("action").where("org_id", "=", fx.org.id).where("action", "=", "simulation.cancelled").execute();
    expect(audit).toHaveLength(1);
  });

  it("the list is newest first with cursor pages; the event stream ends with the end event", async () => {
    const fx = await makeConsoleOrg();
    const base = `/api/console/orgs/${fx.org.slug}/simulations`;
    const ids: string[] = [];
    for (const seed of [1, 2, 3]) ids.push((await consoleCall("POST", base, { cookie: fx.owner.cookie, body: { ...UNCODED, points: [0.02], seed } })).body.simulation.id);
    const first = await consoleCall("GET", `${base}?limit=2`, { cookie: fx.billing.cookie });
    expect(first.status).toBe(200);
    expect(first.body.simulations.map((s: { id: string }) => s.id)).toEqual([ids[2], ids[1]]);
    const second = await consoleCall("GET", `${base}?limit=2&cursor=${encodeURIComponent(first.body.nextCursor)}`, { cookie: fx.billing.cookie });
    // Then the last started, and the fixture's two jobs made before them.
    expect(second.body.simulations.map((s: { id: string }) => s.id)[0]).toBe(ids[0]);
    expectProblem(await consoleCall("GET", `${base}?cursor=nonsense`, { cookie: fx.owner.cookie }), 422, "validation-failed");

    const stream = await api().get(`${base}/${ids[2]}/events`).set("cookie", fx.billing.cookie).buffer(true).parse((r, cb) => {
      let text = "";
      r.on("data", (d: Buffer) => (text += d.toString()));
      r.on("end", () => cb(null, text));
    });
    expect(stream.status).toBe(200);
    const events = (stream.body as string).split("\n\n").filter(Boolean).map((e) => ({ name: /^event: (\w+)/.exec(e)![1], data: JSON.parse(e.split("\ndata: ")[1]!) }));
    expect(events.at(-1)!.name).toBe("end");
    expect(events.at(-1)!.data.status).toBe("done");
    expect(events.slice(0, -1).every((e) => e.name === "progress")).toBe(true);
  });

  it("a simulated claim's job, as the Claims page links it, opens as a simulation with its code's n and k", async () => {
    const fx = await makeConsoleOrg();
    const claim = { label: "fw-link", target: { metric: "fer", atMost: 1e-3 }, evidence: { mode: "simulated", code: { family: "hamming", r: 3 }, channel: { type: "bsc" }, at: 1e-3, seed: 4 } };
    const res = await postJson("/api/v1/claims", claim, `Bearer ${fx.keys.owner.key}`);
    expect(res.status, res.text).toBe(202);
    const listed = await consoleCall("GET", `/api/console/orgs/${fx.org.slug}/claims`, { cookie: fx.billing.cookie });
    const jobId = listed.body.claims[0].jobId as string;
    expect(`/simulations/${jobId}`).toBe(res.body.simulation);
    const one = await consoleCall("GET", `/api/console/orgs/${fx.org.slug}/simulations/${jobId}`, { cookie: fx.billing.cookie });
    expect(one.status).toBe(200);
    // Hamming (7,4): n = 7, k = 4 (Hamming 1950).
    expect(one.body.simulation.code).toEqual({ name: "Hamming (7,4)", n: 7, k: 4 });
    expect(one.body.simulation.request).not.toHaveProperty("decide");
  });

  it("a malformed id or another org's job is 404", async () => {
    const fx = await makeConsoleOrg();
    const base = `/api/console/orgs/${fx.org.slug}/simulations`;
    for (const id of ["nope", "sim-../../x", fx.otherSimulation]) expectProblem(await consoleCall("GET", `${base}/${encodeURIComponent(id)}`, { cookie: fx.owner.cookie }), 404, "not-found");
  });
});
