import gammaln from "@stdlib/math-base-special-gammaln";
import { describe, expect, it } from "vitest";
import { InputError } from "@/lib/core/errors";
import { wilson } from "@/lib/core/stats/binomial-interval";
import { confidenceSequence, decide, logMixtureRatio, SEQUENTIAL_METHOD, sequentialPlan, type Verdict } from "@/lib/core/stats/sequential";
import { rng } from "../helpers/rng";

const TARGET = 1e-3;
const CHUNK = 1000;
const RUNS = 2000;
const ALPHA = 0.05;
// A binomial margin: the fraction of RUNS runs may exceed its true probability α by 3 standard deviations by chance alone.
const MARGIN = 3 * Math.sqrt((ALPHA * (1 - ALPHA)) / RUNS);

type Rule = (errors: number, trials: number) => Verdict;

/**
 * One seeded run of independent Bernoulli(p) trials, looked at after every chunk of CHUNK trials until the rule decides
 * or maxChunks chunks have run. Errors are placed by geometric gaps ⌊ln U / ln(1 − p)⌋ between them (inversion of the
 * geometric distribution), with U from pure-rand's xoroshiro128+ (tests/helpers/rng.ts).
 */
function run(rule: Rule, p: number, seed: number, maxChunks: number): { verdict: Verdict | "budget"; trials: number } {
  // Small consecutive seeds give xoroshiro128+ nearly equal first states: spread them and drop the first draws.
  const u = rng(Math.imul(seed, 0x9e3779b1));
  for (let i = 0; i < 4; i++) u();
  const gap = () => Math.floor(Math.log(1 - u()) / Math.log1p(-p));
  let next = gap();
  let errors = 0;
  for (let c = 1; c <= maxChunks; c++) {
    const end = c * CHUNK;
    for (; next < end; next += 1 + gap()) errors++;
    const verdict = rule(errors, end);
    if (verdict !== "continue") return { verdict, trials: end };
  }
  return { verdict: "budget", trials: maxChunks * CHUNK };
}

function tally(rule: Rule, p: number, maxChunks: number) {
  const counts = { supported: 0, refuted: 0, budget: 0, continue: 0 };
  const trials: number[] = [];
  for (let seed = 1; seed <= RUNS; seed++) {
    const r = run(rule, p, seed, maxChunks);
    counts[r.verdict]++;
    trials.push(r.trials);
  }
  trials.sort((a, b) => a - b);
  return { counts, median: trials[RUNS / 2]!, max: trials[RUNS - 1]! };
}

const plan = sequentialPlan(TARGET, 1 - ALPHA);
const sequential: Rule = (k, n) => decide(plan, k, n);

describe("sequential rule under optional stopping (simulated, 2000 seeded runs, a look after every chunk of 1000 trials)", () => {
  it("true rate at the target, 1000 looks: the confidence sequence ever misses the truth in at most α of runs (Ville's inequality), while fixed-sample Wilson intervals looked at after each of 300 chunks miss it far more often", () => {
    const { counts } = tally(sequential, TARGET, 1000);
    // Either verdict says the rate is not the target; `refuted` is the wrong one for the claim rate ≤ target.
    expect(counts.refuted / RUNS).toBeLessThanOrEqual(ALPHA + MARGIN);
    expect((counts.refuted + counts.supported) / RUNS).toBeLessThanOrEqual(ALPHA + MARGIN);
    // The harness can see the inflation optional stopping causes: the same looks at a 95 % Wilson interval.
    const naive = tally((k, n) => {
      const w = wilson(k, n, 1 - ALPHA);
      return w.lower > TARGET ? "refuted" : w.upper < TARGET ? "supported" : "continue";
    }, TARGET, 300);
    expect((naive.counts.refuted + naive.counts.supported) / RUNS).toBeGreaterThan(4 * ALPHA);
  });

  it("true rate 1.25 × target (the claim is false): `supported` in at most α of runs", () => {
    const { counts } = tally(sequential, 1.25 * TARGET, 1000);
    expect(counts.supported / RUNS).toBeLessThanOrEqual(ALPHA + MARGIN);
    expect(counts.refuted).toBeGreaterThan(counts.budget);
  });

  it("true rate a tenth of the target: every run supported, half within 5/target trials (an error-free run needs 4.74/target), all within 25/target", () => {
    const r = tally(sequential, TARGET / 10, 1000);
    expect(r.counts.supported).toBe(RUNS);
    expect(r.median).toBeLessThanOrEqual(5 / TARGET);
    expect(r.max).toBeLessThanOrEqual(25 / TARGET);
  });

  it("true rate ten times the target: every run refuted, half within the first chunk (1/target trials), all within 5/target", () => {
    const r = tally(sequential, 10 * TARGET, 1000);
    expect(r.counts.refuted).toBe(RUNS);
    expect(r.median).toBeLessThanOrEqual(1 / TARGET);
    expect(r.max).toBeLessThanOrEqual(5 / TARGET);
  });
});

describe("the mixture ratio and its confidence sequence", () => {
  const b = plan.priorB;

  it("ln M_n(p) equals ln b + ln B(k + 1, n − k + b) − k ln p − (n − k) ln(1 − p), the Beta function from stdlib's gammaln (absolute 1e-9)", () => {
    for (const [k, n, p] of [
      [0, 1000, 1e-3],
      [3, 5000, 1e-3],
      [40, 10_000, 2e-3],
      [2, 20_000, 5e-4],
    ] as const) {
      const lnBeta = gammaln(k + 1) + gammaln(n - k + b) - gammaln(n + 1 + b);
      const expected = Math.log(b) + lnBeta - k * Math.log(p) - (n - k) * Math.log1p(-p);
      expect(Math.abs(logMixtureRatio(plan, k, n, p) - expected)).toBeLessThan(1e-9);
    }
  });

  it("error-free trials are first supported where ln(b/(n + b)) − n·ln(1 − target) reaches ln(1/α) (the k = 0 closed form), at target 1e-9 too", () => {
    for (const target of [1e-3, 1e-9]) {
      const pl = sequentialPlan(target, 0.95);
      const crossed = (n: number) => Math.log(pl.priorB / (n + pl.priorB)) - n * Math.log1p(-target) >= Math.log(20);
      let lo = 1;
      let hi = Math.ceil(100 / target);
      while (hi - lo > 1) {
        const mid = Math.floor((lo + hi) / 2);
        if (crossed(mid)) hi = mid;
        else lo = mid;
      }
      expect(decide(pl, 0, hi)).toBe("supported");
      expect(decide(pl, 0, hi - 1)).toBe("continue");
      // x − ln(1 + x) = ln 20 at x ≈ 4.74 (module doc).
      expect(hi * target).toBeCloseTo(4.74, 1);
    }
  });

  it("for 0 errors the upper end is 1 − exp(−(ln(1/α) + ln((n + b)/b))/n) (the same closed form solved for p)", () => {
    const pl = sequentialPlan(1e-9, 0.95);
    for (const n of [1e6, 4.4e9, 1e13]) {
      const expected = -Math.expm1(-(Math.log(20) + Math.log((n + pl.priorB) / pl.priorB)) / n);
      const cs = confidenceSequence(pl, 0, n);
      expect(cs.lower).toBe(0);
      expect(Math.abs(cs.upper - expected) / expected).toBeLessThan(1e-8);
    }
  });

  it("the sequence holds k/n, its ends are where ln M_n = ln(1/α), and the verdict follows where the target lies", () => {
    const pl = sequentialPlan(1e-9, 0.95);
    const cs = confidenceSequence(pl, 30, 1e9);
    expect(cs.lower).toBeLessThan(30 / 1e9);
    expect(cs.upper).toBeGreaterThan(30 / 1e9);
    for (const edge of [cs.lower, cs.upper]) expect(Math.abs(logMixtureRatio(pl, 30, 1e9, edge) - Math.log(20))).toBeLessThan(1e-6);
    expect(cs.lower).toBeGreaterThan(1e-9);
    expect(decide(pl, 30, 1e9)).toBe("refuted");
    expect(decide(pl, 0, 0)).toBe("continue");
    expect(confidenceSequence(pl, 0, 0)).toEqual({ lower: 0, upper: 1 });
    expect(confidenceSequence(sequentialPlan(0.5, 0.9), 5, 5).upper).toBe(1);
  });

  it("names its method and source", () => {
    expect(SEQUENTIAL_METHOD).toMatch(/Howard, Ramdas, McAuliffe & Sekhon, Ann\. Statist\. 49\(2\), 2021/);
    expect(SEQUENTIAL_METHOD).toMatch(/Ville/);
  });

  it("refuses a bad plan and impossible counts", () => {
    expect(() => sequentialPlan(0, 0.95)).toThrow(InputError);
    expect(() => sequentialPlan(0.6, 0.95)).toThrow(/at most 0.5/);
    expect(() => sequentialPlan(1e-3, 1)).toThrow(/confidence/);
    expect(() => decide(plan, 5, 4)).toThrow(/errors must be an integer from 0 to 4/);
    expect(() => decide(plan, 0, 1.5)).toThrow(/trials/);
    expect(() => decide(plan, 0, Number.MAX_SAFE_INTEGER)).toThrow(/trials/);
  });
});
