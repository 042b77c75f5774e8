import binomialCdf from "@stdlib/stats-base-dists-binomial-cdf";
import { describe, expect, it } from "vitest";
import { InputError } from "@/lib/core/errors";
import { logBinomialCdf } from "@/lib/core/probability";
import { clopperPearsonUpper } from "@/lib/core/stats/binomial-interval";
import { logBinomialCdfLarge } from "@/lib/core/stats/binomial-tail";
import { chiSquareTestLength, exactTestLength, moreErrorFreeBits, passProbability } from "@/lib/core/stats/test-length";
import ref from "../fixtures/stats/stats-reference.json";

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe("binomial log-CDF for long tests", () => {
  it.each(ref.logCdf)("n = $n, k = $k, p = $p: matches mpmath's exact sum (absolute 1e-12 in ln)", (c) => {
    expect(Math.abs(logBinomialCdfLarge(c.n, c.k, c.p) - c.logCdf)).toBeLessThan(1e-12);
  });

  it("agrees with lib/core/probability's logBinomialCdf inside its range (n ≤ 10^6), both tails", () => {
    for (const [n, k, p] of [
      [1e6, 3, 1e-5],
      [1e6, 30, 1e-5],
      [1000, 500, 0.5],
      [1000, 900, 0.5],
      [50, 0, 0.3],
    ] as const) {
      expect(Math.abs(logBinomialCdfLarge(n, k, p) - logBinomialCdf(n, k, p))).toBeLessThan(1e-13);
    }
  });

  it("edge cases: p = 0 → ln 1, p = 1 → ln 0, k ≥ n → ln 1, k < 0 → ln 0", () => {
    expect(logBinomialCdfLarge(1e12, 0, 0)).toBe(0);
    expect(logBinomialCdfLarge(1e12, 5, 1)).toBe(-Infinity);
    expect(logBinomialCdfLarge(10, 10, 0.3)).toBe(0);
    expect(logBinomialCdfLarge(10, -1, 0.3)).toBe(-Infinity);
    expect(() => logBinomialCdfLarge(2 ** 53, 1, 0.1)).toThrow(InputError);
    expect(() => logBinomialCdfLarge(10, 1, 1.1)).toThrow(InputError);
  });
});

describe("chi-square form N = χ²(2(k + 1), CL)/(2·BER)", () => {
  it.each(ref.chiSquare)("k = $k at $confidence: N·BER = χ²/2 as scipy's chi2.ppf (relative 1e-12)", (c) => {
    const { bits, chiSquare } = chiSquareTestLength(1e-9, c.confidence, c.k);
    expect(rel(bits * 1e-9, c.berTimesBits)).toBeLessThan(1e-12);
    expect(rel(chiSquare / 2, c.berTimesBits)).toBeLessThan(1e-12);
  });

  it.each([
    [0.9, [2.303, 3.89, 5.322]],
    [0.95, [2.996, 4.744, 6.296]],
    [0.99, [4.605, 6.638, 8.406]],
  ] as const)("CL %d, 0/1/2 errors: the BER-test table values (common BER-test tables; Gehrels, ApJ 303, 1986, Table 1 — from memory)", (cl, table) => {
    table.forEach((v, k) => expect(chiSquareTestLength(1e-6, cl, k).bits * 1e-6).toBeCloseTo(v, 3));
  });

  it("0 errors: −ln(1 − CL)/BER exactly (the χ² with 2 degrees of freedom is −2 ln(1 − CL); REFERENCES: rule of three)", () => {
    for (const cl of [0.9, 0.95, 0.99, 0.999999]) expect(rel(chiSquareTestLength(1e-12, cl, 0).bits, -Math.log1p(-cl) / 1e-12)).toBeLessThan(1e-13);
  });

  it("for k = 0..10 the Poisson upper limit λ solves P(Poisson(λ) ≤ k) = 1 − CL (a Poisson sum bisected here)", () => {
    const poissonCdf = (lambda: number, k: number) => {
      let term = Math.exp(-lambda);
      let s = term;
      for (let j = 1; j <= k; j++) s += term *= lambda / j;
      return s;
    };
    for (const cl of [0.9, 0.95, 0.99]) {
      for (let k = 0; k <= 10; k++) {
        let lo = 0;
        let hi = 100;
        for (let i = 0; i < 200; i++) {
          const mid = (lo + hi) / 2;
          if (poissonCdf(mid, k) > 1 - cl) lo = mid;
          else hi = mid;
        }
        expect(rel(chiSquareTestLength(1e-9, cl, k).bits * 1e-9, lo)).toBeLessThan(1e-10);
      }
    }
  });
});

describe("exact binomial test length", () => {
  it.each(ref.exactLength)("target $target, CL $confidence, $k errors: $bits bits, as mpmath's integer search", (c) => {
    expect(exactTestLength(c.target, c.confidence, c.k)).toBe(c.bits);
  });

  it("0 errors at target 0.01: the closed form ⌈ln(1 − CL)/ln(1 − target)⌉ (P(no error in n) = (1 − target)^n)", () => {
    for (const cl of [0.9, 0.95, 0.99]) expect(exactTestLength(0.01, cl, 0)).toBe(Math.ceil(Math.log1p(-cl) / Math.log1p(-0.01)));
  });

  it("target 1e-3, k = 0..10 at 95 %: the smallest n, by stdlib's binomial CDF at n and n − 1", () => {
    for (let k = 0; k <= 10; k++) {
      const n = exactTestLength(1e-3, 0.95, k);
      expect(binomialCdf(k, n, 1e-3)).toBeLessThanOrEqual(0.05);
      expect(binomialCdf(k, n - 1, 1e-3)).toBeGreaterThan(0.05);
    }
  });

  it("at target 1e-12 the exact length is the chi-square form to a relative 1e-9 (the Poisson limit; REFERENCES), and the pass's Clopper–Pearson bound is the target (relative 1e-10: one bit moves it by 3e-13, the beta quantile is good to about 1e-12)", () => {
    for (const cl of [0.9, 0.95, 0.99]) {
      for (let k = 0; k <= 10; k++) {
        const n = exactTestLength(1e-12, cl, k);
        expect(rel(n, chiSquareTestLength(1e-12, cl, k).bits)).toBeLessThan(1e-9);
        expect(rel(clopperPearsonUpper(k, n, cl), 1e-12)).toBeLessThan(1e-10);
      }
    }
  });

  it("the largest plans stay exact integers: 100 errors at 1e-13 and CL 0.999999", () => {
    const n = exactTestLength(1e-13, 0.999999, 100);
    expect(Number.isSafeInteger(n)).toBe(true);
    expect(rel(n, chiSquareTestLength(1e-13, 0.999999, 100).bits)).toBeLessThan(1e-9);
  });

  it("refuses a plan beyond 2^53 − 1 bits, a bad target and a bad error count", () => {
    expect(() => exactTestLength(1e-16, 0.99, 100)).toThrow(/more than 2\^53 − 1 bits/);
    expect(() => exactTestLength(0, 0.95, 0)).toThrow(InputError);
    expect(() => exactTestLength(1e-6, 0.95, -1)).toThrow(/allowedErrors/);
    expect(() => exactTestLength(1e-6, 0.95, 10_001)).toThrow(/allowedErrors/);
  });
});

describe("power and more error-free bits", () => {
  it.each(ref.power)("P(at most $k errors in $n bits) at true BER $p: mpmath's exact sum (relative 1e-11)", (c) => {
    expect(rel(passProbability(c.n, c.k, c.p), c.pass)).toBeLessThan(1e-11);
  });

  it("at the target itself a planned test passes with probability at most 1 − CL, and just above n − 1's", () => {
    const n = exactTestLength(1e-9, 0.95, 2);
    expect(passProbability(n, 2, 1e-9)).toBeLessThanOrEqual(0.05);
    expect(passProbability(n - 1, 2, 1e-9)).toBeGreaterThan(0.05);
  });

  it("2 errors in 5·10^9 bits against 1e-9 at 95 %: ≈ 1.296·10^9 more error-free bits (6.296/BER from the tables, less what was run)", () => {
    const more = moreErrorFreeBits(2, 5e9, 1e-9, 0.95);
    expect(rel(more + 5e9, 6.296e9)).toBeLessThan(1e-4);
    expect(passProbability(5e9 + more, 2, 1e-9)).toBeLessThanOrEqual(0.05);
    expect(passProbability(5e9 + more - 1, 2, 1e-9)).toBeGreaterThan(0.05);
    expect(rel(clopperPearsonUpper(2, 5e9 + more, 0.95), 1e-9)).toBeLessThan(1e-10);
  });

  it("a result already decided needs no more bits", () => {
    expect(moreErrorFreeBits(0, 4e9, 1e-9, 0.95)).toBe(0);
    expect(() => moreErrorFreeBits(3, 2, 1e-9, 0.95)).toThrow(/errors must be an integer from 0 to 2/);
  });
});
