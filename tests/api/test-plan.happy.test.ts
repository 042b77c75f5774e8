import { beforeAll, describe, expect, it } from "vitest";
import { describeDuration } from "@/lib/api/endpoints/test-plan";
import { postJson, relErr } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

const call = async (body: unknown) => {
  const res = await postJson("/api/v1/tests/plan", body, auth);
  expect(res.status, res.text).toBe(200);
  return res;
};

type Plan = { allowedErrors: number; exact: { bits: number; berTimesBits: number; seconds?: number; duration?: string }; chiSquare: { bits: number; berTimesBits: number }; passProbability?: number };

/** P(Poisson(λ) ≤ k), summed here: the limit of the binomial pass probability for long tests. */
const poissonCdf = (lambda: number, k: number) => {
  let term = Math.exp(-lambda);
  let s = term;
  for (let j = 1; j <= k; j++) s += term *= lambda / j;
  return s;
};

describe("POST /tests/plan", () => {
  it("BER 1e-12 at 95 %, 0..2 errors: 2.996, 4.744, 6.296 × 10^12 bits (common BER-test tables, from memory); exact and chi-square agree to 1e-9 at this BER", async () => {
    const res = await call({ targetBer: 1e-12, confidence: 0.95, maxErrors: 2 });
    const plans = res.body.plans as Plan[];
    expect(plans.map((p) => p.allowedErrors)).toEqual([0, 1, 2]);
    [2.996, 4.744, 6.296].forEach((v, k) => {
      expect(plans[k]!.chiSquare.berTimesBits).toBeCloseTo(v, 3);
      expect(relErr(plans[k]!.exact.bits, plans[k]!.chiSquare.bits)).toBeLessThan(1e-9);
    });
    // Zero errors: −ln(0.05)/BER (REFERENCES: rule of three).
    expect(relErr(plans[0]!.exact.bits, -Math.log(0.05) / 1e-12)).toBeLessThan(1e-9);
    expect(Number.isInteger(plans[0]!.exact.bits)).toBe(true);
    expect(plans[0]!.exact.seconds).toBeUndefined();
    expect(res.body.methods.exact).toMatch(/Clopper & Pearson, Biometrika 1934/);
    expect(res.body.methods.chiSquare).toMatch(/χ²\(2\(k \+ 1\), confidence\)/);
    expect(res.body.methods.passProbability).toBeUndefined();
    expect(res.body.assumption).toMatch(/independent/);
    expect(res.body.caution).toMatch(/safety-critical/);
  });

  it("BER 1e-2 with 0 errors: the exact length is ⌈ln(1 − CL)/ln(1 − BER)⌉ (no error in n bits has probability (1 − BER)^n), shorter than the chi-square form", async () => {
    const res = await call({ targetBer: 0.01, confidence: 0.99 });
    const [plan] = res.body.plans as Plan[];
    expect(plan!.exact.bits).toBe(Math.ceil(Math.log(0.01) / Math.log(0.99)));
    expect(plan!.exact.bits).toBe(459);
    expect(plan!.chiSquare.bits).toBe(Math.ceil(-Math.log(0.01) / 0.01));
  });

  it("a line rate adds test times: 2.996·10^12 bits at 10 Gbit/s is 299.6 s, '5 min 0 s'", async () => {
    const res = await call({ targetBer: 1e-12, confidence: 0.95, lineRateBps: 1e10 });
    const [plan] = res.body.plans as Plan[];
    expect(relErr(plan!.exact.seconds!, plan!.exact.bits / 1e10)).toBeLessThan(1e-15);
    expect(plan!.exact.seconds).toBeCloseTo(299.57, 2);
    expect(plan!.exact.duration).toBe("5 min 0 s");
    expect(res.body.lineRateBps).toBe(1e10);
  });

  it("with trueBerFraction: the pass probability of each plan, the Poisson limit e^(−λ)·Σ λ^j/j! with λ = bits × true BER (relative 1e-6 at BER 1e-9)", async () => {
    const res = await call({ targetBer: 1e-9, confidence: 0.95, maxErrors: 3, trueBerFraction: 0.5 });
    expect(res.body.trueBer).toBe(5e-10);
    for (const plan of res.body.plans as Plan[]) {
      expect(relErr(plan.passProbability!, poissonCdf(plan.exact.bits * 5e-10, plan.allowedErrors))).toBeLessThan(1e-6);
    }
    // 0 errors allowed at half the target: 0.05^(1/2) ≈ 0.2236 passes (P = e^(−λ/2) with e^(−λ) = 0.05).
    expect((res.body.plans as Plan[])[0]!.passProbability).toBeCloseTo(Math.sqrt(0.05), 6);
    expect(res.body.methods.passProbability).toMatch(/Binomial/);
  });

  it("at the target itself a plan passes with probability at most 1 − confidence", async () => {
    const res = await call({ targetBer: 1e-6, confidence: 0.9, maxErrors: 5, trueBerFraction: 1 });
    for (const plan of res.body.plans as Plan[]) {
      expect(plan.passProbability).toBeLessThanOrEqual(0.1);
      expect(plan.passProbability).toBeGreaterThan(0.09);
    }
  });

  it("onlyMaxErrors gives the one plan; 100 errors at the smallest target and highest confidence stay whole, safe integers", async () => {
    const one = await call({ targetBer: 1e-5, confidence: 0.99, maxErrors: 10, onlyMaxErrors: true });
    expect((one.body.plans as Plan[]).map((p) => p.allowedErrors)).toEqual([10]);
    const big = await call({ targetBer: 1e-13, confidence: 0.999999, maxErrors: 100, onlyMaxErrors: true, lineRateBps: 1 });
    const [plan] = big.body.plans as Plan[];
    expect(Number.isSafeInteger(plan!.exact.bits)).toBe(true);
    expect(relErr(plan!.exact.bits, plan!.chiSquare.bits)).toBeLessThan(1e-9);
    expect(plan!.exact.duration).toMatch(/^[0-9.e+]+ years$/);
  });

  it("every plan from 0 to 100 errors comes back in order", async () => {
    const res = await call({ targetBer: 1e-9, confidence: 0.95, maxErrors: 100 });
    const plans = res.body.plans as Plan[];
    expect(plans.map((p) => p.allowedErrors)).toEqual(Array.from({ length: 101 }, (_, k) => k));
    for (let k = 1; k <= 100; k++) expect(plans[k]!.exact.bits).toBeGreaterThan(plans[k - 1]!.exact.bits);
  });
});

describe("durations in words", () => {
  it.each([
    [1e-13, "0.000100 ns"],
    [5e-7, "500 ns"],
    [0.99999e-3, "1.00 ms"],
    [0.0123, "12.3 ms"],
    [42.04, "42.0 s"],
    [59.9996, "1 min 0 s"],
    [3599.6, "1 h 0 min"],
    [299.57, "5 min 0 s"],
    [86_399.9, "1 d 0 h"],
    [86_400 * 2 + 3_600 * 5.4, "2 d 5 h"],
    [365.25 * 86_400 * 41.27, "41.3 years"],
  ])("%d s → %s", (s, text) => {
    expect(describeDuration(s)).toBe(text);
  });
});
