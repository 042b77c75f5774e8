import { type Bits, popcount32 } from "../bits";
import { checkBinaryWord, rejectErasures } from "../gf2";
import { InputError } from "../errors";
import { byteView, checkBinaryBatch, firstNonBit, NON_BITS, nibble, SPREAD } from "./hamming";
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
  /** tail[v]: the last 12 bits of the codeword of message v (bit 11 of v = position 0), bit n − 1 − q = position q: the parity bits, and for (23,12) the last message bit before them. */
  tail: Int32Array;
}

const cache = new Map<boolean, Tables>();

// Local bindings of the shared word helpers: a transpiled import can be a getter, too slow to call per word.
const gather = nibble;
const spread = SPREAD;

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
  // The tail is linear in the message: each entry is an earlier one XOR the share of v's lowest set bit p.
  const tail = new Int32Array(1 << K);
  for (let v = 1; v < 1 << K; v++) {
    const p = K - 1 - (31 - Math.clz32(v & -v));
    const rem = column23[p]!;
    // Extended: the overall parity follows, 1 for the message bit ⊕ the parity of its remainder; plain: bit 11 itself leads.
    const share = extended ? (rem << 1) | (1 ^ (popcount32(rem) & 1)) : p === K - 1 ? rem | (1 << 11) : rem;
    tail[v] = tail[v & (v - 1)]! ^ share;
  }
  const t = { n, column, leader, tail };
  cache.set(extended, t);
  return t;
}

/**
 * The binary Golay code (23,12), perfect with dmin = 7, or with `extended` the (24,12) code with an
 * overall parity bit, dmin = 8 (Golay 1949; MacWilliams & Sloane 1977, ch. 2). Systematic cyclic
 * encoding with g(x) = x^11 + x^10 + x^6 + x^5 + x^4 + x^2 + 1: bit p of the 23-bit codeword is the
 * coefficient of x^(22−p), so the 12 message bits come first and the 11 parity bits, the remainder of
 * m(x)·x^11 divided by g(x), follow highest degree first; (24,12) appends the overall parity bit.
 * Encoding looks the parity bits up in a 4096-entry table. Decoding by syndrome table (2^11 or 2^12
 * entries) corrects up to 3 errors; in (24,12) a syndrome of a weight-4 coset (6 equally near codewords)
 * is reported as failure and nothing is changed.
 */
export function golay(extended = false): BlockCode {
  if (typeof extended !== "boolean") throw new InputError("extended must be true or false", ["extended"]);
  const { n, column, leader, tail } = tables(extended);
  const r = n - K;
  const name = extended ? "extended Golay (24,12)" : "Golay (23,12)";
  const syndromeOf = (w: Bits): number => {
    let s = 0;
    for (let p = 0; p < n; p++) if (w[p]) s ^= column[p]!;
    return s;
  };
  /**
   * Writes the codewords of `count` messages stored back to back in src to out: each message is read and
   * copied as three 32-bit words and its last 12 codeword bits come from the 4096-entry tail table, written
   * four to a word (the first such write repeats the (23,12) code's last message bit). Returns the OR of what
   * was read: a non-bit shows outside 0x01010101.
   */
  const encodeRun = (src: Bits, out: Bits, count: number): number => {
    const sv = byteView(src);
    const ov = byteView(out);
    let seen = 0;
    for (let i = 0, f = 0, t = 0; i < count; i++, f += K, t += n) {
      const w0 = sv.getUint32(f, true);
      const w1 = sv.getUint32(f + 4, true);
      const w2 = sv.getUint32(f + 8, true);
      ov.setUint32(t, w0, true);
      ov.setUint32(t + 4, w1, true);
      ov.setUint32(t + 8, w2, true);
      seen |= w0 | w1 | w2;
      const bits = tail[(gather(w0) << 8) | (gather(w1) << 4) | gather(w2)]!;
      ov.setUint32(t + n - 12, spread[bits >>> 8]!, true);
      ov.setUint32(t + n - 8, spread[(bits >>> 4) & 15]!, true);
      ov.setUint32(t + n - 4, spread[bits & 15]!, true);
    }
    return seen;
  };
  const encode = (message: Word): Bits => {
    const c = new Uint8Array(n);
    encodeRun(checkBinaryWord(message, K, "message", name), c, 1);
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
      if (encodeRun(m, out, count) & NON_BITS) throw firstNonBit(m, K);
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
