import erfc from "@stdlib/math-base-special-erfc";
import binomialCdf from "@stdlib/stats-base-dists-binomial-cdf";
import { describe, expect, it } from "vitest";
import { hamming } from "@/lib/core/codes/hamming";
import { parity } from "@/lib/core/codes/parity";
import { rs } from "@/lib/core/codes/rs";
import { InputError } from "@/lib/core/errors";
import { golay } from "@/lib/core/codes/golay";
import { createSimulator, type SimChannel, type SimSpec } from "@/lib/core/sim/engine";
import { runPoint } from "@/lib/core/sim/run";
import { clopperPearson } from "../helpers/sim-interval";

const popcount = (x: number) => {
  let c = 0;
  for (; x; x &= x - 1) c++;
  return c;
};
const pack = (w: ArrayLike<number>) => Array.from(w).reduce((v, b, j) => v | (b << j), 0);
const unpack = (v: number, len: number) => Uint8Array.from({ length: len }, (_, j) => (v >>> j) & 1);

/**
 * Hamming (7,4) on a BSC, exactly: every message and all 128 error patterns, each received word decoded to
 * its nearest codeword by brute force (the code is perfect, so the nearest codeword is unique), weighted
 * by p^w (1 − p)^(7 − w). Gives the frame error rate and the mean and second moment of the number of
 * wrong information bits per frame.
 */
function hamming74Exact(p: number) {
  const code = hamming(3);
  const cws = Array.from({ length: 16 }, (_, m) => pack(code.encode(unpack(m, 4))));
  let fer = 0;
  let ex = 0;
  let ex2 = 0;
  for (let m = 0; m < 16; m++) {
    for (let e = 0; e < 128; e++) {
      const r = cws[m]! ^ e;
      const nearest = cws.reduce((best, c, i) => (popcount(c ^ r) < popcount(cws[best]! ^ r) ? i : best), 0);
      const w = popcount(e);
      const pr = (p ** w * (1 - p) ** (7 - w)) / 16;
      const x = popcount(nearest ^ m);
      if (x > 0) fer += pr;
      ex += pr * x;
      ex2 += pr * x * x;
    }
  }
  return { fer, ber: ex / 4, varPerFrame: ex2 - ex * ex };
}

const Z99 = 2.5758293035489; // standard normal 0.995 quantile (Abramowitz & Stegun 1964, table 26.5)

function run(spec: Omit<SimSpec, "points"> & { point: number }, maxFrames: number) {
  const { point, ...rest } = spec;
  const sim = createSimulator({ ...rest, points: [point] });
  return { sim, ...runPoint(sim, 0, { maxFrames }) };
}

describe("Hamming (7,4) on a BSC against the enumeration of all 128 error patterns", () => {
  for (const gapSkipping of [true, false]) {
    for (const p of [0.1, 0.03, 0.01, 0.002]) {
      it(`p = ${p}, gap skipping ${gapSkipping ? "on" : "off"}: FER in its 99 % Clopper–Pearson interval, BER in its 99 % normal interval`, () => {
        const F = 200_000;
        const exact = hamming74Exact(p);
        const { counts } = run({ code: hamming(3), channel: { kind: "bsc" }, point: p, seed: 1000 + p * 1e4, gapSkipping }, F);
        expect(counts.frames).toBe(F);
        expect(counts.infoBits).toBe(4 * F);
        // Frames are independent: FER is binomial over frames (Clopper & Pearson 1934).
        const [lo, hi] = clopperPearson(counts.frameErrors, F, 0.99);
        expect(exact.fer).toBeGreaterThanOrEqual(lo);
        expect(exact.fer).toBeLessThanOrEqual(hi);
        // BER is the mean of per-frame error fractions: central limit interval with the exact per-frame variance.
        const half = (Z99 * Math.sqrt(exact.varPerFrame / F)) / 4;
        expect(Math.abs(counts.bitErrors / counts.infoBits - exact.ber)).toBeLessThanOrEqual(half);
        // The Hamming decoder never declares failure: every wrong frame is undetected.
        expect(counts.failures).toBe(0);
        expect(counts.undetected).toBe(counts.frameErrors);
      });
    }
  }
});

/** Q(x) = erfc(x/√2)/2 (@stdlib erfc). */
const Q = (x: number) => erfc(x / Math.SQRT2) / 2;

describe("uncoded BPSK and Gray QPSK on AWGN against Q(√(2Eb/N0)) (Proakis & Salehi 2008, §4.3)", () => {
  for (const modulation of ["bpsk", "qpsk"] as const) {
    for (const db of [0, 4, 7]) {
      for (const decisions of ["hard", "soft"] as const) {
        it(`${modulation}, ${decisions} decisions, Eb/N0 = ${db} dB: BER in its 99 % Clopper–Pearson interval (uncoded bits are independent)`, () => {
          const bits = 1_000_000;
          const { counts } = run({ code: null, channel: { kind: "awgn", modulation, decisions }, point: db, seed: 77 + db }, bits);
          const exact = Q(Math.sqrt(2 * 10 ** (db / 10)));
          const [lo, hi] = clopperPearson(counts.bitErrors, counts.infoBits, 0.99);
          expect(exact).toBeGreaterThanOrEqual(lo);
          expect(exact).toBeLessThanOrEqual(hi);
          expect(counts.frameErrors).toBe(counts.bitErrors);
        });
      }
    }
  }
});

describe("soft-decision ML decoding of Hamming (7,4) on BPSK-AWGN", () => {
  it("beats hard decisions given 1 dB more (common practice puts the gain near 2 dB; a loose check)", () => {
    const at = (db: number, decisions: "hard" | "soft") => {
      const { counts } = run({ code: hamming(3), channel: { kind: "awgn", modulation: "bpsk", decisions }, point: db, seed: 5 }, 500_000);
      return counts.bitErrors / counts.infoBits;
    };
    const soft5 = at(5, "soft");
    expect(soft5).toBeLessThan(at(5, "hard"));
    expect(soft5).toBeLessThan(at(6, "hard"));
  });

  it("on a noiseless-looking channel (Eb/N0 = 30 dB) decodes every frame", () => {
    const { counts, sim } = run({ code: golay(), channel: { kind: "awgn", modulation: "qpsk", decisions: "soft" }, point: 30, seed: 2 }, 300);
    expect(sim.kernel).toBe("ml");
    expect(counts.frameErrors).toBe(0);
  });

  it("is refused for codes with k > 12 or non-binary codes", () => {
    const soft: SimChannel = { kind: "awgn", modulation: "bpsk", decisions: "soft" };
    expect(() => createSimulator({ code: hamming(5), channel: soft, points: [3], seed: 1 })).toThrow(InputError);
    expect(() => createSimulator({ code: rs({ m: 4, k: 11 }), channel: soft, points: [3], seed: 1 })).toThrow(/binary codes with k ≤ 12/);
  });
});

describe("BEC", () => {
  const eps = 0.05;
  for (const gapSkipping of [true, false]) {
    it(`single parity check (8,7) with erasure decoding, gap skipping ${gapSkipping ? "on" : "off"}: fails exactly when 2 or more of 8 bits are erased`, () => {
      const F = 100_000;
      const { counts, sim } = run({ code: parity(8), channel: { kind: "bec" }, point: eps, seed: 11, gapSkipping }, F);
      expect(sim.erasureDecoding).toBe(true);
      // P(≥ 2 erasures of 8) = 1 − binomial cdf(1; 8, ε) (@stdlib binomial-cdf).
      const exact = 1 - binomialCdf(1, 8, eps);
      const [lo, hi] = clopperPearson(counts.failures, F, 0.99);
      expect(exact).toBeGreaterThanOrEqual(lo);
      expect(exact).toBeLessThanOrEqual(hi);
      expect(counts.undetected).toBe(0);
      expect(counts.frameErrors).toBe(counts.failures);
    });
  }

  it("Reed–Solomon (15,11) over GF(16) with erasure decoding: fails exactly when more than n − k = 4 symbols are erased", () => {
    const F = 20_000;
    const { counts } = run({ code: rs({ m: 4, k: 11 }), channel: { kind: "bec" }, point: eps, seed: 12 }, F);
    // A symbol is erased when any of its 4 bits is: q = 1 − (1 − ε)^4; failure = 1 − binomial cdf(4; 15, q) (@stdlib).
    const exact = 1 - binomialCdf(4, 15, 1 - (1 - eps) ** 4);
    const [lo, hi] = clopperPearson(counts.failures, F, 0.99);
    expect(exact).toBeGreaterThanOrEqual(lo);
    expect(exact).toBeLessThanOrEqual(hi);
    expect(counts.undetected).toBe(0);
  });

  it("Hamming (7,4), which takes no erasures: an erased bit becomes a fair coin, so the FER is that of a BSC with p = ε/2 (the enumeration above)", () => {
    const F = 200_000;
    const { counts, sim } = run({ code: hamming(3), channel: { kind: "bec" }, point: 0.1, seed: 13 }, F);
    expect(sim.erasureDecoding).toBe(false);
    const [lo, hi] = clopperPearson(counts.frameErrors, F, 0.99);
    const exact = hamming74Exact(0.05).fer;
    expect(exact).toBeGreaterThanOrEqual(lo);
    expect(exact).toBeLessThanOrEqual(hi);
  });
});

describe("uncoded BSC with gap skipping", () => {
  it("p = 1e-10 over 3·10^9 bits: errors counted in frames of 1 bit, within the 99 % Poisson-sized interval", () => {
    const { counts } = run({ code: null, channel: { kind: "bsc" }, point: 1e-10, seed: 21 }, 3e9);
    expect(counts.infoBits).toBe(3e9);
    // Mean 0.3 flips: the 99 % Clopper–Pearson interval around any count ≤ 4 contains 1e-10.
    const [lo, hi] = clopperPearson(counts.bitErrors, 3e9, 0.99);
    expect(1e-10).toBeGreaterThanOrEqual(lo);
    expect(1e-10).toBeLessThanOrEqual(hi);
  });

  it("frames of 64 bits: a frame error per frame with a flip (P = 1 − (1 − p)^64)", () => {
    const F = 100_000;
    const p = 0.002;
    const { counts } = run({ code: null, uncodedFrameBits: 64, channel: { kind: "bsc" }, point: p, seed: 22 }, F);
    const [lo, hi] = clopperPearson(counts.frameErrors, F, 0.99);
    expect(1 - (1 - p) ** 64).toBeGreaterThanOrEqual(lo);
    expect(1 - (1 - p) ** 64).toBeLessThanOrEqual(hi);
    expect(counts.bitErrors).toBeGreaterThanOrEqual(counts.frameErrors);
  });

  it("p = 0 and p = 1: no errors at all, every bit wrong", () => {
    for (const gapSkipping of [true, false]) {
      expect(run({ code: null, channel: { kind: "bsc" }, point: 0, seed: 1, gapSkipping }, 1000).counts.bitErrors).toBe(0);
      expect(run({ code: null, channel: { kind: "bsc" }, point: 1, seed: 1, gapSkipping }, 1000).counts.bitErrors).toBe(1000);
    }
  });
});

describe("spec checks", () => {
  it("refuses bad seeds, points, frame lengths and codes without information bits", () => {
    const base = { code: null, channel: { kind: "bsc" } as SimChannel, points: [0.1], seed: 1 };
    expect(() => createSimulator({ ...base, seed: -1 })).toThrow(/seed/);
    expect(() => createSimulator({ ...base, seed: 2 ** 32 })).toThrow(/seed/);
    expect(() => createSimulator({ ...base, points: [] })).toThrow(/at least one point/);
    expect(() => createSimulator({ ...base, points: [1.5] })).toThrow(/\[0, 1\]/);
    expect(() => createSimulator({ ...base, points: [NaN] })).toThrow(/finite/);
    expect(() => createSimulator({ ...base, uncodedFrameBits: 0 })).toThrow(/uncodedFrameBits/);
    const sim = createSimulator(base);
    expect(() => sim.runChunk(1, 0)).toThrow(/point/);
    expect(() => sim.runChunk(0, -1)).toThrow(/chunk/);
    expect(() => sim.runChunk(0, 0, sim.framesPerChunk + 1)).toThrow(/frames/);
  });
});
