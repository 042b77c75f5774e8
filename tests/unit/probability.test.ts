import betainc from "@stdlib/math-base-special-betainc";
import gammaln from "@stdlib/math-base-special-gammaln";
import stdlibCdf from "@stdlib/stats-base-dists-binomial-cdf";
import stdlibLogpmf from "@stdlib/stats-base-dists-binomial-logpmf";
import stdlibPmf from "@stdlib/stats-base-dists-binomial-pmf";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { InputError } from "@/lib/core/errors";
import {
  bd0,
  binomialCdf,
  binomialPmf,
  binomialSf,
  logBinomialCdf,
  logBinomialPmf,
  logBinomialSf,
  logBinomialTails,
  MAX_BINOMIAL_N,
  stirlerr,
} from "@/lib/core/probability";
import ref from "../fixtures/scipy-reference.json";

const SCIPY = `scipy ${ref.versions.scipy} fixture`;
const DECIMAL = `Python decimal (60 digits, exact binomial coefficients) in the ${SCIPY} generator`;

// A double exp(ln P) carries |ln P|·2^-53 relative error whichever side computes it, so
// comparisons of probabilities against other libraries allow a relative error per unit of |ln P|.
function expectProbClose(actual: number, reference: number, perUnitLog: number, what: string): void {
  const budget = perUnitLog * (1 + Math.abs(Math.log(reference)));
  const rel = Math.abs(actual - reference) / reference;
  if (!(rel <= budget)) throw new Error(`${what}: ${actual} vs ${reference}, relative ${rel} > ${budget}`);
}

// Logs compared by relative error of the log itself; for logs near 0 this is the relative error of the small complement.
function expectLogClose(actual: number, reference: number | null, relTol: number, absTol: number, what: string): void {
  if (reference === null) return;
  const err = Math.abs(actual - reference);
  if (!(err <= absTol + relTol * Math.abs(reference))) {
    throw new Error(`${what}: ${actual} vs ${reference}, error ${err}`);
  }
}

describe("stirlerr and bd0 (Loader 2000 building blocks)", () => {
  it(`stirlerr matches ${DECIMAL} within 5e-17 absolute`, () => {
    // Absolute error is what matters: stirlerr enters ln P additively. Measured max 2.6e-17 (n = 81, 501).
    for (const { n, value } of ref.stirlerr) expect(Math.abs(stirlerr(n) - value)).toBeLessThan(5e-17);
  });

  it("stirlerr agrees with ln n! − (n + ½)ln n + n − ½ln 2π from @stdlib gammaln (cancellation-limited, 1e-13)", () => {
    for (let n = 1; n <= 2000; n += 7) {
      const viaGamma = gammaln(n + 1) - (n + 0.5) * Math.log(n) + n - 0.5 * Math.log(2 * Math.PI);
      expect(Math.abs(stirlerr(n) - viaGamma)).toBeLessThan(1e-13 * Math.max(1, gammaln(n + 1)));
    }
  });

  it("bd0 equals x·ln(x/M) + M − x where that form does not cancel, and is ≥ 0", () => {
    for (const [x, M] of [
      [1, 1e-9],
      [10, 2],
      [1000, 3000],
      [5, 5],
    ] as const) {
      const direct = x * Math.log(x / M) + M - x;
      expect(Math.abs(bd0(x, M) - direct)).toBeLessThanOrEqual(1e-14 * Math.max(1, direct));
    }
    // Near x = M the series keeps relative accuracy: bd0 ≈ (x − M)²/(2M) − (x − M)³/(6M²) + …
    const M = 1e6;
    const x = M + 1;
    expect(Math.abs(bd0(x, M) / (1 / (2 * M) - 1 / (6 * M * M)) - 1)).toBeLessThan(1e-6);
    expect(bd0(5, 5)).toBe(0);
  });
});

describe(`binomial against ${DECIMAL}`, () => {
  it("logpmf, logcdf and logsf within relative 5e-13 of the log (measured max 1.2e-13)", () => {
    for (const b of ref.binomial) {
      const where = `n=${b.n} k=${b.k} p=${b.p}`;
      const { lower, upper } = logBinomialTails(b.n, b.k, b.p);
      expectLogClose(logBinomialPmf(b.n, b.k, b.p), b.decimal.logpmf, 5e-13, 1e-15, `logpmf ${where}`);
      // Values that underflow in the generator's float conversion (−0) compare with an absolute bound.
      expectLogClose(lower, b.decimal.logcdf, 5e-13, 1e-300, `logcdf ${where}`);
      if (b.decimal.logsf === null) expect(upper).toBe(-Infinity);
      else expectLogClose(upper, b.decimal.logsf, 5e-13, 1e-300, `logsf ${where}`);
    }
  });

  it("tails far below the double range still have finite logs, and 1e-291 is not 0", () => {
    const deep = ref.binomial.filter((b) => b.decimal.logsf !== null && b.decimal.logsf < -745);
    expect(deep.length).toBeGreaterThanOrEqual(5);
    for (const b of deep) {
      expect(Number.isFinite(logBinomialSf(b.n, b.k, b.p))).toBe(true);
      expect(binomialSf(b.n, b.k, b.p)).toBe(0);
    }
    // P(Bin(10^6, 1e-9) > 65) ≈ 1.0e-291: a normal double, must come back as such.
    const b = ref.binomial.find((r) => r.n === 1_000_000 && r.k === 65 && r.p === 1e-9)!;
    const v = binomialSf(1_000_000, 65, 1e-9);
    expect(v).toBeGreaterThan(0);
    expectProbClose(v, Math.exp(b.decimal.logsf!), 1e-15, "sf 1e-291");
    // n = 10^6, p = 1e-3, k = 999000: ln P ≈ −6.9e6 (decimal).
    expect(logBinomialSf(1_000_000, 999_000, 1e-3)).toBeLessThan(-6e6);
  });
});

describe(`binomial against ${SCIPY} (scipy.stats.binom)`, () => {
  it("logsf and logcdf within 2e-15 + 1e-12·|ln P| (Boost incomplete beta; −inf entries are underflow)", () => {
    for (const b of ref.binomial) {
      // Near p = 1 Boost loses digits in 1 − p (see the decimal check above); skip that row here.
      if (b.p === 1 - 1e-9) continue;
      const { lower, upper } = logBinomialTails(b.n, b.k, b.p);
      expectLogClose(upper, b.scipy.logsf, 1e-12, 2e-15, `scipy logsf n=${b.n} k=${b.k} p=${b.p}`);
      expectLogClose(lower, b.scipy.logcdf, 1e-12, 2e-15, `scipy logcdf n=${b.n} k=${b.k} p=${b.p}`);
    }
  });

  it("logpmf within 5e-9 absolute (scipy sums gammaln terms of size ~1.3e7 at n = 10^6)", () => {
    for (const b of ref.binomial) {
      expectLogClose(logBinomialPmf(b.n, b.k, b.p), b.scipy.logpmf, 1e-13, 5e-9, `scipy logpmf n=${b.n} k=${b.k} p=${b.p}`);
    }
  });
});

const GRID_N = [1, 2, 3, 5, 10, 20, 50, 100, 200, 500, 1000];
const GRID_P = [1e-12, 1e-6, 1e-3, 0.01, 0.1, 0.3, 0.5, 0.7, 0.9, 0.999, 1 - 1e-9];

// @stdlib's own relative error reaches about 5e-14 at moderate values (its cdf at n = 500, k = 149, p = 0.3 is off
// by 1.8e-14 from the exact sum 0.48313485366551598…, ours by 1.2e-15), so the grid allows 1e-13 per unit of |ln P|.
describe("binomial against @stdlib over a grid (n 1..1000, 11 values of p, every k)", () => {
  it("pmf and logpmf: relative 1e-13 per unit of |ln P| (@stdlib binomial pmf / logpmf)", () => {
    for (const n of GRID_N)
      for (const p of GRID_P)
        for (let k = 0; k <= n; k++) {
          const r = stdlibPmf(k, n, p);
          if (r > 1e-300) expectProbClose(binomialPmf(n, k, p), r, 1e-13, `pmf n=${n} k=${k} p=${p}`);
          const lr = stdlibLogpmf(k, n, p);
          if (lr > -700) expectLogClose(logBinomialPmf(n, k, p), lr, 1e-13, 1e-13, `logpmf n=${n} k=${k} p=${p}`);
        }
  });

  it("cdf: relative 1e-13 per unit of |ln P| (@stdlib binomial cdf), except p = 1 − 1e-9", () => {
    // At p = 1 − 1e-9 @stdlib's cdf is off by 4e-10 relative at n = 50, k = 16 (exact value in the decimal fixture).
    for (const n of GRID_N)
      for (const p of GRID_P.slice(0, -1))
        for (let k = 0; k <= n; k++) {
          const r = stdlibCdf(k, n, p);
          if (r > 1e-300) expectProbClose(binomialCdf(n, k, p), r, 1e-13, `cdf n=${n} k=${k} p=${p}`);
        }
  });

  it("sf: P(X ≥ k) = I_p(k, n − k + 1), relative 1e-13 per unit of |ln P| (@stdlib betainc)", () => {
    for (const n of GRID_N)
      for (const p of GRID_P)
        for (let k = 1; k <= n; k++) {
          const r = betainc(p, k, n - k + 1);
          if (r > 1e-300 && r < 1) expectProbClose(binomialSf(n, k - 1, p), r, 1e-13, `sf n=${n} k=${k} p=${p}`);
        }
  });
});

describe("binomial properties (fast-check)", () => {
  const nArb = fc.integer({ min: 0, max: 200 });
  const pArb = fc.oneof(fc.constantFrom(0, 0.5, 1, 1e-15, 1 - 1e-15), fc.double({ min: 0, max: 1, noNaN: true }));

  it("probabilities lie in [0, 1] and cdf(k) + sf(k) = 1", () => {
    fc.assert(
      fc.property(nArb, fc.integer({ min: -3, max: 205 }), pArb, (n, k, p) => {
        const c = binomialCdf(n, k, p);
        const s = binomialSf(n, k, p);
        const m = binomialPmf(n, k, p);
        for (const v of [c, s, m]) expect(v >= 0 && v <= 1).toBe(true);
        expect(Math.abs(c + s - 1)).toBeLessThan(1e-14);
      }),
    );
  });

  it("the pmf sums to 1 for n ≤ 200", () => {
    fc.assert(
      fc.property(nArb, pArb, (n, p) => {
        let sum = 0;
        for (let k = 0; k <= n; k++) sum += binomialPmf(n, k, p);
        expect(Math.abs(sum - 1)).toBeLessThan(1e-13);
      }),
    );
  });

  it("cdf(k) − cdf(k − 1) = pmf(k)", () => {
    fc.assert(
      fc.property(nArb, fc.integer({ min: 0, max: 200 }), fc.double({ min: 0.01, max: 0.99, noNaN: true }), (n, k, p) => {
        const diff = binomialCdf(n, k, p) - binomialCdf(n, k - 1, p);
        expect(Math.abs(diff - binomialPmf(n, k, p))).toBeLessThan(1e-14);
      }),
    );
  });
});

describe("binomial edge cases", () => {
  it("p = 0 and p = 1 are exact point masses", () => {
    expect(logBinomialPmf(10, 0, 0)).toBe(0);
    expect(logBinomialPmf(10, 1, 0)).toBe(-Infinity);
    expect(logBinomialPmf(10, 10, 1)).toBe(0);
    expect(logBinomialPmf(10, 9, 1)).toBe(-Infinity);
    expect(binomialCdf(10, 0, 0)).toBe(1);
    expect(logBinomialSf(10, 0, 0)).toBe(-Infinity);
    expect(binomialCdf(10, 9, 1)).toBe(0);
    expect(binomialSf(10, 9, 1)).toBe(1);
    expect(binomialSf(10, 10, 1)).toBe(0);
  });

  it("p = ½ and n = 1 give the fair coin", () => {
    // Bin(1, ½): P(0) = P(1) = ½ by definition.
    expect(binomialPmf(1, 0, 0.5)).toBe(0.5);
    expect(binomialPmf(1, 1, 0.5)).toBe(0.5);
    expect(binomialCdf(1, 0, 0.5)).toBe(0.5);
    expect(binomialSf(1, 0, 0.5)).toBe(0.5);
    // Bin(4, ½): pmf = (1, 4, 6, 4, 1)/16, from Pascal's triangle.
    [1, 4, 6, 4, 1].forEach((c, k) => expect(Math.abs(binomialPmf(4, k, 0.5) - c / 16)).toBeLessThan(1e-16));
  });

  it("k = 0 and k = n use the exact forms (1 − p)^n and p^n", () => {
    // Computed by the reference formula n·log1p(−p) with JavaScript's own Math.log1p.
    expect(logBinomialPmf(1000, 0, 1e-15)).toBeCloseTo(1000 * Math.log1p(-1e-15), 25);
    expect(logBinomialPmf(1000, 1000, 0.3)).toBeCloseTo(1000 * Math.log(0.3), 10);
  });

  it("k < 0 and k ≥ n are exact", () => {
    expect(logBinomialCdf(20, -1, 0.3)).toBe(-Infinity);
    expect(logBinomialSf(20, -1, 0.3)).toBe(0);
    expect(logBinomialCdf(20, 20, 0.3)).toBe(0);
    expect(logBinomialSf(20, 20, 0.3)).toBe(-Infinity);
    expect(logBinomialCdf(20, 25, 0.3)).toBe(0);
    expect(logBinomialPmf(20, 21, 0.3)).toBe(-Infinity);
    expect(logBinomialPmf(20, -1, 0.3)).toBe(-Infinity);
    expect(binomialCdf(0, 0, 0.3)).toBe(1);
    expect(binomialPmf(0, 0, 0.3)).toBe(1);
  });

  it("rejects bad n, k and p with InputError", () => {
    expect(() => logBinomialPmf(MAX_BINOMIAL_N + 1, 0, 0.5)).toThrow(InputError);
    expect(() => logBinomialPmf(-1, 0, 0.5)).toThrow(InputError);
    expect(() => logBinomialPmf(2.5, 0, 0.5)).toThrow(/n must be an integer from 0 to 1000000/);
    expect(() => logBinomialCdf(10, 1.5, 0.5)).toThrow(InputError);
    expect(() => logBinomialSf(10, 1, 1.5)).toThrow(/p must be a probability/);
    expect(() => logBinomialSf(10, 1, Number.NaN)).toThrow(InputError);
    expect(() => logBinomialSf(10, 1, -0.1)).toThrow(InputError);
  });

  it("the largest n = 10^6 at p = ½ near the mode is accurate", () => {
    const b = ref.binomial.find((r) => r.n === 1_000_000 && r.k === 500_000 && r.p === 0.5)!;
    const { lower, upper } = logBinomialTails(1_000_000, 500_000, 0.5);
    // Decimal reference, relative 5e-13 of the log.
    expectLogClose(lower, b.decimal.logcdf, 5e-13, 0, "logcdf 10^6");
    expectLogClose(upper, b.decimal.logsf, 5e-13, 0, "logsf 10^6");
    // Symmetry of Bin(n, ½): P(X ≤ n/2 − 1) = P(X > n/2) = P(X ≥ n/2 + 1).
    expect(Math.abs(logBinomialCdf(1_000_000, 499_999, 0.5) - upper)).toBeLessThan(1e-15);
  });
});
