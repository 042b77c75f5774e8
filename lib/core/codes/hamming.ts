import { type Bits, popcount32 } from "../bits";
import { InputError } from "../errors";
import { checkBinaryWord, rejectErasures } from "../gf2";
import type { BlockCode, DecodeResult, Word } from "./types";

/** Largest r accepted: n = 2^16 − 1 = 65535 bits and a 2^16-entry syndrome table. */
export const MAX_HAMMING_R = 16;
/** generatorRows() is offered up to this n (r ≤ 10); beyond, the k × n matrix would not fit in memory sensibly. */
const MAX_GENERATOR_N = 1024;

/**
 * Checks the shape of a batch of `count` binary messages of k bits each, stored back to back: the count,
 * the type and the total length. The encoder's loop checks the bits and reports one through firstNonBit.
 * Shared by the binary families' encodeBatch.
 */
export function checkBinaryBatch(messages: Word, count: number, k: number, codeName: string): Bits {
  if (!Number.isSafeInteger(count) || count < 0) throw new InputError(`count must be a non-negative integer; got ${count}`, ["count"]);
  if (!(messages instanceof Uint8Array)) throw new InputError(`messages must be bits (0/1); ${codeName} is a binary code`, ["messages"]);
  if (messages.length !== count * k) throw new InputError(`messages has ${messages.length} bits; ${count} messages of ${codeName} take ${count * k}`, ["messages"]);
  return messages;
}

/** The InputError for the first entry of a batch of k-bit messages that is not 0 or 1 (call only when there is one). */
export function firstNonBit(messages: Bits, k: number): InputError {
  const f = messages.findIndex((v) => v > 1);
  const j = Math.floor(f / k);
  return new InputError(`message ${j} bit ${f - j * k} is ${messages[f]}; bits are 0 or 1`, ["messages", j, f - j * k]);
}

/*
 * Word-at-a-time access to 0/1 bytes, shared by the binary families' encoders. A DataView with explicit
 * little-endian order reads four entries as one 32-bit word on any platform: entry b is byte b.
 */

/** A DataView over a word's own bytes. */
export const byteView = (w: Bits) => new DataView(w.buffer, w.byteOffset, w.byteLength);

/** The four 0/1 bytes of a little-endian 32-bit word as a nibble, byte 0 in bit 3: one multiply gathers bit 8b to bit 27 − b, no carries. */
export const nibble = (w: number) => (Math.imul(w, 0x08040201) >>> 24) & 15;

/** The bits that only a byte other than 0 or 1 can set in the OR of the 32-bit words read. */
export const NON_BITS = ~0x01010101;

/** SPREAD[v]: the nibble v as four 0/1 bytes of a little-endian 32-bit word, bit 3 in byte 0 (the inverse of nibble). */
export const SPREAD = Uint32Array.from({ length: 16 }, (_, v) => ((v >>> 3) & 1) | (((v >>> 2) & 1) << 8) | (((v >>> 1) & 1) << 16) | ((v & 1) << 24));

const nibbleTables = new Map<number, Int32Array>();

/**
 * table[16c + v]: what the message nibble v at positions 4c..4c+3 (bit 3 of v = position 4c) adds to the
 * codeword's tail, the integer whose bit n − 1 − q is codeword bit q for the last 4·⌈(n − k)/4⌉ positions q:
 * its parity bits and, for the last few message positions, the bit itself. Every part is linear in the
 * message, so a word's tail is the XOR of its nibbles' entries. Cached by n (r and extended).
 */
function nibbleTable(extended: boolean, column: Int32Array, k: number, n: number): Int32Array {
  const hit = nibbleTables.get(n);
  if (hit) return hit;
  const first = n - 4 * Math.ceil((n - k) / 4);
  const share = (p: number): number => {
    if (p >= k) return 0;
    // Overall parity = parity(message) ⊕ parity(syndrome bits), so a message bit with column s adds 1 ⊕ parity(s).
    const parity = extended ? (column[p]! << 1) | (1 ^ (popcount32(column[p]!) & 1)) : column[p]!;
    return p >= first ? parity | (1 << (n - 1 - p)) : parity;
  };
  const table = new Int32Array(16 * Math.ceil(k / 4));
  for (let c = 0; c < table.length / 16; c++) {
    for (let v = 1; v < 16; v++) {
      const b = 31 - Math.clz32(v & -v); // lowest set bit of v: position 4c + 3 − b
      table[16 * c + v] = table[16 * c + (v & (v - 1))]! ^ share(4 * c + 3 - b);
    }
  }
  nibbleTables.set(n, table);
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
 * message nibble. Decoding corrects one error by a syndrome table; extended, a non-zero syndrome with
 * even overall parity is a double error: failure, nothing changed.
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

  const table = nibbleTable(extended, column, k, n);
  // The parity bits are written in 4-bit groups from the codeword's end (the first group written may also
  // hold the last message bits). Only (3,1) is too short for a 4-byte write and goes bit by bit.
  const parityBits = n - k;
  const groups = Math.ceil(parityBits / 4);
  const grouped = n >= 4 * groups;
  /**
   * Writes the codewords of `count` messages stored back to back in src to out, column by column over the
   * batch so that every inner loop is long and branch-free: four message bits at a time are read and copied
   * as one 32-bit word and their share of the codeword's tail looked up in the nibble table, then the tail
   * is written four bits to a word; with r = 3 that is a single pass. Returns the OR of what was read: a
   * non-bit shows outside 0x01010101.
   */
  const encodeRun = (src: Bits, out: Bits, count: number): number => {
    const sv = byteView(src);
    const ov = byteView(out);
    let seen = 0;
    if (k === 4) {
      // r = 3: a message is one nibble and its tail one group, so a codeword is one read and two writes.
      for (let i = 0, f = 0, t = 0; i < count; i++, f += 4, t += n) {
        const w = sv.getUint32(f, true);
        ov.setUint32(t, w, true);
        seen |= w;
        ov.setUint32(t + n - 4, SPREAD[table[nibble(w)]!]!, true);
      }
      return seen;
    }
    const tail = new Int32Array(count);
    let p = 0;
    for (; p + 4 <= k; p += 4) {
      const row = p << 2;
      for (let i = 0, f = p; i < count; i++, f += k) {
        const w = sv.getUint32(f, true);
        ov.setUint32(f + i * parityBits, w, true);
        seen |= w;
        tail[i]! ^= table[row | nibble(w)]!;
      }
    }
    // The last k mod 4 bits, one at a time: the table is linear, so single-bit entries XOR to the nibble's.
    for (let b = 3; p < k; p++, b--) {
      const row = (p >>> 2) << 4;
      for (let i = 0, f = p; i < count; i++, f += k) {
        const bit = src[f]!;
        out[f + i * parityBits] = bit;
        seen |= bit;
        tail[i]! ^= table[row | ((bit & 1) << b)]!;
      }
    }
    if (grouped) {
      for (let g = 0; g < groups; g++) {
        for (let i = 0, t = n - 4 - 4 * g; i < count; i++, t += n) ov.setUint32(t, SPREAD[(tail[i]! >>> (4 * g)) & 15]!, true);
      }
    } else {
      for (let j = 0; j < parityBits; j++) {
        for (let i = 0, t = k + j; i < count; i++, t += n) out[t] = (tail[i]! >>> (parityBits - 1 - j)) & 1;
      }
    }
    return seen;
  };

  const encode = (message: Word): Bits => {
    const c = new Uint8Array(n);
    encodeRun(checkBinaryWord(message, k, "message", name), c, 1);
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
      // Checked after the loop so that it stays branch-free; a non-bit only spoils a result that is thrown away.
      if (encodeRun(m, out, count) & NON_BITS) throw firstNonBit(m, k);
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
