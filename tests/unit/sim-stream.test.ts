import { describe, expect, it } from "vitest";
import { BernoulliBits, binaryDigits, chunkStream, geometricGap, Normals, uniformOpenZero } from "@/lib/core/sim/stream";
import { clopperPearson } from "../helpers/sim-interval";

const popcount = (x: number) => {
  let c = 0;
  for (; x; x &= x - 1) c++;
  return c;
};

describe("chunk streams", () => {
  it("are fixed by (seed, point, chunk) and differ when any of them does", () => {
    const first = (s: number, p: number, c: number) => Array.from({ length: 4 }, ((g) => () => g.next())(chunkStream(s, p, c)));
    expect(first(1, 2, 3)).toEqual(first(1, 2, 3));
    const seen = new Set([first(1, 2, 3), first(2, 2, 3), first(1, 3, 3), first(1, 2, 4), first(0, 0, 0), first(0xffffffff, 0, 0)].map((a) => a.join(",")));
    expect(seen.size).toBe(6);
  });
});

describe("BernoulliBits", () => {
  it("binaryDigits is p's exact binary expansion (summing the digits gives p back)", () => {
    for (const p of [0.5, 0.1, 1e-3, 1e-10, 0.3, 2 ** -1074 * 3]) {
      const d = binaryDigits(p);
      expect(d.at(-1)).toBe(1);
      let x = 0;
      for (let i = d.length - 1; i >= 0; i--) x = (x + d[i]!) / 2;
      expect(x).toBe(p);
    }
  });

  for (const p of [0.3, 0.01, 1e-4]) {
    it(`p = ${p}: the count of ones in 2^22 bits lies in its 99.9 % Clopper–Pearson interval`, () => {
      const bits = new BernoulliBits(chunkStream(5, 0, 0), p);
      const words = 1 << 17;
      let ones = 0;
      for (let i = 0; i < words; i++) ones += popcount(bits.nextWord());
      const [lo, hi] = clopperPearson(ones, words * 32, 0.999);
      expect(p).toBeGreaterThanOrEqual(lo);
      expect(p).toBeLessThanOrEqual(hi);
    });
  }

  it("every lane (bit position) has the right rate, p = 0.25 (99.9 % Clopper–Pearson per lane, Bonferroni over 32 lanes)", () => {
    const bits = new BernoulliBits(chunkStream(6, 0, 0), 0.25);
    const lanes = new Array<number>(32).fill(0);
    const words = 40_000;
    for (let i = 0; i < words; i++) {
      const w = bits.nextWord();
      for (let j = 0; j < 32; j++) lanes[j]! += (w >>> j) & 1;
    }
    for (const ones of lanes) {
      const [lo, hi] = clopperPearson(ones, words, 1 - 0.001 / 32);
      expect(0.25).toBeGreaterThanOrEqual(lo);
      expect(0.25).toBeLessThanOrEqual(hi);
    }
  });

  it("take() hands the word out in order across word boundaries", () => {
    const a = new BernoulliBits(chunkStream(7, 0, 0), 0.5);
    const b = new BernoulliBits(chunkStream(7, 0, 0), 0.5);
    const w1 = b.nextWord();
    const w2 = b.nextWord();
    expect(a.take(7)).toBe(w1 & 0x7f);
    expect(a.take(16)).toBe((w1 >>> 7) & 0xffff);
    expect(a.take(13)).toBe(((w1 >>> 23) | (w2 << 9)) & 0x1fff);
    expect(a.take(4)).toBe((w2 >>> 4) & 0xf);
  });
});

describe("uniforms, gaps and normals", () => {
  it("uniformOpenZero lies in (0, 1]", () => {
    const g = chunkStream(1, 1, 1);
    for (let i = 0; i < 100_000; i++) {
      const u = uniformOpenZero(g);
      expect(u > 0 && u <= 1).toBe(true);
    }
  });

  it("geometric gaps at p = 0.01 have mean (1 − p)/p and P(gap = 0) = p (normal approximation, 4.4 standard errors)", () => {
    const p = 0.01;
    const g = chunkStream(2, 0, 0);
    const count = 200_000;
    let sum = 0;
    let zeros = 0;
    for (let i = 0; i < count; i++) {
      const x = geometricGap(g, Math.log1p(-p));
      sum += x;
      if (x === 0) zeros++;
    }
    const mean = (1 - p) / p;
    const sd = Math.sqrt(1 - p) / p; // standard deviation of the geometric distribution on {0, 1, …}
    expect(Math.abs(sum / count - mean)).toBeLessThan((4.4 * sd) / Math.sqrt(count));
    const [lo, hi] = clopperPearson(zeros, count, 0.999);
    expect(p).toBeGreaterThanOrEqual(lo);
    expect(p).toBeLessThanOrEqual(hi);
  });

  it("normals have mean 0, variance 1 and P(z < −2) = Φ(−2) ≈ 0.0227501 (Abramowitz & Stegun 1964, table 26.1)", () => {
    const z = new Normals(chunkStream(3, 0, 0));
    const count = 400_000;
    let s = 0;
    let s2 = 0;
    let below = 0;
    for (let i = 0; i < count; i++) {
      const x = z.next();
      s += x;
      s2 += x * x;
      if (x < -2) below++;
    }
    expect(Math.abs(s / count)).toBeLessThan(4.4 / Math.sqrt(count));
    // Var of x² is 2 for a standard normal.
    expect(Math.abs(s2 / count - 1)).toBeLessThan((4.4 * Math.SQRT2) / Math.sqrt(count));
    const [lo, hi] = clopperPearson(below, count, 0.999);
    expect(0.0227501319).toBeGreaterThanOrEqual(lo);
    expect(0.0227501319).toBeLessThanOrEqual(hi);
  });
});
