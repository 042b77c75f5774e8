import binomialCdf from "@stdlib/stats-base-dists-binomial-cdf";
import { describe, expect, it } from "vitest";
import { InputError } from "@/lib/core/errors";
import { clopperPearson, clopperPearsonLower, clopperPearsonUpper, wilson } from "@/lib/core/stats/binomial-interval";
import ref from "../fixtures/stats/stats-reference.json";

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe("Clopper–Pearson bounds", () => {
  it.each(ref.clopperPearson)("k = $k, n = $n, one-sided at $confidence: both bounds match mpmath's root of the exact binomial CDF (relative 1e-9)", (c) => {
    expect(rel(clopperPearsonUpper(c.k, c.n, c.confidence), c.upper)).toBeLessThan(1e-9);
    if (c.k === 0) expect(clopperPearsonLower(c.k, c.n, c.confidence)).toBe(0);
    else expect(rel(clopperPearsonLower(c.k, c.n, c.confidence), c.lower)).toBeLessThan(1e-9);
  });

  it("1 error in 10 trials, two-sided 95 %: (0.0025, 0.4450) (Clopper & Pearson's table, from memory; fixture above to 1e-9)", () => {
    const ci = clopperPearson(1, 10, 0.95);
    expect(ci.lower).toBeCloseTo(0.0025, 4);
    expect(ci.upper).toBeCloseTo(0.445, 4);
  });

  it.each([10, 1e3, 1e6, 1e9, 1e12, 1e15])("0 errors in %d bits at 95 %%: the closed form 1 − 0.05^(1/n) by expm1/log1p, and −ln 0.05/n ≈ 3/n in the limit (REFERENCES: rule of three)", (n) => {
    const upper = clopperPearsonUpper(0, n, 0.95);
    expect(rel(upper, -Math.expm1(Math.log(0.05) / n))).toBeLessThan(1e-14);
    if (n >= 1e6) {
      expect(rel(upper, -Math.log(0.05) / n)).toBeLessThan(1e-5);
      expect(rel(upper, 3 / n)).toBeLessThan(0.0015);
    }
  });

  it.each([
    [2, 5e9, 0.95],
    [7, 1e13, 0.99],
    [40, 2e12, 0.9],
  ])("k = %d, n = %d at %d: the bound is where stdlib's binomial CDF (an independent incomplete-beta code) equals 1 − CL", (k, n, cl) => {
    const u = clopperPearsonUpper(k, n, cl);
    // stdlib's CDF is good to about 1e-10 relative here; the bound moves the CDF by about k/u per unit of p.
    expect(Math.abs(binomialCdf(k, n, u) - (1 - cl))).toBeLessThan(1e-8);
  });

  it.each([
    [1e6, 1e12],
    [1e9, 1e12],
    [5e11, 1e12],
    [123_456, 1e15],
  ])("many errors (%d in %d): one-sided 95 %% bounds agree with the Wilson 90 %% interval within 1 %% of its half-width (both tend to the normal interval as k grows; DeMoivre–Laplace)", (k, n) => {
    const w = wilson(k, n, 0.9);
    const half = (w.upper - w.lower) / 2;
    expect(Math.abs(clopperPearsonUpper(k, n, 0.95) - w.upper)).toBeLessThan(0.01 * half);
    expect(Math.abs(clopperPearsonLower(k, n, 0.95) - w.lower)).toBeLessThan(0.01 * half);
  });

  it("k = n: upper bound 1, lower bound (1 − CL)^(1/n) (the mirror of the k = 0 closed form)", () => {
    expect(clopperPearsonUpper(100, 100, 0.95)).toBe(1);
    expect(rel(clopperPearsonLower(100, 100, 0.95), 0.05 ** (1 / 100))).toBeLessThan(1e-14);
    expect(clopperPearson(0, 1, 0.9)).toEqual({ lower: 0, upper: 0.95 });
  });

  it("the two-sided interval holds the one-sided bounds at (1 + CL)/2", () => {
    const two = clopperPearson(5, 100, 0.95);
    expect(two.lower).toBe(clopperPearsonLower(5, 100, 0.975));
    expect(two.upper).toBe(clopperPearsonUpper(5, 100, 0.975));
  });
});

describe("Wilson score interval", () => {
  it.each(ref.wilson)("k = $k, n = $n at $confidence: matches mpmath's evaluation of Wilson's formula (relative 1e-12)", (c) => {
    const ci = wilson(c.k, c.n, c.confidence);
    // mpmath's centre − radius at k = 0 is 0 up to its 50 digits.
    if (c.k === 0) expect([ci.lower, c.lower < 1e-40]).toEqual([0, true]);
    else expect(rel(ci.lower, c.lower)).toBeLessThan(1e-12);
    expect(rel(ci.upper, c.upper)).toBeLessThan(1e-12);
  });

  it("0 errors in n: upper z²/(n + z²), z = 1.959964 at 95 % (Wilson 1927, k = 0 case)", () => {
    const z = 1.959963984540054;
    for (const n of [10, 1e6, 1e15]) expect(rel(wilson(0, n, 0.95).upper, (z * z) / (n + z * z))).toBeLessThan(1e-13);
  });
});

describe("bad input", () => {
  it.each([
    [() => clopperPearsonUpper(1, 0, 0.95), /at least 1/],
    [() => clopperPearsonUpper(11, 10, 0.95), /k must be an integer from 0 to 10/],
    [() => clopperPearsonUpper(-1, 10, 0.95), /k must be/],
    [() => clopperPearsonUpper(1.5, 10, 0.95), /k must be/],
    [() => clopperPearsonUpper(1, 2 ** 53, 0.95), /n must be/],
    [() => clopperPearsonLower(1, 10, 1), /confidence/],
    [() => clopperPearson(1, 10, 0), /confidence/],
    [() => wilson(1, 10, Number.NaN), /confidence/],
  ])("%#: refused with an InputError", (f, message) => {
    expect(f).toThrow(InputError);
    expect(f).toThrow(message);
  });
});
