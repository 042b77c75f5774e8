import type { Bits } from "../bits";
import { InputError } from "../errors";
import { checkBinaryWord, rejectErasures } from "../gf2";
import { type GaloisField, galoisField } from "../gfpm";
import * as poly2 from "../poly2";
import * as polym from "../polym";
import { checkBinaryBatch, firstNonBit } from "./hamming";
import type { BlockCode, DecodeResult, Word } from "./types";

/** Parameters of a binary narrow-sense primitive BCH code. */
export interface BchOptions {
  /** Field GF(2^m), 2 ≤ m ≤ 16; the full length is 2^m − 1. */
  m: number;
  /** Designed number of correctable errors: the roots include α, α^2, …, α^(2t). */
  t: number;
  /** Leading message bits fixed at zero and not sent: n = 2^m − 1 − shorten. */
  shorten?: number;
  /** Field polynomial (bit i = coefficient of x^i); default DEFAULT_PRIMITIVE_POLYNOMIALS[m]. */
  primitivePoly?: number;
}

/** generatorRows() is offered while k·n is at most this (a k × n matrix of bytes). */
export const MAX_GENERATOR_ENTRIES = 1 << 22;

/** A binary BCH code with its generator polynomial. */
export interface BchCode extends BlockCode {
  family: "bch";
  m: number;
  /** Field polynomial in use. */
  primitivePoly: number;
  shorten: number;
  /** Errors the decoder corrects: ⌊(δ − 1)/2⌋ for the Bose distance δ = dmin, at least the requested t. */
  t: number;
  /** 2t + 1 for the requested t. */
  designedDistance: number;
  /** g(x) with bit i = coefficient of x^i. */
  generator: bigint;
  /** g(x) in octal, the way BCH tables print it, e.g. "721". */
  generatorOctal: string;
  /** Exponents of the terms of g(x), highest first. */
  generatorExponents: number[];
  encode(message: Word): Bits;
  encodeBatch(messages: Word, count: number): Bits;
}

const BIT_ORDER =
  "Bit 0 is the coefficient of x^(n−1). A codeword is the k message bits (bit 0 = highest power of m(x)) followed by " +
  "the n − k parity bits: the remainder of x^(n−k)·m(x) mod g(x), highest power first. A shortened code is the full-length " +
  "code with its first `shorten` message bits fixed at 0 and not sent. The decoder's syndrome is r(x) mod g(x) in the same order.";

function checkInteger(x: number, name: string, min: number): void {
  if (!Number.isInteger(x) || x < min) throw new InputError(`${name} must be an integer of at least ${min}; got ${x}`, [name]);
}

function outcome(codeword: Bits, k: number, syndrome: Bits, failure: boolean, correctedPositions: number[], reason?: string): DecodeResult {
  return { message: codeword.slice(0, k), codeword, correctedPositions, syndrome, failure, ...(reason === undefined ? {} : { reason }) };
}

class Bch implements BchCode {
  readonly family = "bch" as const;
  readonly name: string;
  readonly n: number;
  readonly k: number;
  readonly q = 2;
  readonly dmin: number;
  readonly dminIsDesigned = true;
  readonly messagePositions: number[];
  readonly bitOrder = BIT_ORDER;
  readonly supportsErasures = false;
  readonly generatorOctal: string;
  readonly generatorExponents: number[];
  readonly designedDistance: number;
  readonly primitivePoly: number;
  readonly m: number;
  readonly t: number;
  /** The systematic k × n generator matrix, offered while k·n ≤ MAX_GENERATOR_ENTRIES. */
  readonly generatorRows?: () => Bits[];
  /** Parity bits n − k = deg g. */
  private readonly r: number;
  /** 32-bit words of the parity register. */
  private readonly words: number;
  /** table[v·words + w]: word w of v(x)·x^r mod g(x) for a byte v, left-aligned (bit 31 of word 0 = coefficient of x^(r−1)). */
  private readonly table: Uint32Array;
  /** The division register, reused by every call (calls never overlap). */
  private readonly reg: Uint32Array;
  /** Syndromes S_1..S_2t of the word being decoded, reused likewise. */
  private readonly sums: Uint16Array;

  constructor(
    private readonly field: GaloisField,
    requestedT: number,
    readonly shorten: number,
    readonly generator: bigint,
    boseDistance: number,
  ) {
    this.m = field.m;
    this.primitivePoly = field.poly;
    this.r = poly2.degree(generator);
    this.n = field.order - shorten;
    this.k = this.n - this.r;
    this.t = (boseDistance - 1) / 2;
    this.dmin = boseDistance;
    this.designedDistance = 2 * requestedT + 1;
    this.name = `BCH (${this.n},${this.k})`;
    this.messagePositions = Array.from({ length: this.k }, (_, i) => i);
    this.generatorOctal = generator.toString(8);
    this.generatorExponents = poly2.exponents(generator);
    this.words = Math.ceil(this.r / 32);
    this.table = this.byteTable();
    this.reg = new Uint32Array(this.words);
    this.sums = new Uint16Array(2 * this.t);
    if (this.k * this.n <= MAX_GENERATOR_ENTRIES) this.generatorRows = () => this.systematicRows();
  }

  /** g(x) − x^r left-aligned in the register: the feedback taps of the division circuit. */
  private taps(): Uint32Array {
    const taps = new Uint32Array(this.words);
    for (const e of this.generatorExponents) {
      if (e === this.r) continue;
      const j = this.r - 1 - e;
      taps[j >>> 5]! |= 1 << (31 - (j & 31));
    }
    return taps;
  }

  /** Register ← register·x mod g, optionally adding x^r·bit: one step of the division circuit (Lin & Costello 2004, ch. 5). */
  private step(reg: Uint32Array, taps: Uint32Array, bit: number): void {
    const feedback = (reg[0]! >>> 31) ^ bit;
    for (let w = 0; w < this.words - 1; w++) reg[w] = (reg[w]! << 1) | (reg[w + 1]! >>> 31);
    reg[this.words - 1]! <<= 1;
    if (feedback) for (let w = 0; w < this.words; w++) reg[w]! ^= taps[w]!;
  }

  private byteTable(): Uint32Array {
    const taps = this.taps();
    const table = new Uint32Array(256 * this.words);
    const reg = new Uint32Array(this.words);
    for (let v = 0; v < 256; v++) {
      reg.fill(0);
      for (let b = 7; b >= 0; b--) this.step(reg, taps, (v >>> b) & 1);
      table.set(reg, v * this.words);
    }
    return table;
  }

  /**
   * x^r·u(x) mod g(x) into `reg` for the k bits u at src[from..], copied to out[to..] on the way, a byte at a
   * time: with R = R_hi·x^(r−8) + R_lo, (R·x^8 + B·x^r) mod g = R_lo·x^8 + ((R_hi + B)·x^r mod g), one table
   * row per byte (Lin & Costello 2004, ch. 5). Returns the OR of the bits read, > 1 for a non-bit.
   */
  private divide(src: Bits, from: number, out: Bits, to: number): number {
    const { words, table, reg, k } = this;
    reg.fill(0);
    let seen = 0;
    // Leading zero bits leave a zero register unchanged, so the first byte takes the k mod 8 leftover bits.
    for (let i = 0, end = k & 7 || 8; i < k; end += 8) {
      let byte = 0;
      for (; i < end; i++) {
        const b = src[from + i]!;
        out[to + i] = b;
        seen |= b;
        byte = (byte << 1) | b;
      }
      // The mask keeps a non-bit inside the table; such input is rejected by the caller.
      const row = (((reg[0]! >>> 24) ^ byte) & 255) * words;
      for (let w = 0; w < words - 1; w++) reg[w] = ((reg[w]! << 8) | (reg[w + 1]! >>> 24)) ^ table[row + w]!;
      reg[words - 1] = (reg[words - 1]! << 8) ^ table[row + words - 1]!;
    }
    return seen;
  }

  /** Writes the systematic codeword of the k bits at src[from..] to out[to..]; returns the OR of the bits read. */
  private encodeAt(src: Bits, from: number, out: Bits, to: number): number {
    const seen = this.divide(src, from, out, to);
    const { reg, r, k } = this;
    for (let j = 0; j < r; j++) out[to + k + j] = (reg[j >>> 5]! >>> (31 - (j & 31))) & 1;
    return seen;
  }

  /** Systematic encoding c(x) = x^(n−k)·m(x) + (x^(n−k)·m(x) mod g(x)) with a byte-wise division circuit (Lin & Costello 2004, ch. 5). */
  encode(message: Word): Bits {
    const out = new Uint8Array(this.n);
    this.encodeAt(checkBinaryWord(message, this.k, "message", this.name), 0, out, 0);
    return out;
  }

  /** encode for `count` messages stored back to back, by the same byte-wise division circuit, validated once. */
  encodeBatch(messages: Word, count: number): Bits {
    const { k, n } = this;
    const m = checkBinaryBatch(messages, count, k, this.name);
    const out = new Uint8Array(count * n);
    let seen = 0;
    for (let i = 0; i < count; i++) seen |= this.encodeAt(m, i * k, out, i * n);
    if (seen > 1) throw firstNonBit(m, k);
    return out;
  }

  /**
   * Bounded-distance decoding up to t errors: syndromes S_j = r(α^j) = (r mod g)(α^j), j = 1..2t, with
   * S_2j = S_j², Berlekamp–Massey for Λ(x), Chien search for its roots; failure when deg Λ > t, deg Λ ≠ L,
   * or Λ does not have deg Λ distinct roots among the code's positions (Lin & Costello 2004, ch. 6).
   */
  decode(received: Word, erasures?: number[]): DecodeResult {
    const { field, r, k, n, t, reg } = this;
    const w = received instanceof Uint8Array && received.length === n ? received : checkBinaryWord(received, n, "received", this.name);
    const codeword = new Uint8Array(n);
    let seen = this.divide(w, 0, codeword, 0);
    // r(x) mod g(x) = (x^r·u(x) mod g(x)) + received parity, for u the first k bits.
    const syndrome = new Uint8Array(r);
    let nonzero = 0;
    for (let j = 0; j < r; j++) {
      const b = w[k + j]!;
      codeword[k + j] = b;
      seen |= b;
      const bit = ((reg[j >>> 5]! >>> (31 - (j & 31))) & 1) ^ b;
      syndrome[j] = bit;
      nonzero |= bit;
    }
    if (seen > 1) checkBinaryWord(w, n, "received", this.name);
    rejectErasures(erasures, this.name);
    if (nonzero === 0) return outcome(codeword, k, syndrome, false, []);

    const { expTable: exp, order } = field;
    // S[j − 1] = S_j; g(α^j) = 0 for j ≤ 2t, so the remainder gives the same values as r(x).
    // Remainder bit i is the coefficient of x^(r−1−i), so its term is α^((r−1−i)·j), stepped down by j.
    const s = this.sums;
    for (let j = 1; j < 2 * t; j += 2) {
      let v = 0;
      for (let i = 0, e = ((r - 1) * j) % order; i < r; i++) {
        if (syndrome[i]) v ^= exp[e]!;
        e -= j;
        if (e < 0) e += order;
      }
      s[j - 1] = v;
    }
    for (let j = 2; j <= 2 * t; j += 2) s[j - 1] = field.mul(s[j / 2 - 1]!, s[j / 2 - 1]!);

    const { locator, length } = polym.berlekampMassey(field, s);
    const deg = polym.degree(locator);
    if (length > t) return outcome(codeword, k, syndrome, true, [], `more than t = ${t} errors: the shortest error-locating LFSR has length ${length}`);
    if (deg !== length) return outcome(codeword, k, syndrome, true, [], `uncorrectable: the error locator has degree ${deg} but LFSR length ${length}`);
    const roots = polym.chienSearch(field, locator, n);
    if (roots.length !== deg) {
      return outcome(codeword, k, syndrome, true, [], `uncorrectable: the error locator of degree ${deg} has ${roots.length} distinct roots among the ${n} positions`);
    }
    // With deg Λ ≤ t distinct roots, S_2j = S_j² forces every error value to be 1, so flipping these
    // bits always yields a codeword: no separate syndrome re-check is needed.
    const positions = roots.map((p) => n - 1 - p).sort((a, b) => a - b);
    for (const i of positions) codeword[i]! ^= 1;
    return outcome(codeword, k, syndrome, false, positions);
  }

  /** Systematic k × n generator matrix: row i = x^(k−1−i+r) + (x^(k−1−i+r) mod g(x)), using x^(e+1) mod g = x·(x^e mod g) (Lin & Costello 2004, ch. 5). */
  private systematicRows(): Bits[] {
    const { k, n, r } = this;
    const taps = this.taps();
    const reg = Uint32Array.from(taps); // x^r mod g = g − x^r
    const rows: Bits[] = new Array<Bits>(k);
    for (let i = k - 1; i >= 0; i--) {
      const row = new Uint8Array(n);
      row[i] = 1;
      for (let j = 0; j < r; j++) row[k + j] = (reg[j >>> 5]! >>> (31 - (j & 31))) & 1;
      rows[i] = row;
      this.step(reg, taps, 0);
    }
    return rows;
  }
}

/**
 * Binary narrow-sense primitive BCH code: g(x) = LCM of the minimal polynomials of α, α^2, …, α^(2t),
 * i.e. the product of the distinct minimal polynomials of α^j over odd j < 2t; n = 2^m − 1 − shorten,
 * k = n − deg g (Lin & Costello 2004, ch. 6). InputError (paths m, t, shorten, primitivePoly) for bad parameters.
 */
export function bch(options: BchOptions): BchCode {
  const { m, t, shorten = 0, primitivePoly } = options;
  const field = galoisField(m, primitivePoly);
  const order = field.order;
  checkInteger(t, "t", 1);
  // 2t ≥ 2^m − 1 would put α^0 = 1 among the roots and g(x) = x^(2^m−1) − 1, leaving k = 0.
  const maxT = (order - 1) / 2;
  if (t > maxT) throw new InputError(`t = ${t} leaves no message bits (k ≤ 0) in GF(2^${m}); t can be at most ${maxT}`, ["t"]);
  checkInteger(shorten, "shorten", 0);

  const isRoot = new Uint8Array(order + 1);
  let generator = 1n;
  for (let j = 1; j < 2 * t; j += 2) {
    if (isRoot[j]) continue;
    for (const e of poly2.cyclotomicCoset(j, m)) isRoot[e] = 1;
    generator = poly2.mul(generator, poly2.minimalPolynomial(field, j));
  }
  // Bose distance: the first j with α^j not a root (it is odd, since the roots are closed under doubling).
  let bose = 1;
  while (isRoot[bose]) bose++;

  const fullK = order - poly2.degree(generator);
  if (shorten >= fullK) {
    throw new InputError(`shorten = ${shorten} leaves no message bits: BCH (${order},${fullK}) can be shortened by at most ${fullK - 1}`, ["shorten"]);
  }
  return new Bch(field, t, shorten, generator, bose);
}
