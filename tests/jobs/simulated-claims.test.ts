import { describe, expect, it } from "vitest";
import { runnerForThisFile } from "../helpers/jobs";
import { expectFieldError, getQuery, postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

/**
 * Simulated claims end to end with a runner in this process: 202 pending, then the verdict the sequential
 * rule (lib/core/stats/sequential.ts, whose error rate tests/unit/stats-sequential*.test.ts measure) reaches.
 * Truths are known by formula: an uncoded BSC's BER is p; (7,4) Hamming's FER on a BSC is
 * 1 − (1 − p)^7 − 7p(1 − p)^6 (bounded-distance decoding, t = 1).
 */
runnerForThisFile("claims-runner");

async function decided(location: string, auth: string) {
  for (let i = 0; i < 1200; i++) {
    const res = await getQuery(location, {}, auth);
    if (res.body.verdict !== "pending") return res.body;
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error("the claim stayed pending");
}

const simulated = (evidence: Record<string, unknown>, target: Record<string, unknown>, extra: Record<string, unknown> = {}) => ({ label: "sim-claims", target, evidence: { mode: "simulated", ...evidence }, ...extra });

describe("simulated claims", () => {
  it("uncoded BSC with p = 1e-10 supports BER ≤ 1e-9 at 95 %: 202 pending, then supported within seconds", async () => {
    const { auth } = await makeOrgWithKey();
    const t0 = Date.now();
    const res = await postJson("/api/v1/claims", simulated({ channel: { type: "bsc" }, at: 1e-10, seed: 11 }, { metric: "ber", atMost: 1e-9 }), auth);
    expect(res.status, res.text).toBe(202);
    expect(res.body).toMatchObject({ verdict: "pending", mode: "simulated", rate: null, interval: null });
    expect(res.body.simulation).toMatch(/^\/simulations\/sim-/);
    const end = await decided(res.headers.location!, auth);
    expect(end.verdict).toBe("supported");
    expect(end.interval.upper).toBeLessThanOrEqual(1e-9);
    expect(end.interval.method).toMatch(/Howard/);
    expect(end.details.stoppedBy).toBe("decided:supported");
    expect(Date.now() - t0).toBeLessThan(30_000);
    // The simulation behind it is readable, with the same seed.
    const sim = await getQuery(`/api/v1${end.simulation}`, {}, auth);
    expect(sim.body.seed).toBe(11);
    // An error-free run is supported once n·target passes 4.74 at 95 % (x − ln(1 + x) = ln 20, the rule's own bound); errors only add bits.
    expect(sim.body.points[0].counts.infoBits).toBeGreaterThan(4.7e9);
    expect(end.rate).toBe(sim.body.points[0].counts.bitErrors / sim.body.points[0].counts.infoBits);
  });

  it("uncoded BSC with p = 1e-3 refutes BER ≤ 1e-4", async () => {
    const { auth } = await makeOrgWithKey();
    const res = await postJson("/api/v1/claims", simulated({ channel: { type: "bsc" }, at: 1e-3, seed: 12 }, { metric: "ber", atMost: 1e-4 }), auth);
    const end = await decided(res.headers.location!, auth);
    expect(end.verdict).toBe("refuted");
    expect(end.interval.lower).toBeGreaterThan(1e-4);
  });

  it("(7,4) Hamming on a BSC with p = 0.01 (FER ≈ 2.03e-3 by formula) supports FER ≤ 1e-2 and refutes FER ≤ 1e-3", async () => {
    const p = 0.01;
    const fer = 1 - (1 - p) ** 7 - 7 * p * (1 - p) ** 6;
    expect(fer).toBeGreaterThan(1e-3);
    expect(fer).toBeLessThan(1e-2);
    const { auth } = await makeOrgWithKey();
    const code = { family: "hamming", r: 3 };
    const a = await postJson("/api/v1/claims", simulated({ code, channel: { type: "bsc" }, at: p, seed: 13 }, { metric: "fer", atMost: 1e-2 }), auth);
    const b = await postJson("/api/v1/claims", simulated({ code, channel: { type: "bsc" }, at: p, seed: 14 }, { metric: "fer", atMost: 1e-3 }), auth);
    const [ea, eb] = [await decided(a.headers.location!, auth), await decided(b.headers.location!, auth)];
    expect(ea.verdict).toBe("supported");
    expect(eb.verdict).toBe("refuted");
    for (const e of [ea, eb]) {
      expect(e.interval.lower).toBeLessThanOrEqual(fer);
      expect(e.interval.upper).toBeGreaterThanOrEqual(fer);
    }
  });

  it("a claim whose budget ends first is inconclusive, and says so", async () => {
    const { auth } = await makeOrgWithKey();
    const res = await postJson("/api/v1/claims", simulated({ channel: { type: "bsc" }, at: 1e-3, budget: { maxBits: 100_000 }, seed: 15 }, { metric: "ber", atMost: 1e-3 }), auth);
    const end = await decided(res.headers.location!, auth);
    expect(end.verdict).toBe("inconclusive");
    expect(end.reasoning).toMatch(/budget ended/);
    expect(end.details.stoppedBy).toBe("maxBits");
  });

  it("a label's history lists a settled simulated claim with its verdict", async () => {
    const { auth } = await makeOrgWithKey();
    const res = await postJson("/api/v1/claims", simulated({ channel: { type: "bsc" }, at: 1e-3, seed: 16 }, { metric: "ber", atMost: 1e-4 }, { label: "history" }), auth);
    await decided(res.headers.location!, auth);
    const list = await getQuery("/api/v1/claims", { label: "history" }, auth);
    expect(list.body.data.map((c: { verdict: string }) => c.verdict)).toEqual(["refuted"]);
  });

  it("a simulation the engine cannot run is refused at the evidence's own field (soft decisions need a binary code)", async () => {
    const { auth } = await makeOrgWithKey();
    const evidence = { code: { family: "rs", m: 4, n: 15, k: 11 }, channel: { type: "awgn", modulation: "bpsk", decisions: "soft" }, at: 3 };
    expectFieldError(await postJson("/api/v1/claims", simulated(evidence, { metric: "fer", atMost: 1e-3 }), auth), "/evidence/code");
  });

  it("a coded BER claim is refused with the reason and the fix (decide it on FER)", async () => {
    const { auth } = await makeOrgWithKey();
    const p = expectFieldError(await postJson("/api/v1/claims", simulated({ code: { family: "hamming", r: 3 }, channel: { type: "bsc" }, at: 0.01 }, { metric: "ber", atMost: 1e-3 }), auth), "/target/metric");
    expect(p.errors![0]!.message).toMatch(/frame error rate/);
  });
});
