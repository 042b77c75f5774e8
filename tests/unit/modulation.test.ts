import erfc from "@stdlib/math-base-special-erfc";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { InputError } from "@/lib/core/errors";
import { maximumUncodedBer, type Modulation, pskBerExact, pskSymbolErrorRate, qamBerExact, qfunc, qinv, requiredEbN0, uncodedErrorRates } from "@/lib/core/modulation";
import { bisect } from "@/lib/core/numeric";
import ref from "../fixtures/scipy-reference.json";

const SCIPY = `scipy ${ref.versions.scipy} fixture`;
const db = (x: number) => 10 * Math.log10(x);
const lin = (d: number) => Math.pow(10, d / 10);
const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);
const NN = { berFormula: "nearest-neighbour" } as const;

function modOf(scheme: string, order?: number): Modulation {
  if (scheme === "bpsk" || scheme === "qpsk") return { scheme };
  if (scheme === "psk" || scheme === "qam") return { scheme, order: order! };
  throw new Error(scheme);
}

describe("Q function", () => {
  it("Q(0) = ½ and Q(1.96) ≈ 0.025 (standard normal table, common practice)", () => {
    expect(qfunc(0)).toBe(0.5);
    expect(qfunc(1.96)).toBeCloseTo(0.025, 4);
    expect(qinv(0.025)).toBeCloseTo(1.96, 2);
    expect(qinv(0.5)).toBe(0);
    expect(() => qinv(1.5)).toThrow(InputError);
  });

  it("qinv inverts qfunc (property; x ≥ −1, where Q is not within rounding of 1)", () => {
    fc.assert(
      fc.property(fc.double({ min: -1, max: 30, noNaN: true }), (x) => {
        expect(Math.abs(qinv(qfunc(x)) - x)).toBeLessThan(1e-9 * Math.max(1, Math.abs(x)));
      }),
    );
  });
});

describe("BPSK / QPSK", () => {
  it("required Eb/N0: 1e-3 at 6.79 dB, 1e-5 at 9.59 dB, 1e-6 at 10.53 dB (REFERENCES.md, Proakis; table rounded to 0.01 dB)", () => {
    for (const scheme of ["bpsk", "qpsk"] as const) {
      expect(Math.abs(db(requiredEbN0({ scheme }, 1e-3)) - 6.79)).toBeLessThan(0.01);
      expect(Math.abs(db(requiredEbN0({ scheme }, 1e-5)) - 9.59)).toBeLessThan(0.01);
      expect(Math.abs(db(requiredEbN0({ scheme }, 1e-6)) - 10.53)).toBeLessThan(0.01);
    }
  });

  it("BER = ½·erfc(√(Eb/N0)) (REFERENCES.md formula, evaluated with @stdlib erfc)", () => {
    for (const d of [-10, 0, 4, 9.6, 15]) {
      const g = lin(d);
      const r = uncodedErrorRates({ scheme: "bpsk" }, g);
      // 1e-13: the arguments √(2g)/√2 and √g differ by rounding, which erfc amplifies by 2x².
      expect(rel(r.ber, 0.5 * erfc(Math.sqrt(g)))).toBeLessThan(1e-13);
      expect(r.berExact && r.serExact).toBe(true);
      const q = uncodedErrorRates({ scheme: "qpsk" }, g);
      expect(q.ber).toBe(r.ber);
      // QPSK SER = 1 − (1 − p)², two independent BPSK rails (Proakis & Salehi); that form cancels below p ≈ 1e-3.
      if (r.ber > 1e-3) expect(rel(q.ser, 1 - (1 - r.ber) ** 2)).toBeLessThan(1e-12);
    }
  });

  it(`exact inverse matches scipy.special.erfcinv (${SCIPY}) within 1e-9 dB`, () => {
    for (const r of ref.requiredEbN0.filter((x) => x.scheme === "bpsk")) {
      expect(Math.abs(db(requiredEbN0({ scheme: "bpsk" }, r.targetBer)) - r.ebN0Db)).toBeLessThan(1e-9);
    }
  });

  it("exact inverse agrees with bisection on the BER curve within 1e-9 dB", () => {
    for (const scheme of ["bpsk", "qpsk"] as const)
      for (const target of [0.3, 1e-2, 1e-5, 1e-9, 1e-15, 1e-100]) {
        const f = (d: number) => Math.log(uncodedErrorRates({ scheme }, lin(d)).ber / target);
        const byBisection = bisect(f, -40, 80, 1e-12, 200);
        expect(Math.abs(db(requiredEbN0({ scheme }, target)) - byBisection)).toBeLessThan(1e-9);
      }
  });
});

/** Simpson's rule with 20,000 panels. */
function simpson(f: (x: number) => number, a: number, b: number): number {
  const n = 20_000;
  const h = (b - a) / n;
  let s = f(a) + f(b);
  for (let i = 1; i < n; i++) s += (i % 2 ? 4 : 2) * f(a + i * h);
  return (s * h) / 3;
}

/**
 * Density of the received phase φ of a PSK symbol sent at phase 0 on AWGN at Es/N0 = γ, from the 2-D Gaussian in polar
 * coordinates integrated over the radius (Proakis & Salehi 2008, ch. 4):
 * (1/2π)·[e^{−γ} + √(4πγ)·cos φ·e^{−γ·sin²φ}·Φ(√(2γ)·cos φ)], Φ(x) = ½·erfc(−x/√2) with @stdlib erfc.
 */
const phaseDensity = (g: number, f: number) =>
  (Math.exp(-g) + Math.sqrt(4 * Math.PI * g) * Math.cos(f) * Math.exp(-g * Math.sin(f) ** 2) * 0.5 * erfc(-Math.sqrt(g) * Math.cos(f))) / (2 * Math.PI);

/**
 * Exact Gray BER of M-PSK by enumeration, independent of the sector-sum code: point i at phase 2πi/M carries the
 * binary reflected Gray label i ^ (i >> 1); each sector's probability is the phase density integrated over it
 * (Simpson), times the Hamming distance of the labels, averaged over the M points and divided by log2 M.
 */
function pskBerByEnumeration(M: number, ebN0: number): number {
  const k = Math.log2(M);
  const sector = Array.from({ length: M }, (_, d) => simpson((f) => phaseDensity(k * ebN0, f), ((2 * d - 1) * Math.PI) / M, ((2 * d + 1) * Math.PI) / M));
  const gray = (i: number) => i ^ (i >> 1);
  let sum = 0;
  for (let i = 0; i < M; i++)
    for (let d = 1; d < M; d++) for (let x = gray(i) ^ gray((i + d) % M); x; x &= x - 1) sum += sector[d]!;
  return sum / (M * k);
}

describe("M-PSK", () => {
  it(`SER by Craig's integral matches scipy.integrate.quad (${SCIPY}) within relative 1e-12`, () => {
    // Measured max 2.6e-14.
    for (const p of ref.pskSer) {
      const r = uncodedErrorRates({ scheme: "psk", order: p.order }, lin(p.ebN0Db));
      expect(rel(r.ser, p.ser)).toBeLessThan(1e-12);
      expect(rel(pskSymbolErrorRate(p.order, lin(p.ebN0Db)).value, p.ser)).toBeLessThan(1e-12);
    }
  });

  it("Craig's integral for M = 2 and 4 equals the closed forms Q(√(2γ)) and 2Q − Q² (Proakis & Salehi)", () => {
    for (const g of [0, 0.01, 0.5, 1, 3, 10, 100, 300]) {
      const q = 0.5 * erfc(Math.sqrt(g));
      const two = pskSymbolErrorRate(2, g);
      const four = pskSymbolErrorRate(4, g);
      expect(rel(two.value, q)).toBeLessThan(1e-12);
      expect(rel(four.value, q * (2 - q))).toBeLessThan(1e-12);
      expect(two.absError).toBeLessThanOrEqual(1e-12 * two.value);
    }
  });

  it("SER at Eb/N0 = 0 is (M − 1)/M, a uniform guess", () => {
    for (const M of [8, 16, 1024]) expect(rel(pskSymbolErrorRate(M, 0).value, (M - 1) / M)).toBeLessThan(1e-14);
  });

  it("BER by name nearest-neighbour is marked as the SER/k Gray approximation; orders 2 and 4 route to the exact forms", () => {
    const r = uncodedErrorRates({ scheme: "psk", order: 8 }, 10, NN);
    expect(r.berExact).toBe(false);
    expect(r.serExact).toBe(true);
    expect(r.berMethod).toMatch(/^approximation/);
    expect(rel(r.ber, r.ser / 3)).toBeLessThan(1e-15);
    expect(uncodedErrorRates({ scheme: "psk", order: 2 }, 3)).toEqual(uncodedErrorRates({ scheme: "bpsk" }, 3));
    expect(uncodedErrorRates({ scheme: "psk", order: 4 }, 3)).toEqual(uncodedErrorRates({ scheme: "qpsk" }, 3));
  });

  it("exact Gray BER (sector sum) equals an enumeration over labels and sectors of the phase density, 8- and 16-PSK, −10 to 20 dB", () => {
    // Measured max 2.6e-11 (8-PSK at 20 dB, where Simpson's rule meets the narrow density).
    for (const M of [8, 16])
      for (const d of [-10, 0, 5, 10, 15, 20]) {
        expect(rel(pskBerExact(M, lin(d)), pskBerByEnumeration(M, lin(d)))).toBeLessThan(1e-9);
        const r = uncodedErrorRates({ scheme: "psk", order: M }, lin(d));
        expect(r.ber).toBe(pskBerExact(M, lin(d)));
        expect(r.berExact).toBe(true);
        expect(r.berMethod).toMatch(/^exact: .*Lee 1986/);
      }
  });

  it("the phase density used by the enumeration integrates to 1 (a check of the reference itself)", () => {
    for (const g of [0.1, 1, 10, 100]) expect(Math.abs(simpson((f) => phaseDensity(g, f), -Math.PI, Math.PI) - 1)).toBeLessThan(1e-12);
  });

  it("the sector sum for 2- and 4-PSK is BPSK's ½·erfc(√(Eb/N0)) (Proakis & Salehi; @stdlib erfc)", () => {
    for (const g of [0.01, 1, 10, 100]) {
      expect(rel(pskBerExact(2, g), 0.5 * erfc(Math.sqrt(g)))).toBeLessThan(1e-12);
      expect(rel(pskBerExact(4, g), 0.5 * erfc(Math.sqrt(g)))).toBeLessThan(1e-12);
    }
  });

  it("exact BER is ½ at Eb/N0 = 0 (a uniformly random label); SER/k is below it at low SNR and meets it at high SNR", () => {
    for (const M of [8, 16]) {
      expect(rel(pskBerExact(M, 0), 0.5)).toBeLessThan(1e-13);
      expect(maximumUncodedBer({ scheme: "psk", order: M })).toBe(0.5);
      // 8-PSK at 0 dB: the sectors two and more away carry 6 % of the bit errors.
      expect(uncodedErrorRates({ scheme: "psk", order: M }, 1, NN).ber).toBeLessThan(0.95 * pskBerExact(M, 1));
      expect(rel(uncodedErrorRates({ scheme: "psk", order: M }, lin(18), NN).ber, pskBerExact(M, lin(18)))).toBeLessThan(1e-6);
    }
  });

  it("the inverse round-trips on the exact formula (relative 1e-8); above 16-PSK the approximation is served and exact is refused at berFormula", () => {
    for (const M of [8, 16])
      for (const target of [0.4, 1e-3, 1e-9]) expect(rel(pskBerExact(M, requiredEbN0({ scheme: "psk", order: M }, target)), target)).toBeLessThan(1e-8);
    const r = uncodedErrorRates({ scheme: "psk", order: 32 }, 10);
    expect(r.berExact).toBe(false);
    expect(r.ber).toBe(r.ser / 5);
    const thrown = (f: () => unknown) => {
      try {
        f();
      } catch (e) {
        return e as InputError;
      }
      throw new Error("no error thrown");
    };
    expect(thrown(() => uncodedErrorRates({ scheme: "psk", order: 32 }, 10, { berFormula: "exact" })).path).toEqual(["berFormula"]);
    expect(thrown(() => pskBerExact(32, 10)).path).toEqual(["order"]);
  });
});

/**
 * Exact BER of Gray-labelled square M-QAM by enumeration, independent of Cho & Yoon's closed form: for every sent
 * point and every decision region (a rectangle, so a product of two 1-D Gaussian interval masses), the probability
 * times the Hamming distance of the two labels, averaged over the M points and divided by log2 M. Each rail is
 * √M-PAM with the binary reflected Gray code i ^ (i >> 1); levels ±1, ±3, … in units of d, Es = 2(M − 1)d²/3,
 * Eb = Es/log2 M, N0 = 2σ².
 */
function qamBerByEnumeration(M: number, ebN0: number): number {
  const side = Math.round(Math.sqrt(M));
  const bits = Math.log2(side);
  const k = Math.log2(M);
  const sigma = Math.sqrt((2 * (M - 1)) / 3 / k / ebN0 / 2);
  const Q = (x: number) => 0.5 * erfc(x / Math.SQRT2);
  // mass[i][j]: a level-i signal is decided as level j, the interval [(2j − side)d, (2j − side + 2)d] open at the ends.
  const mass = Array.from({ length: side }, (_, i) =>
    Array.from({ length: side }, (_, j) => {
      const p = 2 * i - side + 1;
      const a = j === 0 ? -Infinity : (2 * j - side - p) / sigma;
      const b = j === side - 1 ? Infinity : (2 * j - side + 2 - p) / sigma;
      if (a >= 0) return Q(a) - Q(b);
      if (b <= 0) return Q(-b) - Q(-a);
      return 1 - Q(-a) - Q(b);
    }),
  );
  const gray = (i: number) => i ^ (i >> 1);
  const popcount = (x: number) => {
    let c = 0;
    for (; x; x &= x - 1) c++;
    return c;
  };
  let sum = 0;
  for (let xi = 0; xi < side; xi++)
    for (let yi = 0; yi < side; yi++)
      for (let u = 0; u < side; u++)
        for (let v = 0; v < side; v++) {
          const hd = popcount(((gray(xi) << bits) | gray(yi)) ^ ((gray(u) << bits) | gray(v)));
          if (hd) sum += mass[xi]![u]! * mass[yi]![v]! * hd;
        }
  return sum / (M * k);
}

describe("square M-QAM", () => {
  it("exact BER (Cho & Yoon 2002) equals the exact enumeration over Gray labels and rectangular decision regions, 16- to 256-QAM, 0 to 30 dB", () => {
    for (const M of [16, 64, 256])
      for (const d of [-10, 0, 6, 12, 20, 30]) {
        const byEnumeration = qamBerByEnumeration(M, lin(d));
        expect(rel(qamBerExact(M, lin(d)), byEnumeration)).toBeLessThan(1e-12);
        const r = uncodedErrorRates({ scheme: "qam", order: M }, lin(d));
        expect(r.ber).toBe(qamBerExact(M, lin(d)));
        expect(r.berExact).toBe(true);
        expect(r.berMethod).toMatch(/^exact: .*Cho & Yoon 2002/);
      }
  });

  it("4-QAM by Cho & Yoon is BPSK's ½·erfc(√(Eb/N0)) (Proakis & Salehi; @stdlib erfc)", () => {
    for (const g of [0, 0.01, 1, 10, 100, 600]) expect(rel(qamBerExact(4, g), 0.5 * erfc(Math.sqrt(g)))).toBeLessThan(1e-14);
  });

  it("the nearest-neighbour approximation is about 0.4 % below the exact BER for 64-QAM at 6 dB (issue report; common practice): between 0.1 % and 1 %", () => {
    const exact = uncodedErrorRates({ scheme: "qam", order: 64 }, lin(6)).ber;
    const approx = uncodedErrorRates({ scheme: "qam", order: 64 }, lin(6), NN).ber;
    const diff = rel(approx, exact);
    expect(diff).toBeGreaterThan(1e-3);
    expect(diff).toBeLessThan(1e-2);
    expect(rel(exact, qamBerByEnumeration(64, lin(6)))).toBeLessThan(1e-12);
  });

  it("exact BER is ½ at Eb/N0 = 0 (each rail is decided at one of its two outer levels) and the inverse accepts targets up to it", () => {
    for (const M of [16, 64, 4096]) {
      expect(rel(qamBerExact(M, 0), 0.5)).toBeLessThan(1e-15);
      expect(rel(qamBerByEnumeration(M === 4096 ? 64 : M, 1e-30), 0.5)).toBeLessThan(1e-12);
      expect(maximumUncodedBer({ scheme: "qam", order: M })).toBe(0.5);
    }
    expect(maximumUncodedBer({ scheme: "qam", order: 16 }, NN)).toBe(0.375);
    const g = requiredEbN0({ scheme: "qam", order: 16 }, 0.45);
    expect(rel(qamBerExact(16, g), 0.45)).toBeLessThan(1e-9);
  });

  it("the inverse round-trips on the exact formula: BER(required(target)) = target within relative 1e-8 (bisection to 1e-10 dB)", () => {
    for (const M of [16, 64, 256, 1024, 4096])
      for (const target of [0.3, 1e-3, 1e-6, 1e-12, 1e-100]) {
        const g = requiredEbN0({ scheme: "qam", order: M }, target);
        expect(rel(qamBerExact(M, g), target)).toBeLessThan(1e-8);
        const gNN = requiredEbN0({ scheme: "qam", order: M }, Math.min(target, 0.1), NN);
        expect(rel(uncodedErrorRates({ scheme: "qam", order: M }, gNN, NN).ber, Math.min(target, 0.1))).toBeLessThan(1e-8);
      }
  });

  it(`SER and nearest-neighbour BER match the formulas evaluated with scipy.special.erfc (${SCIPY}) within relative 1e-12`, () => {
    // Measured max 3.4e-14.
    for (const q of ref.qam) {
      const r = uncodedErrorRates({ scheme: "qam", order: q.order }, lin(q.ebN0Db), NN);
      if (q.ser > 0) expect(rel(r.ser, q.ser)).toBeLessThan(1e-12);
      if (q.ber > 0) expect(rel(r.ber, q.ber)).toBeLessThan(1e-12);
    }
  });

  it("4-QAM is QPSK (Proakis & Salehi): same exact BER and SER", () => {
    for (const g of [0.1, 1, 10]) {
      const a = uncodedErrorRates({ scheme: "qam", order: 4 }, g);
      const b = uncodedErrorRates({ scheme: "qpsk" }, g);
      expect(rel(a.ber, b.ber)).toBeLessThan(1e-15);
      expect(rel(a.ser, b.ser)).toBeLessThan(1e-15);
      expect(a.berExact).toBe(true);
      expect(uncodedErrorRates({ scheme: "qam", order: 4 }, g, NN)).toEqual(a);
    }
    expect(uncodedErrorRates({ scheme: "qam", order: 16 }, 10, NN).berExact).toBe(false);
    expect(uncodedErrorRates({ scheme: "qam", order: 16 }, 10, NN).berMethod).toMatch(/^approximation/);
  });
});

describe("required Eb/N0 by bisection", () => {
  it(`matches scipy.optimize.brentq on the same BER formulas (${SCIPY}; QAM by the nearest-neighbour formula) within 1e-9 dB`, () => {
    // Measured max 4.5e-11 dB.
    for (const r of ref.requiredEbN0.filter((x) => x.scheme !== "bpsk")) {
      const got = db(requiredEbN0(modOf(r.scheme, r.order), r.targetBer, NN));
      expect(Math.abs(got - r.ebN0Db)).toBeLessThan(1e-9);
    }
  });

  it("targets just below the maximum BER need Eb/N0 below −20 dB and are still found", () => {
    const mod: Modulation = { scheme: "psk", order: 8 };
    const target = 0.29; // maximum of SER/k is 7/24 ≈ 0.2917
    const g = requiredEbN0(mod, target, NN);
    expect(db(g)).toBeLessThan(-20);
    expect(rel(uncodedErrorRates(mod, g, NN).ber, target)).toBeLessThan(1e-9);
  });

  it("BER falls as Eb/N0 rises for every scheme (property)", () => {
    const mods: Modulation[] = [{ scheme: "bpsk" }, { scheme: "psk", order: 16 }, { scheme: "qam", order: 64 }, { scheme: "qam", order: 4096 }];
    fc.assert(
      fc.property(fc.constantFrom(...mods), fc.double({ min: -10, max: 30, noNaN: true }), (mod, d) => {
        expect(uncodedErrorRates(mod, lin(d + 0.5)).ber).toBeLessThanOrEqual(uncodedErrorRates(mod, lin(d)).ber);
      }),
    );
  });

  it("refuses targets at or above the scheme's maximum, and 0", () => {
    expect(() => requiredEbN0({ scheme: "bpsk" }, 0.5)).toThrow(/never exceeds 0.5/);
    expect(() => requiredEbN0({ scheme: "bpsk" }, 0.7)).toThrow(InputError);
    expect(() => requiredEbN0({ scheme: "bpsk" }, 0)).toThrow(InputError);
    expect(() => requiredEbN0({ scheme: "bpsk" }, Number.NaN)).toThrow(InputError);
    // 8-PSK: (M − 1)/(M·k) = 7/24; 16-QAM: (2/k)(1 − 1/√M) = 3/8.
    expect(() => requiredEbN0({ scheme: "psk", order: 8 }, 0.3, NN)).toThrow(/never exceeds 0.29166/);
    expect(() => requiredEbN0({ scheme: "psk", order: 32 }, 0.3)).toThrow(/never exceeds 0.19375/);
    expect(() => requiredEbN0({ scheme: "qam", order: 16 }, 0.375, NN)).toThrow(/never exceeds 0.375/);
    expect(() => requiredEbN0({ scheme: "qam", order: 16 }, 0.5)).toThrow(/never exceeds 0.5/);
  });

  it("very small targets stay inside the search range (1e-300 for 1024-PSK)", () => {
    const g = requiredEbN0({ scheme: "psk", order: 1024 }, 1e-300);
    expect(db(g)).toBeLessThan(80);
    expect(rel(uncodedErrorRates({ scheme: "psk", order: 1024 }, g).ber, 1e-300)).toBeLessThan(1e-8);
  });
});

describe("modulation validation", () => {
  it("rejects unsupported orders and schemes", () => {
    expect(() => uncodedErrorRates({ scheme: "psk", order: 3 }, 1)).toThrow(InputError);
    expect(() => uncodedErrorRates({ scheme: "psk", order: 1 }, 1)).toThrow(InputError);
    expect(() => uncodedErrorRates({ scheme: "psk", order: 2048 }, 1)).toThrow(/from 2 to 1024/);
    expect(() => uncodedErrorRates({ scheme: "qam", order: 32 }, 1)).toThrow(/square/);
    expect(() => uncodedErrorRates({ scheme: "qam", order: 2 }, 1)).toThrow(InputError);
    expect(() => uncodedErrorRates({ scheme: "fsk" } as unknown as Modulation, 1)).toThrow(InputError);
    expect(() => uncodedErrorRates({ scheme: "bpsk" }, -1)).toThrow(InputError);
    expect(() => uncodedErrorRates({ scheme: "bpsk" }, Number.POSITIVE_INFINITY)).toThrow(InputError);
    try {
      uncodedErrorRates({ scheme: "qam", order: 32 }, 1);
    } catch (e) {
      expect((e as InputError).path).toEqual(["order"]);
    }
  });
});
