import { xoroshiro128plusFromState } from "pure-rand/generator/xoroshiro128plus";

/**
 * The random streams of the Monte Carlo engine: xoroshiro128+ (Blackman & Vigna 2018) from pure-rand,
 * one stream per (seed, point, chunk).
 *
 * Stream derivation: the generator's 128-bit state is four 32-bit words, each a murmur3 finaliser chain
 * (Appleby, MurmurHash3 fmix32) over seed, point index, chunk index and the word's own constant. Every
 * (seed, point, chunk) thus starts at its own pseudo-random place on the single cycle of length 2^128 − 1,
 * and a chunk draws far fewer than 2^32 outputs, so two of N streams overlap with probability below
 * N²·2^32 / 2^128 — about 2^-56 for a million chunks. Jumping (2^64 steps per jump) from one base
 * would also give disjoint streams, but reaching chunk c would cost c jumps of 128 steps each; hashing
 * reaches any chunk in constant time, which is what lets workers take chunks in any order.
 *
 * pure-rand's next() returns the low 32 bits of the 64-bit xoroshiro128+ output; its lowest bit is a
 * linear sequence of low complexity (the generator's documented weakness), harmless for the threshold
 * comparisons drawn here.
 */
export type Stream = ReturnType<typeof xoroshiro128plusFromState>;

/** murmur3's 32-bit finaliser (fmix32): an avalanche bijection on 32-bit words. */
function fmix32(h: number): number {
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  return (h ^ (h >>> 16)) | 0;
}

const WORD_KEYS = [0x9e3779b9, 0x7f4a7c15, 0xbf58476d, 0x94d049bb];

/** The stream of chunk `chunk` of point `point` under `seed` (all three 32-bit unsigned integers). */
export function chunkStream(seed: number, point: number, chunk: number): Stream {
  const state = WORD_KEYS.map((key) => fmix32(fmix32(fmix32(fmix32(seed ^ key) ^ point) + chunk) ^ key));
  // The all-zero state is the generator's one fixed point.
  if (!state.some((w) => w !== 0)) state[0] = 1;
  return xoroshiro128plusFromState(state);
}

const TWO_POW_M32 = 2 ** -32;
const TWO_POW_M53 = 2 ** -53;

/** Uniform on (0, 1] in steps of 2^-53, from two 32-bit outputs (27 + 26 bits). */
export function uniformOpenZero(g: Stream): number {
  const hi = (g.next() >>> 5) * 2 ** 26;
  const lo = g.next() >>> 6;
  return (hi + lo + 1) * TWO_POW_M53;
}

/**
 * The number of trials before the next event in a Bernoulli(p) sequence, Geometric on {0, 1, …}: ⌊ln U / ln(1 − p)⌋ with U uniform on (0, 1] (inverse
 * transform; Devroye 1986, ch. X.2), ln(1 − p) as log1p(−p) so that small p keeps its precision.
 * `logQ` is log1p(−p) < 0, computed once per point.
 */
export function geometricGap(g: Stream, logQ: number): number {
  return Math.floor(Math.log(uniformOpenZero(g)) / logQ);
}

/**
 * Standard normal deviates in pairs by Marsaglia's polar method (Marsaglia & Bray 1964): u, v uniform on
 * (−1, 1) from one 32-bit output each, s = u² + v² accepted in (0, 1), then u·f and v·f with
 * f = √(−2 ln s / s). The 2^-31 grid of u and v bounds |z| below about 9.3, far beyond any error rate a
 * simulation can reach (Q(9) ≈ 1e-19).
 */
export class Normals {
  private spare = 0;
  private hasSpare = false;
  constructor(private readonly g: Stream) {}

  next(): number {
    if (this.hasSpare) {
      this.hasSpare = false;
      return this.spare;
    }
    let u: number, v: number, s: number;
    do {
      u = (this.g.next() + 0.5) * 2 * TWO_POW_M32;
      v = (this.g.next() + 0.5) * 2 * TWO_POW_M32;
      s = u * u + v * v;
    } while (s >= 1);
    const f = Math.sqrt((-2 * Math.log(s)) / s);
    this.spare = v * f;
    this.hasSpare = true;
    return u * f;
  }
}

/** The binary digits of p ∈ (0, 1) after the point, up to its last 1: finite for every double (doubling and subtracting 1 are exact). */
export function binaryDigits(p: number): Uint8Array {
  const digits: number[] = [];
  let x = p;
  while (x > 0) {
    x *= 2;
    if (x >= 1) {
      digits.push(1);
      x -= 1;
    } else digits.push(0);
  }
  return Uint8Array.from(digits);
}

/**
 * Bernoulli(p) bits, 32 at a time, bit-sliced: lane i of the word takes bit i of successive 32-bit
 * outputs as the binary digits of its own uniform U_i and reports U_i < p, comparing digit by digit with
 * p's binary expansion and stopping as soon as every lane is decided (Knuth & Yao 1976, the comparison
 * form). Exact for the double p, and for p < 1/32 it costs about log2(32) + 1.3 ≈ 6.3 outputs per 32 bits
 * whatever p is, instead of one output per bit.
 */
export class BernoulliBits {
  private word = 0;
  private avail = 0;
  /** p's digits as masks: 0 for a 0 digit, −1 (all lanes) for a 1. */
  private readonly digits: Int32Array;
  private readonly all: boolean;

  constructor(
    private readonly g: Stream,
    p: number,
  ) {
    this.all = p >= 1;
    this.digits = p > 0 && p < 1 ? Int32Array.from(binaryDigits(p), (d) => -d) : new Int32Array(0);
  }

  /** 32 fresh Bernoulli(p) bits. */
  nextWord(): number {
    if (this.all) return -1;
    const { digits, g } = this;
    const L = digits.length;
    let undecided = -1;
    let out = 0;
    let i = 0;
    // Branch-free steps: a lane whose digit r differs from p's digit d is decided (r < d: U < p); one
    // that matches stays open. 32 lanes are rarely all decided within 4 digits, so those 4 go untested.
    for (; i < 4 && i < L; i++) {
      const r = g.next();
      const d = digits[i]!;
      out |= undecided & ~r & d;
      undecided &= ~(r ^ d);
    }
    for (; undecided !== 0 && i < L; i++) {
      const r = g.next();
      const d = digits[i]!;
      out |= undecided & ~r & d;
      undecided &= ~(r ^ d);
    }
    return out;
  }

  /** The next `count` bits of the sequence (1 ≤ count ≤ 16), bit j of the result being the j-th. */
  take(count: number): number {
    const mask = (1 << count) - 1;
    if (this.avail >= count) {
      const v = this.word & mask;
      this.word >>>= count;
      this.avail -= count;
      return v;
    }
    const have = this.avail;
    const w = this.nextWord();
    const v = (this.word | (w << have)) & mask;
    this.word = w >>> (count - have);
    this.avail = 32 - (count - have);
    return v;
  }
}

/** Fair bits from the stream, `count` (1..16) at a time, bit j of the result being the j-th. */
export class CoinBits {
  private word = 0;
  private avail = 0;
  constructor(private readonly g: Stream) {}

  take(count: number): number {
    const mask = (1 << count) - 1;
    if (this.avail < count) {
      this.word = this.g.next();
      this.avail = 32;
    }
    const v = this.word & mask;
    this.word >>>= count;
    this.avail -= count;
    return v;
  }
}
