import { type Bits, popcount32 } from "../bits";
import { InputError } from "../errors";
import { checkBinaryWord, rejectErasures } from "../gf2";
import type { BlockCode, DecodeResult, Word } from "./types";

/** Largest r accepted: n = 2^16 − 1 = 65535 bits and a 2^16-entry syndrome table. */
export const MAX_HAMMING_R = 16;
/** generatorRows() is offered up to this n (r ≤ 10); beyond, the k × n matrix would not fit in memory sensibly. */
const MAX_GENERATOR_N = 1024;

/**
 * Checks a batch of `count` binary messages of k bits each, stored back to back: type, count and total
 * length. The bits themselves are checked by the encoder's loop, which reports them through firstNonBit.
 * Shared by the binary families' encodeBatch.
 */
export function checkBinaryBatch(messages: Word, count: number, k: number, codeName: string): Bits {
  if (!Number.isSafeInteger(count) || count < 0) throw new InputError(`count must be a non-negative integer; got ${count}`, ["count"]);
  if (!(messages instanceof Uint8Array)) throw new InputError(`messages must be bits (0/1); ${codeName} is a binary code`, ["messages"]);
  if (messages.length !== count * k) throw new InputError(`messages has ${messages.length} bits; ${count} messages of ${codeName} take ${count * k}`, ["messages"]);
  return messages;
}

/** The InputError for the first entry of a batch of k-bit messages that is not 0 or 1. */
export function firstNonBit(messages: Bits, k: number): InputError {
  const f = messages.findIndex((v) => v > 1);
  const j = Math.floor(f / k);
  return new InputError(`message ${j} bit ${f - j * k} is ${messages[f]}; bits are 0 or 1`, ["messages", j, f - j * k]);
}

const nibbleTables = new Map<number, Int32Array>();

/**
 * table[16c + v]: the parity of the message nibble v at positions 4c..4c+3 (bit 3 of v = position 4c;
 * positions ≥ k count as 0), as (syndrome part << 1) | (its share of the extended code's overall parity).
 * Both parts are linear in the message, so a word's parity is the XOR of its nibbles' entries. Cached by r.
 */
function nibbleTable(r: number, column: Int32Array, k: number): Int32Array {
  const hit = nibbleTables.get(r);
  if (hit) return hit;
  // Overall parity = parity(message) ⊕ parity(syndrome bits), so a message bit with column s adds 1 ⊕ parity(s).
  const share = (p: number) => (column[p]! << 1) | (1 ^ (popcount32(column[p]!) & 1));
  const chunks = (k + 3) >>> 2;
  const table = new Int32Array(16 * chunks);
  for (let c = 0; c < chunks; c++) {
    for (let v = 1; v < 16; v++) {
      const b = 31 - Math.clz32(v & -v); // lowest set bit of v: position 4c + 3 − b
      const p = 4 * c + 3 - b;
      table[16 * c + v] = table[16 * c + (v & (v - 1))]! ^ (p < k ? share(p) : 0);
    }
  }
  nibbleTables.set(r, table);
  return table;
}

/**
 * The Hamming code of redundancy r, n = 2^r − 1, k = n − r, dmin = 3, and with `extended` the
 * (2^r, 2^r − 1 − r) code with an overall parity bit, dmin = 4 (Hamming 1950; MacWilliams & Sloane 1977,
 * ch. 1). Systematic [I_k | P]: message bits first, then the r parity bits, then (extended) the overall
 * parity bit. Column j of H is an r-bit number: message bit i gets the i-th integer in [3, 2^r) that is
 * not a power of two, parity bit j (position k + j) gets 2^(r−1−j). The syndrome is H·rᵀ written
 * most significant bit first (plus, extended, the overall parity of all n bits as a last bit), so a
 * single error at position p gives the column number of p. Encoding XORs one parity-table entry per
 * message nibble. Decoding corrects one error by a syndrome
 * table; extended, a non-zero syndrome with even overall parity is a double error: failure, nothing changed.
 */
export function hamming(r: number, extended = false): BlockCode {
  if (!Number.isInteger(r) || r < 2 || r > MAX_HAMMING_R) throw new InputError(`r must be an integer from 2 to ${MAX_HAMMING_R}; got ${r}`, ["r"]);
  if (typeof extended !== "boolean") throw new InputError("extended must be true or false", ["extended"]);
  const base = (1 << r) - 1;
  const k = base - r;
  const n = extended ? base + 1 : base;
  const name = `${extended ? "extended " : ""}Hamming (${n},${k})`;

  // column[p]: H column of position p as an integer; position[s]: the position whose column is s.
  const column = new Int32Array(base);
  const position = new Int32Array(1 << r).fill(-1);
  let next = 3;
  for (let i = 0; i < k; i++, next++) {
    while ((next & (next - 1)) === 0) next++;
    column[i] = next;
  }
  for (let j = 0; j < r; j++) column[k + j] = 1 << (r - 1 - j);
  for (let p = 0; p < base; p++) position[column[p]!] = p;

  const syndromeOf = (w: Bits): number => {
    let s = 0;
    for (let p = 0; p < base; p++) if (w[p]) s ^= column[p]!;
    return s;
  };
  const weightParity = (w: Bits): number => {
    let x = 0;
    for (let p = 0; p < w.length; p++) x ^= w[p]!;
    return x;
  };

  const table = nibbleTable(r, column, k);
  const full = k >>> 2;
  const tail = k & 3;
  /**
   * Writes the codeword of the k bits at src[from..] to out[to..] by nibble-table lookup (the syndrome is
   * linear, so it is the XOR of per-nibble parts); returns the OR of the message entries, > 1 for a non-bit.
   */
  const encodeAt = (src: Bits, from: number, out: Bits, to: number): number => {
    let acc = 0;
    let seen = 0;
    let t = 0;
    let p = 0;
    for (let c = 0; c < full; c++, p += 4, t += 16) {
      const b0 = src[from + p]!;
      const b1 = src[from + p + 1]!;
      const b2 = src[from + p + 2]!;
      const b3 = src[from + p + 3]!;
      out[to + p] = b0;
      out[to + p + 1] = b1;
      out[to + p + 2] = b2;
      out[to + p + 3] = b3;
      seen |= b0 | b1 | b2 | b3;
      acc ^= table[t + ((b0 << 3) | (b1 << 2) | (b2 << 1) | b3)]!;
    }
    if (tail !== 0) {
      let v = 0;
      for (; p < k; p++) {
        const bit = src[from + p]!;
        out[to + p] = bit;
        seen |= bit;
        v = (v << 1) | bit;
      }
      acc ^= table[t + (v << (4 - tail))]!;
    }
    for (let j = 0; j < r; j++) out[to + k + j] = (acc >>> (r - j)) & 1;
    if (extended) out[to + base] = acc & 1;
    return seen;
  };

  const encode = (message: Word): Bits => {
    const m = checkBinaryWord(message, k, "message", name);
    const c = new Uint8Array(n);
    encodeAt(m, 0, c, 0);
    return c;
  };

  const code: BlockCode = {
    family: "hamming",
    name,
    n,
    k,
    q: 2,
    dmin: extended ? 4 : 3,
    messagePositions: Array.from({ length: k }, (_, i) => i),
    bitOrder:
      `Message bits in positions 0..${k - 1}, parity bits in positions ${k}..${base - 1}` +
      (extended ? `, the overall parity bit in position ${base}` : "") +
      `. Parity bit j (position ${k} + j) is bit ${r - 1} − j (bit 0 = least significant) of the XOR of the column numbers of the message bits that are 1; ` +
      "message bit i's column number is the i-th integer ≥ 3 that is not a power of two.",
    supportsErasures: false,
    encode,
    encodeBatch(messages: Word, count: number): Bits {
      const m = checkBinaryBatch(messages, count, k, name);
      const out = new Uint8Array(count * n);
      let seen = 0;
      for (let i = 0; i < count; i++) seen |= encodeAt(m, i * k, out, i * n);
      // Checked after the fact so the loop stays branch-free; a non-bit only spoils a result that is thrown away.
      if (seen > 1) throw firstNonBit(m, k);
      return out;
    },
    decode(received: Word, erasures?: number[]): DecodeResult {
      const w = checkBinaryWord(received, n, "received", name);
      rejectErasures(erasures, name);
      const s = syndromeOf(w);
      const overall = extended ? weightParity(w) : 1;
      const syndrome = new Uint8Array(n - k);
      for (let j = 0; j < r; j++) syndrome[j] = (s >>> (r - 1 - j)) & 1;
      if (extended) syndrome[r] = overall;
      if (extended && s !== 0 && overall === 0) {
        return { message: w.slice(0, k), codeword: w.slice(), correctedPositions: [], syndrome, failure: true, reason: "double error detected (non-zero syndrome, even overall parity); not corrected" };
      }
      const codeword = w.slice();
      const correctedPositions: number[] = [];
      // Without the extension overall is fixed at 1, so any non-zero syndrome is one error at position[s].
      if (overall === 1 && (s !== 0 || extended)) {
        const p = s === 0 ? base : position[s]!;
        codeword[p]! ^= 1;
        correctedPositions.push(p);
      }
      return { message: codeword.slice(0, k), codeword, correctedPositions, syndrome, failure: false };
    },
  };
  if (n <= MAX_GENERATOR_N) {
    code.generatorRows = () =>
      Array.from({ length: k }, (_, i) => {
        const m = new Uint8Array(k);
        m[i] = 1;
        return encode(m);
      });
  }
  return code;
}
