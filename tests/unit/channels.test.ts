import binomcoef from "@stdlib/math-base-special-binomcoef";
import stdlibCdf from "@stdlib/stats-base-dists-binomial-cdf";
import { describe, expect, it } from "vitest";
import * as capacity from "@/lib/core/capacity";
import { bscBlockError, bscCapacity, bscFlips, bscPostDecodingBer } from "@/lib/core/channels";
import { InputError } from "@/lib/core/errors";
import ref from "../fixtures/scipy-reference.json";

const DECIMAL = `Python decimal in the scipy ${ref.versions.scipy} fixture generator`;
const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

// Direct sums of C(n, j)·p^j·(1 − p)^{n−j} with @stdlib binomcoef, for small n where nothing underflows.
const term = (n: number, j: number, p: number) => binomcoef(n, j) * p ** j * (1 - p) ** (n - j);
function directTail(n: number, t: number, p: number): number {
  let s = 0;
  for (let j = t + 1; j <= n; j++) s += term(n, j, p);
  return s;
}

function decimalRow(n: number, k: number, p: number) {
  const row = ref.binomial.find((b) => b.n === n && b.k === k && b.p === p);
  if (!row) throw new Error(`no fixture row n=${n} k=${k} p=${p}`);
  return row.decimal;
}

describe("bscFlips", () => {
  it("exactly / at most / more than i flips agree with the direct sum and @stdlib binomial cdf", () => {
    for (const [n, i, p] of [
      [7, 1, 0.1],
      [23, 3, 1e-3],
      [100, 10, 0.05],
      [1, 0, 0.5],
      [1, 1, 0.3],
    ] as const) {
      const r = bscFlips(n, i, p);
      expect(rel(r.exactly.value, term(n, i, p))).toBeLessThan(1e-13);
      expect(rel(r.atMost.value, stdlibCdf(i, n, p))).toBeLessThan(1e-13);
      if (i < n) expect(rel(r.moreThan.value, directTail(n, i, p))).toBeLessThan(1e-12);
      expect(rel(10 ** r.exactly.log10, r.exactly.value)).toBeLessThan(1e-13);
    }
  });

  it(`keeps a finite log10 when the value underflows (${DECIMAL})`, () => {
    const r = bscFlips(1_000_000, 100, 1e-9);
    const d = decimalRow(1_000_000, 100, 1e-9);
    expect(r.moreThan.value).toBe(0);
    expect(r.exactly.value).toBe(0);
    expect(Math.abs(r.moreThan.log10 - d.logsf! / Math.LN10)).toBeLessThan(1e-12 * Math.abs(d.logsf! / Math.LN10));
    expect(Math.abs(r.exactly.log10 - d.logpmf! / Math.LN10)).toBeLessThan(1e-12 * Math.abs(d.logpmf! / Math.LN10));
    expect(r.atMost.value).toBe(1);
  });

  it("−Infinity only for impossible events: p = 0 and p = 1", () => {
    expect(bscFlips(10, 0, 0).moreThan).toEqual({ value: 0, log10: -Infinity });
    expect(bscFlips(10, 0, 0).exactly).toEqual({ value: 1, log10: 0 });
    expect(bscFlips(10, 3, 1).atMost).toEqual({ value: 0, log10: -Infinity });
    expect(bscFlips(10, 10, 1).exactly).toEqual({ value: 1, log10: 0 });
    expect(bscFlips(10, 10, 0.5).moreThan).toEqual({ value: 0, log10: -Infinity });
  });

  it("rejects i outside 0..n and bad n, p", () => {
    expect(() => bscFlips(7, 8, 0.1)).toThrow(/i must be an integer from 0 to 7/);
    expect(() => bscFlips(7, -1, 0.1)).toThrow(InputError);
    expect(() => bscFlips(7, 1.5, 0.1)).toThrow(InputError);
    expect(() => bscFlips(2_000_000, 1, 0.1)).toThrow(InputError);
    expect(() => bscFlips(7, 1, 1.1)).toThrow(InputError);
  });
});

describe("bscBlockError", () => {
  it("Hamming (7,4), t = 1: Σ_{j≥2} C(7,j)p^j(1 − p)^{7−j} (direct sum, @stdlib binomcoef)", () => {
    for (const p of [1e-1, 1e-2, 1e-3, 1e-6]) expect(rel(bscBlockError(7, 1, p).value, directTail(7, 1, p))).toBeLessThan(1e-12);
  });

  it(`Golay (23,12), t = 3 at p = 1e-3 (${DECIMAL})`, () => {
    const d = decimalRow(23, 3, 1e-3);
    expect(Math.abs(bscBlockError(23, 3, 1e-3).log10 - d.logsf! / Math.LN10)).toBeLessThan(1e-13);
  });

  it(`the largest n = 10^6 with t = 1000 at p = 1e-3 (${DECIMAL})`, () => {
    const d = decimalRow(1_000_000, 1000, 1e-3);
    expect(rel(bscBlockError(1_000_000, 1000, 1e-3).value, Math.exp(d.logsf!))).toBeLessThan(1e-12);
  });

  it("t ≥ n cannot fail; t < 0 is refused", () => {
    expect(bscBlockError(7, 7, 0.4)).toEqual({ value: 0, log10: -Infinity });
    expect(bscBlockError(7, 100, 0.4).value).toBe(0);
    expect(() => bscBlockError(7, -1, 0.4)).toThrow(InputError);
  });
});

describe("bscPostDecodingBer", () => {
  // The textbook sum itself, (1/n)·Σ_{j>t} j·C(n,j)p^j(1 − p)^{n−j}, evaluated directly.
  function textbook(n: number, t: number, p: number): number {
    let s = 0;
    for (let j = t + 1; j <= n; j++) s += j * term(n, j, p);
    return s / n;
  }

  it("equals the textbook sum (Sklar, from memory) for several codes", () => {
    for (const [n, t, p] of [
      [7, 1, 1e-2],
      [7, 1, 1e-4],
      [23, 3, 1e-3],
      [15, 2, 0.05],
      [127, 10, 0.02],
      [1, 0, 0.3],
    ] as const) {
      expect(rel(bscPostDecodingBer(n, t, p).value, textbook(n, t, p))).toBeLessThan(1e-12);
    }
  });

  it("t = 0 gives the raw crossover probability; p = 0 gives an impossible event", () => {
    expect(bscPostDecodingBer(7, 0, 0.01).value).toBeCloseTo(0.01, 17);
    expect(bscPostDecodingBer(7, 1, 0)).toEqual({ value: 0, log10: -Infinity });
    // p = 1: every bit flips, so the estimate is (1/n)·n = 1 whenever t < n.
    expect(bscPostDecodingBer(7, 1, 1).value).toBe(1);
  });

  it("refuses n < 1 and bad t", () => {
    expect(() => bscPostDecodingBer(0, 0, 0.1)).toThrow(InputError);
    expect(() => bscPostDecodingBer(7, -1, 0.1)).toThrow(InputError);
    expect(() => bscPostDecodingBer(7, 1, 2)).toThrow(InputError);
  });
});

describe("BSC capacity re-export", () => {
  it("is the capacity module's function", () => {
    expect(bscCapacity).toBe(capacity.bscCapacity);
  });
});
