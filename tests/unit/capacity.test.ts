import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  awgnCapacityComplex,
  awgnCapacityReal,
  becCapacity,
  binaryEntropy,
  bpskAwgnCapacity,
  bpskShannonLimitEbN0,
  bscCapacity,
  dbToLinear,
  gapToLimitDb,
  linearToDb,
  shannonHartley,
  shannonLimitEbN0,
} from "@/lib/core/capacity";
import { InputError } from "@/lib/core/errors";
import ref from "../fixtures/scipy-reference.json";

const SCIPY = `scipy ${ref.versions.scipy} fixture`;
const db = (x: number) => 10 * Math.log10(x);

describe("binary entropy and BSC / BEC capacity", () => {
  it("C_BSC(0.11) ≈ 0.500 and C_BSC(0.5) = 0 (REFERENCES.md, Shannon 1948)", () => {
    expect(bscCapacity(0.11)).toBeCloseTo(0.5, 3);
    expect(bscCapacity(0.5)).toBe(0);
    expect(bscCapacity(0)).toBe(1);
    expect(bscCapacity(1)).toBe(1);
    expect(binaryEntropy(0)).toBe(0);
    expect(binaryEntropy(1)).toBe(0);
    // H2(½) = 1 bit by definition.
    expect(binaryEntropy(0.5)).toBe(1);
  });

  it(`matches 1 − H2(p) from Python decimal in the ${SCIPY} generator within relative 1e-15`, () => {
    for (const { p, capacityDecimal } of ref.bscCapacity) {
      const c = bscCapacity(p);
      if (capacityDecimal === 0) expect(c).toBe(0);
      else expect(Math.abs(c - capacityDecimal!) / capacityDecimal!).toBeLessThan(1e-15);
    }
  });

  it(`matches 1 − scipy.stats.entropy([p, 1 − p], base=2) (${SCIPY}) where that does not cancel`, () => {
    for (const { p, capacityScipy } of ref.bscCapacity) {
      if (p > 0.3 && p < 0.7) continue; // scipy's 1 − H2 loses digits near ½ (see the decimal check)
      expect(Math.abs(bscCapacity(p) - capacityScipy)).toBeLessThan(1e-15);
    }
  });

  it("H2 is symmetric and C_BSC decreases as p rises on [0, ½] (property)", () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 0.5, noNaN: true }), fc.double({ min: 0, max: 0.5, noNaN: true }), (a, b) => {
        const [lo, hi] = a <= b ? [a, b] : [b, a];
        expect(bscCapacity(lo)).toBeGreaterThanOrEqual(bscCapacity(hi));
        // Below about 1e-16, 1 − p rounds to 1, so H2(1 − p) reads 0 while H2(p) is up to ~6e-15.
        expect(Math.abs(binaryEntropy(lo) - binaryEntropy(1 - lo))).toBeLessThan(1e-14);
        expect(bscCapacity(lo) >= 0 && bscCapacity(lo) <= 1).toBe(true);
      }),
    );
  });

  it("BEC capacity is 1 − ε (Elias 1955, REFERENCES.md)", () => {
    expect(becCapacity(0)).toBe(1);
    expect(becCapacity(0.25)).toBe(0.75);
    expect(becCapacity(1)).toBe(0);
  });

  it("rejects probabilities outside [0, 1]", () => {
    expect(() => bscCapacity(1.01)).toThrow(InputError);
    expect(() => bscCapacity(Number.NaN)).toThrow(InputError);
    expect(() => becCapacity(-0.1)).toThrow(InputError);
    expect(() => binaryEntropy(2)).toThrow(InputError);
  });
});

describe("AWGN capacity and the real-AWGN Shannon limit (Shannon 1948)", () => {
  it("C = ½·log2(1 + SNR), log2(1 + SNR), B·log2(1 + S/N)", () => {
    // SNR = 3 → log2 4 = 2 exactly; SNR = 15 → 4.
    expect(awgnCapacityReal(3)).toBe(1);
    expect(awgnCapacityComplex(3)).toBe(2);
    expect(awgnCapacityComplex(15)).toBe(4);
    expect(shannonHartley(1e6, 15)).toBe(4e6);
    expect(awgnCapacityReal(0)).toBe(0);
    expect(() => awgnCapacityReal(-1)).toThrow(InputError);
    expect(() => shannonHartley(-1, 1)).toThrow(InputError);
  });

  it("dB conversions", () => {
    expect(dbToLinear(10)).toBe(10);
    expect(dbToLinear(0)).toBe(1);
    expect(linearToDb(100)).toBe(20);
    expect(linearToDb(0)).toBe(-Infinity);
    expect(() => linearToDb(-1)).toThrow(InputError);
    expect(() => dbToLinear(Number.POSITIVE_INFINITY)).toThrow(InputError);
  });

  it("rate ½ limit is 0 dB and rate → 0 gives ln 2 = −1.59 dB (REFERENCES.md)", () => {
    expect(shannonLimitEbN0(0.5)).toBe(1);
    expect(shannonLimitEbN0(0)).toBe(Math.LN2);
    expect(db(shannonLimitEbN0(0))).toBeCloseTo(-1.59, 2);
    expect(Math.abs(shannonLimitEbN0(1e-12) - Math.LN2)).toBeLessThan(1e-11);
    // (2^{2R} − 1)/(2R) at R = 1: 3/2.
    expect(shannonLimitEbN0(1)).toBe(1.5);
    // Subnormal R, where 2R keeps too few digits for the quotient: the limit is still ln 2.
    expect(shannonLimitEbN0(5e-324)).toBe(Math.LN2);
    // Per complex symbol Rc (2 real dimensions) the limit is (2^Rc − 1)/Rc, evaluated directly.
    for (const rc of [0.5, 1, 2, 3, 6]) expect(Math.abs(shannonLimitEbN0(rc / 2) / ((2 ** rc - 1) / rc) - 1)).toBeLessThan(1e-14);
  });

  it("gap to limit in dB", () => {
    // 3 dB above a 0 dB limit; 2 dB above a limit of 10^{0.1} (1 dB).
    expect(gapToLimitDb(3, 1)).toBe(3);
    expect(gapToLimitDb(3, dbToLinear(1))).toBeCloseTo(2, 14);
    expect(() => gapToLimitDb(3, 0)).toThrow(InputError);
  });
});

describe("BPSK-input AWGN capacity", () => {
  it(`matches scipy.integrate.quad of the mutual information (${SCIPY}) within 1e-13 bits, −30 to +30 dB`, () => {
    // Measured max difference 6.7e-16; the requirement is 1e-9.
    for (const { esN0Db, capacity } of ref.bpskCapacity) {
      const r = bpskAwgnCapacity(dbToLinear(esN0Db));
      expect(Math.abs(r.capacity - capacity)).toBeLessThan(1e-13);
      expect(r.absError).toBeLessThan(1e-12);
    }
  });

  it("stays below both the real-AWGN capacity ½·log2(1 + 2Es/N0) and 1 bit, and approaches them at the ends", () => {
    for (const d of [-40, -20, 0, 5, 10, 20]) {
      const s = dbToLinear(d);
      const c = bpskAwgnCapacity(s).capacity;
      expect(c).toBeLessThanOrEqual(awgnCapacityReal(2 * s));
      expect(c).toBeLessThanOrEqual(1);
    }
    // Low SNR: C ≈ (Es/N0)/ln 2, first-order term shared with the Gaussian input.
    const s = 1e-8;
    expect(Math.abs(bpskAwgnCapacity(s).capacity / (s / Math.LN2) - 1)).toBeLessThan(1e-7);
    expect(bpskAwgnCapacity(0)).toEqual({ capacity: 0, absError: 0 });
    expect(bpskAwgnCapacity(1e9).capacity).toBe(1);
    expect(() => bpskAwgnCapacity(-1)).toThrow(InputError);
  });

  it("rate ½ BPSK-input limit is about 0.187 dB (REFERENCES.md lists 0.19 from memory; the scipy fixture has 0.18706)", () => {
    expect(db(bpskShannonLimitEbN0(0.5))).toBeCloseTo(0.19, 2);
    expect(Math.abs(db(bpskShannonLimitEbN0(0.5)) - 0.18706)).toBeLessThan(5e-6);
  });

  it(`BPSK limits for rates 0.01 … 0.99 match scipy.optimize.brentq (${SCIPY}, xtol 1e-13 dB) within relative 1e-12`, () => {
    // Relative 1e-12 in Eb/N0 is 4.3e-12 dB; measured max difference 1.9e-13 dB.
    for (const { rate, ebN0Db } of ref.bpskShannonLimit) {
      expect(Math.abs(bpskShannonLimitEbN0(rate) / Math.pow(10, ebN0Db / 10) - 1)).toBeLessThan(1e-12);
    }
  });

  it("at the returned limit, the mutual information integrated independently here equals the rate to within relative 1e-12 of the root", () => {
    // I(X;Y) = ∫ p(y|+1)·log2(2p(y|+1)/(p(y|+1) + p(y|−1))) dy = 1 − E[log2(1 + e^{−2Y/σ²})], Y ~ N(1, σ²),
    // by the plain trapezoid rule over ±40σ at step σ/64 (geometric convergence for this smooth, fast-decaying integrand).
    const mutualInformation = (esN0: number) => {
      const sigma = Math.sqrt(1 / (2 * esN0));
      const h = sigma / 64;
      let sum = 0;
      for (let z = -40 * 64; z <= 40 * 64; z++) {
        const y = 1 + z * h;
        const llr = (2 * y) / sigma ** 2;
        const softplus = Math.max(-llr, 0) + Math.log1p(Math.exp(-Math.abs(llr)));
        sum += Math.exp(-((z / 64) ** 2) / 2) * softplus;
      }
      return 1 - (sum / 64 / Math.sqrt(2 * Math.PI)) / Math.LN2;
    };
    for (const rate of [0.25, 0.5, 0.75]) {
      const esN0 = rate * bpskShannonLimitEbN0(rate);
      // The root's relative error is the residual over Es/N0·dC/d(Es/N0), the slope taken by a central difference.
      const slope = (mutualInformation(esN0 * (1 + 1e-5)) - mutualInformation(esN0 * (1 - 1e-5))) / 2e-5;
      expect(Math.abs(mutualInformation(esN0) - rate) / slope).toBeLessThan(1e-12);
    }
  });

  it("BPSK limit tends to ln 2 as the rate → 0 and lies above the real-AWGN limit", () => {
    expect(db(bpskShannonLimitEbN0(1e-6))).toBeCloseTo(-1.59, 2);
    for (const r of [0.1, 0.5, 0.9]) expect(bpskShannonLimitEbN0(r)).toBeGreaterThan(shannonLimitEbN0(r));
    expect(() => bpskShannonLimitEbN0(1)).toThrow(InputError);
    expect(() => bpskShannonLimitEbN0(0)).toThrow(InputError);
  });
});
