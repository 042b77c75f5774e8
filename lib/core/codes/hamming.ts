import type { Bits } from "../bits";
import { InputError } from "../errors";
import { checkBinaryWord, rejectErasures } from "../gf2";
import type { BlockCode, DecodeResult, Word } from "./types";

/** Largest r accepted: n = 2^16 − 1 = 65535 bits and a 2^16-entry syndrome table. */
export const MAX_HAMMING_R = 16;
/** generatorRows() is offered up to this n (r ≤ 10); beyond, the k × n matrix would not fit in memory sensibly. */
const MAX_GENERATOR_N = 1024;

/**
 * The Hamming code of redundancy r, n = 2^r − 1, k = n − r, dmin = 3, and with `extended` the
 * (2^r, 2^r − 1 − r) code with an overall parity bit, dmin = 4 (Hamming 1950; MacWilliams & Sloane 1977,
 * ch. 1). Systematic [I_k | P]: message bits first, then the r parity bits, then (extended) the overall
 * parity bit. Column j of H is an r-bit number: message bit i gets the i-th integer in [3, 2^r) that is
 * not a power of two, parity bit j (position k + j) gets 2^(r−1−j). The syndrome is H·rᵀ written
 * most significant bit first (plus, extended, the overall parity of all n bits as a last bit), so a
 * single error at position p gives the column number of p. Decoding corrects one error by a syndrome
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

  const encode = (message: Word): Bits => {
    const m = checkBinaryWord(message, k, "message", name);
    const c = new Uint8Array(n);
    c.set(m);
    const s = syndromeOf(c);
    for (let j = 0; j < r; j++) c[k + j] = (s >>> (r - 1 - j)) & 1;
    if (extended) c[base] = weightParity(c);
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
