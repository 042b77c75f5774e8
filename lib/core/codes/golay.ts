import { type Bits, popcount32 } from "../bits";
import { checkBinaryWord, rejectErasures } from "../gf2";
import { InputError } from "../errors";
import { checkBinaryBatch, firstNonBit } from "./hamming";
import type { BlockCode, DecodeResult, Word } from "./types";

/** g(x) = x^11 + x^10 + x^6 + x^5 + x^4 + x^2 + 1 (octal 6165; its reciprocal, octal 5343, gives an equivalent code), bit i = coefficient of x^i. */
const GOLAY_POLY = 0xc75;
const K = 12;

interface Tables {
  n: number;
  /** H column of each position as an integer whose most significant bit is the first syndrome bit. */
  column: Int32Array;
  /** Coset leader per syndrome as a bit mask (bit p = position p), −1 where the leader has weight 4. */
  leader: Int32Array;
  /** parity[v]: the n − 12 bits after message v (bit 11 of v = position 0), the first in the most significant place. */
  parity: Int32Array;
}

const cache = new Map<boolean, Tables>();

function tables(extended: boolean): Tables {
  const hit = cache.get(extended);
  if (hit) return hit;
  // Column of position p in (23,12) is x^(22−p) mod g(x): position 22 is x^0, each step left multiplies by x.
  const column23 = new Int32Array(23);
  for (let p = 22, v = 1; p >= 0; p--) {
    column23[p] = v;
    v <<= 1;
    if (v & 0x800) v ^= GOLAY_POLY;
  }
  const n = extended ? 24 : 23;
  // Extended: each syndrome gains a last bit, the overall parity, which every position feeds.
  const column = extended ? Int32Array.from({ length: 24 }, (_, p) => (p < 23 ? (column23[p]! << 1) | 1 : 1)) : column23;
  const leader = new Int32Array(1 << (n - K)).fill(-1);
  // Patterns of weight ≤ 3 have distinct syndromes (dmin ≥ 7); for (23,12) they fill all 2^11 (the code is perfect).
  leader[0] = 0;
  for (let a = 0; a < n; a++) {
    leader[column[a]!] = 1 << a;
    for (let b = a + 1; b < n; b++) {
      leader[column[a]! ^ column[b]!] = (1 << a) | (1 << b);
      for (let c = b + 1; c < n; c++) leader[column[a]! ^ column[b]! ^ column[c]!] = (1 << a) | (1 << b) | (1 << c);
    }
  }
  // The parity bits are linear in the message: each entry is an earlier one XOR the share of v's lowest set bit.
  const parity = new Int32Array(1 << K);
  for (let v = 1; v < 1 << K; v++) {
    const p = K - 1 - (31 - Math.clz32(v & -v));
    const rem = column23[p]!;
    // Extended: append the overall parity, 1 for the message bit ⊕ the parity of its remainder.
    parity[v] = parity[v & (v - 1)]! ^ (extended ? (rem << 1) | (1 ^ (popcount32(rem) & 1)) : rem);
  }
  const t = { n, column, leader, parity };
  cache.set(extended, t);
  return t;
}

/**
 * The binary Golay code (23,12), perfect with dmin = 7, or with `extended` the (24,12) code with an
 * overall parity bit, dmin = 8 (Golay 1949; MacWilliams & Sloane 1977, ch. 2). Systematic cyclic
 * encoding with g(x) = x^11 + x^10 + x^6 + x^5 + x^4 + x^2 + 1: bit p of the 23-bit codeword is the
 * coefficient of x^(22−p), so the 12 message bits come first and the 11 parity bits, the remainder of
 * m(x)·x^11 divided by g(x), follow highest degree first; (24,12) appends the overall parity bit.
 * Encoding looks the parity bits up in a 4096-entry table. Decoding by syndrome table (2^11 or 2^12 entries) corrects up to 3 errors; in (24,12) a syndrome of
 * a weight-4 coset (6 equally near codewords) is reported as failure and nothing is changed.
 */
export function golay(extended = false): BlockCode {
  if (typeof extended !== "boolean") throw new InputError("extended must be true or false", ["extended"]);
  const { n, column, leader, parity } = tables(extended);
  const r = n - K;
  const name = extended ? "extended Golay (24,12)" : "Golay (23,12)";
  const syndromeOf = (w: Bits): number => {
    let s = 0;
    for (let p = 0; p < n; p++) if (w[p]) s ^= column[p]!;
    return s;
  };
  /** Writes the codeword of the 12 bits at src[from..] to out[to..] from the parity table; returns the OR of the message entries, > 1 for a non-bit. */
  const encodeAt = (src: Bits, from: number, out: Bits, to: number): number => {
    let v = 0;
    let seen = 0;
    for (let p = 0; p < K; p++) {
      const b = src[from + p]!;
      out[to + p] = b;
      seen |= b;
      v = (v << 1) | b;
    }
    // The mask keeps a non-bit inside the table; such a batch is rejected afterwards.
    const bits = parity[v & ((1 << K) - 1)]!;
    for (let j = 0; j < r; j++) out[to + K + j] = (bits >>> (r - 1 - j)) & 1;
    return seen;
  };
  const encode = (message: Word): Bits => {
    const c = new Uint8Array(n);
    encodeAt(checkBinaryWord(message, K, "message", name), 0, c, 0);
    return c;
  };
  return {
    family: "golay",
    name,
    n,
    k: K,
    q: 2,
    dmin: extended ? 8 : 7,
    messagePositions: Array.from({ length: K }, (_, i) => i),
    bitOrder:
      "Message bits in positions 0..11 (coefficients of x^22..x^11), then the 11 parity bits in positions 12..22: the remainder of m(x)·x^11 " +
      "divided by g(x) = x^11 + x^10 + x^6 + x^5 + x^4 + x^2 + 1, highest degree first" +
      (extended ? "; then the overall parity bit in position 23." : "."),
    supportsErasures: false,
    encode,
    encodeBatch(messages: Word, count: number): Bits {
      const m = checkBinaryBatch(messages, count, K, name);
      const out = new Uint8Array(count * n);
      let seen = 0;
      for (let i = 0; i < count; i++) seen |= encodeAt(m, i * K, out, i * n);
      if (seen > 1) throw firstNonBit(m, K);
      return out;
    },
    decode(received: Word, erasures?: number[]): DecodeResult {
      const w = checkBinaryWord(received, n, "received", name);
      rejectErasures(erasures, name);
      const s = syndromeOf(w);
      const syndrome = new Uint8Array(r);
      for (let j = 0; j < r; j++) syndrome[j] = (s >>> (r - 1 - j)) & 1;
      const e = leader[s]!;
      if (e < 0) {
        return { message: w.slice(0, K), codeword: w.slice(), correctedPositions: [], syndrome, failure: true, reason: "4 errors detected (a weight-4 coset: 6 codewords equally near); not corrected" };
      }
      const codeword = w.slice();
      const correctedPositions: number[] = [];
      for (let p = 0; p < n; p++) {
        if ((e >>> p) & 1) {
          codeword[p]! ^= 1;
          correctedPositions.push(p);
        }
      }
      return { message: codeword.slice(0, K), codeword, correctedPositions, syndrome, failure: false };
    },
    generatorRows: () =>
      Array.from({ length: K }, (_, i) => {
        const m = new Uint8Array(K);
        m[i] = 1;
        return encode(m);
      }),
  };
}
