import { type Bits, popcount32 } from "../bits";
import { InputError } from "../errors";
import { checkBinaryWord, rejectErasures } from "../gf2";
import type { BlockCode, DecodeBatchResult, DecodeResult, Word } from "./types";

/** Largest r accepted: n = 2^16 − 1 = 65535 bits and a 2^16-entry syndrome table. */
export const MAX_HAMMING_R = 16;
/** generatorRows() is offered up to this n (r ≤ 10); beyond, the k × n matrix would not fit in memory sensibly. */
const MAX_GENERATOR_N = 1024;

/**
 * Checks the shape of a batch of `count` binary words of `length` bits each, stored back to back: the count,
 * the type and the total length. The kernel's loop checks the bits and reports one through firstNonBit.
 * Shared by the binary families' encodeBatch (field "messages") and decodeBatch (field "received", noun "words").
 */
export function checkBinaryBatch(words: Word, count: number, length: number, codeName: string, field = "messages", noun = "messages"): Bits {
  if (!Number.isSafeInteger(count) || count < 0) throw new InputError(`count must be a non-negative integer; got ${count}`, ["count"]);
  if (!(words instanceof Uint8Array)) throw new InputError(`${field} must be bits (0/1); ${codeName} is a binary code`, [field]);
  if (words.length !== count * length) throw new InputError(`${field} has ${words.length} bits; ${count} ${noun} of ${codeName} take ${count * length}`, [field]);
  return words;
}

/** The InputError for the first entry of a batch of words of `length` bits that is not 0 or 1 (call only when there is one). */
export function firstNonBit(words: Bits, length: number, field = "messages", noun = "message"): InputError {
  const f = words.findIndex((v) => v > 1);
  const j = Math.floor(f / length);
  return new InputError(`${noun} ${j} bit ${f - j * length} is ${words[f]}; bits are 0 or 1`, [field, j, f - j * length]);
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

const syndromeTables = new Map<number, Int32Array>();

/**
 * table[16c + v]: the syndrome integer (decodeBatch's form) of a word that is zero except for the nibble v at
 * positions 4c..4c+3 (bit 3 of v = position 4c), for every whole nibble of the word. `share[p]` is the syndrome
 * of a single 1 at position p. The syndrome is linear, so a word's is the XOR of its nibbles' entries. Cached by n.
 */
function syndromeTable(share: Int32Array): Int32Array {
  const n = share.length;
  const hit = syndromeTables.get(n);
  if (hit) return hit;
  const table = new Int32Array(16 * (n >>> 2));
  for (let c = 0; c < table.length / 16; c++) {
    for (let v = 1; v < 16; v++) {
      const b = 31 - Math.clz32(v & -v); // lowest set bit of v: position 4c + 3 − b
      table[16 * c + v] = table[16 * c + (v & (v - 1))]! ^ share[4 * c + 3 - b]!;
    }
  }
  syndromeTables.set(n, table);
  return table;
}

const wordTables = new Map<number, Int32Array>();

/**
 * r = 3 (n = 7 or 8): table[v] packs what `decode` answers for the received word v (bit n − 1 − p = position p):
 * the message in bits 0..3 (bit 3 = position 0), the syndrome integer in bits 8..11, 1 + the corrected
 * position in bits 12..15 (0: none) and failure in bit 16. Made by decoding all 2^n words once.
 */
function wordTable(n: number, decode: (w: Bits) => DecodeResult): Int32Array {
  const hit = wordTables.get(n);
  if (hit) return hit;
  const table = new Int32Array(1 << n);
  const toInt = (w: Word) => Array.from(w).reduce((x, b) => (x << 1) | b, 0);
  for (let v = 0; v < 1 << n; v++) {
    const d = decode(Uint8Array.from({ length: n }, (_, p) => (v >>> (n - 1 - p)) & 1));
    const at = d.correctedPositions.length === 1 ? 1 + d.correctedPositions[0]! : 0;
    table[v] = toInt(d.message) | (toInt(d.syndrome) << 8) | (at << 12) | (Number(d.failure) << 16);
  }
  wordTables.set(n, table);
  return table;
}

const LITTLE_ENDIAN = new Uint8Array(Uint32Array.of(1).buffer)[0] === 1;
const swap32 = (x: number) => ((x & 0xff) << 24) | ((x & 0xff00) << 8) | ((x >>> 8) & 0xff00) | (x >>> 24);

/** decodeBatch's arrays while a kernel fills them (DecodeBatchResult without the reason). */
interface BatchOut {
  messages: Bits;
  corrected: Int32Array;
  syndromes: Int32Array;
  failures: Uint8Array;
}

/**
 * The arrays of a batch of `count` words, as views over one zeroed buffer (one allocation instead of four):
 * syndromes and corrected (4 bytes a word, first so that they are aligned), then messages and failures.
 * Fresh memory is a batch's largest cost after the kernel (a third of the time when the codewords were stored
 * too: page faults on memory the allocator had given back), so nothing is stored that the received words and
 * `corrected` already say: the corrected codewords are the received words with one bit flipped.
 */
function batchOut(count: number, k: number): BatchOut {
  const buffer = new ArrayBuffer(count * (8 + k + 1));
  return {
    syndromes: new Int32Array(buffer, 0, count),
    corrected: new Int32Array(buffer, 4 * count, count),
    messages: new Uint8Array(buffer, 8 * count, count * k),
    failures: new Uint8Array(buffer, count * (8 + k), count),
  };
}

const DOUBLE_ERROR = "double error detected (non-zero syndrome, even overall parity); not corrected";

/**
 * decodeBatch for r = 3 (n = 7 or 8): one wordTable lookup per word. The word is read as two overlapping 32-bit
 * words (positions 0..3 and n − 4..n − 1) and gathered into an n-bit integer; its table entry gives the message,
 * written as one 32-bit word, the syndrome, the correction and the failure flag. No allocation per word.
 * Returns the OR of what it read.
 */
function decodeRun3(table: Int32Array, n: number, src: Bits, count: number, out: BatchOut): number {
  const { syndromes, corrected, failures } = out;
  const sv = byteView(src);
  // The messages start 4-byte aligned (batchOut) and take 4 bytes a word: whole 32-bit stores, in the platform's order.
  const mv = new Uint32Array(out.messages.buffer, out.messages.byteOffset, count);
  const little = LITTLE_ENDIAN;
  const shift = n - 4; // where the second read starts; its last `shift` bits are new
  const low = (1 << shift) - 1;
  let seen = 0;
  for (let i = 0, f = 0; i < count; i++, f += n) {
    const a = sv.getUint32(f, true);
    const b = sv.getUint32(f + shift, true);
    seen |= a | b;
    const e = table[(nibble(a) << shift) | (nibble(b) & low)]!;
    const head = SPREAD[e & 15]!;
    mv[i] = little ? head : swap32(head);
    syndromes[i] = (e >>> 8) & 15;
    corrected[i] = ((e >>> 12) & 15) - 1;
    // Only the extended (8,4) code can fail: the plain code's flags stay 0 from the allocation.
    if (n === 8) failures[i] = e >>> 16;
  }
  return seen;
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
 * even overall parity is a double error: failure, nothing changed. decodeBatch gives the same answers for
 * a whole batch: for r = 3 by one whole-word table lookup per word, otherwise by one syndrome-table lookup
 * per word nibble; its arrays are views over one buffer (see batchOut).
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

  /** One checked word: the reference decoder, bit by bit (decodeBatch's kernels must agree with it). */
  const decode = (w: Bits): DecodeResult => {
    const s = syndromeOf(w);
    const overall = extended ? weightParity(w) : 1;
    const syndrome = new Uint8Array(n - k);
    for (let j = 0; j < r; j++) syndrome[j] = (s >>> (r - 1 - j)) & 1;
    if (extended) syndrome[r] = overall;
    if (extended && s !== 0 && overall === 0) {
      return { message: w.slice(0, k), codeword: w.slice(), correctedPositions: [], syndrome, failure: true, reason: DOUBLE_ERROR };
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
  };

  /*
   * Batch decoding. Both kernels fill a BatchOut for `count` words stored back to back in src and return the
   * OR of what they read: a non-bit shows outside 0x01010101.
   */

  // share[p]: the syndrome integer of a single 1 at position p; extended, H's column then the overall parity 1.
  const share = Int32Array.from({ length: n }, (_, p) => (!extended ? column[p]! : p < base ? (column[p]! << 1) | 1 : 1));

  /**
   * Any r: the syndromes column by column over the batch so that the inner loops are long and branch-free (four
   * positions at a time through the syndrome nibble table, the last n mod 4 one at a time), then the messages
   * copied out of the received words four bits at a time, then per word the correction its syndrome names.
   */
  const decodeRun = (src: Bits, count: number, out: BatchOut): number => {
    const table = syndromeTable(share);
    const { messages, syndromes, corrected, failures } = out;
    const sv = byteView(src);
    let seen = 0;
    let p = 0;
    for (; p + 4 <= n; p += 4) {
      const row = p << 2;
      for (let i = 0, f = p; i < count; i++, f += n) {
        const w = sv.getUint32(f, true);
        seen |= w;
        syndromes[i]! ^= table[row | nibble(w)]!;
      }
    }
    for (; p < n; p++) {
      const one = share[p]!;
      for (let i = 0, f = p; i < count; i++, f += n) {
        const bit = src[f]!;
        seen |= bit;
        syndromes[i]! ^= -(bit & 1) & one;
      }
    }
    const mv = byteView(messages);
    let q = 0;
    for (; q + 4 <= k; q += 4) {
      for (let i = 0, f = q, t = q; i < count; i++, f += n, t += k) mv.setUint32(t, sv.getUint32(f, true), true);
    }
    for (; q < k; q++) {
      for (let i = 0, f = q, t = q; i < count; i++, f += n, t += k) messages[t] = src[f]!;
    }
    for (let i = 0; i < count; i++) {
      const s = syndromes[i]!;
      let at = -1;
      if (!extended) {
        if (s !== 0) at = position[s]!;
      } else if (s & 1) {
        // Odd overall parity: one error, in the overall parity bit itself when H·rᵀ is zero.
        at = s === 1 ? base : position[s >>> 1]!;
      } else if (s !== 0) {
        failures[i] = 1;
      }
      if (at >= 0 && at < k) messages[i * k + at]! ^= 1;
      corrected[i] = at;
    }
    return seen;
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
      return decode(w);
    },
    decodeBatch(received: Word, count: number): DecodeBatchResult {
      const w = checkBinaryBatch(received, count, n, name, "received", "words");
      const out = batchOut(count, k);
      // Checked after the loops so that they stay branch-free; a non-bit only spoils a result that is thrown away.
      if ((r === 3 ? decodeRun3(wordTable(n, decode), n, w, count, out) : decodeRun(w, count, out)) & NON_BITS) throw firstNonBit(w, n, "received", "received word");
      const { messages, corrected, syndromes, failures } = out;
      return { messages, corrected, syndromes, failures, reason: (i) => (failures[i] ? DOUBLE_ERROR : undefined) };
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
