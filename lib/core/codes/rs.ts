import type { Bits } from "../bits";
import { InputError } from "../errors";
import { type GaloisField, galoisField, MAX_M, MIN_M } from "../gfpm";
import * as polym from "../polym";
import type { BlockCode, DecodeResult, Word } from "./types";

/** Parameters of a Reed–Solomon code over GF(2^m). */
export interface RsOptions {
  /** Symbol size in bits, 2 ≤ m ≤ 16. */
  m: number;
  /** Length in symbols, k < n ≤ 2^m − 1 (default 2^m − 1 − shorten). */
  n?: number;
  /** Message symbols, 1 ≤ k < n. */
  k: number;
  /** b: the roots of g(x) are β^b, β^(b+1), …, β^(b+n−k−1); 0 ≤ b < 2^m − 1. Default 1. */
  firstRoot?: number;
  /** Field polynomial (bit i = coefficient of x^i); default DEFAULT_PRIMITIVE_POLYNOMIALS[m]. */
  primitivePoly?: number;
  /** β, the primitive element whose powers are the roots; default 2 (the class of x). */
  primitiveElement?: number;
  /** Leading message symbols of the full-length code fixed at zero and not sent; n = 2^m − 1 − shorten. */
  shorten?: number;
}

/** A Reed–Solomon code with its generator polynomial. */
export interface RsCode extends BlockCode {
  family: "reed-solomon";
  m: number;
  /** ⌊(n − k)/2⌋: errors corrected without erasures. */
  t: number;
  firstRoot: number;
  primitivePoly: number;
  primitiveElement: number;
  shorten: number;
  /** Coefficients of g(x) = ∏_{i<n−k} (x − β^(b+i)), highest power first (monic: the first is 1). */
  generator: number[];
  encode(message: Word): Uint16Array;
  encodeBatch(messages: Word, count: number): Uint16Array;
}

const BIT_ORDER =
  "Symbol 0 is the coefficient of x^(n−1). A codeword is the k message symbols followed by the n − k parity symbols " +
  "(the remainder of x^(n−k)·m(x) mod g(x), highest power first). A shortened code is the full-length code with its first " +
  "`shorten` message symbols fixed at 0 and not sent. As bits, each symbol is m bits, most significant bit first. " +
  "The decoder's syndrome is S_j = r(β^(b+j)) for j = 0..n−k−1.";

function checkInteger(x: number, name: string, min: number, max: number): void {
  if (!Number.isInteger(x) || x < min || x > max) throw new InputError(`${name} must be an integer from ${min} to ${max}; got ${x}`, [name]);
}

function checkSymbols(word: Word, length: number, q: number, field: string, codeName: string): void {
  if (word.length !== length) throw new InputError(`${field} has ${word.length} symbols; ${codeName} takes ${length}`, [field]);
  for (let i = 0; i < length; i++) {
    if (word[i]! >= q) throw new InputError(`${field} symbol ${i} is ${word[i]}; symbols of GF(${q}) are 0 to ${q - 1}`, [field, i]);
  }
}

function outcome(codeword: Uint16Array, k: number, syndrome: Uint16Array, failure: boolean, correctedPositions: number[], reason?: string): DecodeResult {
  return { message: codeword.slice(0, k), codeword, correctedPositions, syndrome, failure, ...(reason === undefined ? {} : { reason }) };
}

function checkErasures(erasures: number[], n: number): void {
  const seen = new Map<number, number>();
  erasures.forEach((e, j) => {
    if (!Number.isInteger(e) || e < 0 || e >= n) throw new InputError(`erasure ${j} is ${e}; positions are 0 to ${n - 1}`, ["erasures", j]);
    const first = seen.get(e);
    if (first !== undefined) throw new InputError(`position ${e} is erased twice (erasures ${first} and ${j})`, ["erasures", j]);
    seen.set(e, j);
  });
}

class ReedSolomon implements RsCode {
  readonly family = "reed-solomon" as const;
  readonly name: string;
  readonly q: number;
  readonly t: number;
  readonly dmin: number;
  readonly dminIsDesigned = false;
  readonly messagePositions: number[];
  readonly bitOrder = BIT_ORDER;
  readonly supportsErasures = true;
  readonly m: number;
  readonly primitivePoly: number;
  readonly primitiveElement: number;
  readonly shorten: number;
  readonly generator: number[];
  /** Parity symbols n − k. */
  private readonly r: number;
  /** feedbackLogs[i] = log of the coefficient of x^(r−1−i) in g(x), −1 for a zero coefficient. */
  private readonly feedbackLogs: Int32Array;
  /** For m ≤ 8, built on first use: word w of v·(g(x) − x^(n−k)) at [v·words + w], four 8-bit lanes to a word, the coefficient of x^(n−k−1) in the top lane of word 0. */
  private packedTable?: Uint32Array;
  /** The packed register, reused by every call (calls never overlap). */
  private packedReg?: Uint32Array;

  constructor(
    private readonly field: GaloisField,
    readonly n: number,
    readonly k: number,
    readonly firstRoot: number,
  ) {
    this.m = field.m;
    this.q = field.size;
    this.primitivePoly = field.poly;
    this.primitiveElement = field.generator;
    this.shorten = field.order - n;
    this.r = n - k;
    this.t = Math.floor(this.r / 2);
    this.dmin = this.r + 1;
    this.name = `Reed–Solomon (${n},${k}) over GF(2^${field.m})`;
    this.messagePositions = Array.from({ length: k }, (_, i) => i);
    let g: polym.PolyM = Uint16Array.of(1);
    for (let i = 0; i < this.r; i++) g = polym.mul(field, g, Uint16Array.of(field.exp(firstRoot + i), 1));
    this.generator = Array.from(g).reverse();
    this.feedbackLogs = Int32Array.from(this.generator.slice(1), (c) => (c === 0 ? -1 : field.logTable[c]!));
  }

  /**
   * Writes the systematic codeword of the k symbols at src[from..] to out[to..], whose parity part must be zero:
   * the division circuit of x^(n−k)·m(x) by g(x) one symbol at a time, the register kept in out[to+k..to+n)
   * highest power first, each tap a log/exp product (Lin & Costello 2004, ch. 7). Returns the OR of the
   * symbols read, ≥ q for one out of range.
   */
  private encodeLogExp(src: Word, from: number, out: Uint16Array, to: number): number {
    const { r, k, feedbackLogs } = this;
    const { expTable: exp, logTable: log, order } = this.field;
    const reg = to + k;
    const last = reg + r - 1;
    let seen = 0;
    for (let i = 0; i < k; i++) {
      const u = src[from + i]!;
      out[to + i] = u;
      seen |= u;
      // The mask keeps a symbol out of range inside the log table; such input is rejected by the caller.
      const feedback = (u ^ out[reg]!) & order;
      if (feedback === 0) {
        out.copyWithin(reg, reg + 1, last + 1);
        out[last] = 0;
        continue;
      }
      const lf = log[feedback]!;
      for (let j = reg; j < last; j++) {
        const lg = feedbackLogs[j - reg]!;
        out[j] = out[j + 1]! ^ (lg < 0 ? 0 : exp[lf + lg]!);
      }
      const lg = feedbackLogs[r - 1]!;
      out[last] = lg < 0 ? 0 : exp[lf + lg]!;
    }
    return seen;
  }

  /**
   * The same division circuit for m ≤ 8 with the register packed four symbols to a 32-bit word: a step shifts
   * the register by one lane and adds the table row of the feedback symbol, n − k taps in ⌈(n − k)/4⌉ word
   * operations (the byte-wise circuit of Lin & Costello 2004, ch. 5, with symbols for bits). Same contract
   * as encodeLogExp.
   */
  private encodePacked(src: Word, from: number, out: Uint16Array, to: number): number {
    const { r, k } = this;
    const order = this.field.order;
    const words = (r + 3) >>> 2;
    const table = (this.packedTable ??= this.buildPackedTable(words));
    const reg = (this.packedReg ??= new Uint32Array(words));
    reg.fill(0);
    let seen = 0;
    for (let i = 0; i < k; i++) {
      const u = src[from + i]!;
      out[to + i] = u;
      seen |= u;
      const row = ((u ^ (reg[0]! >>> 24)) & order) * words;
      for (let w = 0; w < words - 1; w++) reg[w] = ((reg[w]! << 8) | (reg[w + 1]! >>> 24)) ^ table[row + w]!;
      reg[words - 1] = (reg[words - 1]! << 8) ^ table[row + words - 1]!;
    }
    for (let j = 0; j < r; j++) out[to + k + j] = (reg[j >>> 2]! >>> (24 - 8 * (j & 3))) & 0xff;
    return seen;
  }

  /** Rows v·(g(x) − x^(n−k)) for every symbol v, by log/exp products. */
  private buildPackedTable(words: number): Uint32Array {
    const { expTable: exp, logTable: log, size } = this.field;
    const table = new Uint32Array(size * words);
    for (let v = 1; v < size; v++) {
      for (let j = 0; j < this.r; j++) {
        const lg = this.feedbackLogs[j]!;
        if (lg >= 0) table[v * words + (j >>> 2)]! |= exp[log[v]! + lg]! << (24 - 8 * (j & 3));
      }
    }
    return table;
  }

  /** The packed circuit where symbols fit a byte, else the log/exp one. */
  private encodeAt(src: Word, from: number, out: Uint16Array, to: number): number {
    return this.m <= 8 ? this.encodePacked(src, from, out, to) : this.encodeLogExp(src, from, out, to);
  }

  /**
   * Systematic encoding c(x) = x^(n−k)·m(x) + (x^(n−k)·m(x) mod g(x)) by a symbol-wise division circuit,
   * packed four symbols to a word for m ≤ 8, with log/exp taps above (Lin & Costello 2004, ch. 7).
   */
  encode(message: Word): Uint16Array {
    checkSymbols(message, this.k, this.q, "message", this.name);
    const out = new Uint16Array(this.n);
    this.encodeAt(message, 0, out, 0);
    return out;
  }

  /** encode for `count` messages stored back to back, by the same division circuit, validated once. */
  encodeBatch(messages: Word, count: number): Uint16Array {
    const { k, n, q } = this;
    if (!Number.isSafeInteger(count) || count < 0) throw new InputError(`count must be a non-negative integer; got ${count}`, ["count"]);
    if (messages.length !== count * k) throw new InputError(`messages has ${messages.length} symbols; ${count} messages of ${this.name} take ${count * k}`, ["messages"]);
    const out = new Uint16Array(count * n);
    let seen = 0;
    for (let i = 0; i < count; i++) seen |= this.encodeAt(messages, i * k, out, i * n);
    // q is a power of two, so the OR of the symbols reaches q exactly when one of them does.
    if (seen >= q) {
      const f = messages.findIndex((v) => v >= q);
      const j = Math.floor(f / k);
      throw new InputError(`message ${j} symbol ${f - j * k} is ${messages[f]}; symbols of GF(${q}) are 0 to ${q - 1}`, ["messages", j, f - j * k]);
    }
    return out;
  }

  /**
   * Errors-and-erasures decoding for 2·errors + erasures ≤ n − k: syndromes S_j = r(β^(b+j)) by Horner,
   * erasure locator Γ(x) = ∏ (1 − X_e x), Berlekamp–Massey started from Γ, Chien search, and Forney's
   * Y = X^(1−b)·Ω(X^(−1)) / Λ'(X^(−1)) with Ω = S·Λ mod x^(n−k). Failure when deg Λ ≠ L, 2·errors + erasures
   * > n − k, or Λ lacks deg Λ distinct roots among the n positions (Lin & Costello 2004, ch. 7; Forney 1965).
   */
  decode(received: Word, erasures: number[] = []): DecodeResult {
    const { field, n, k, r, firstRoot } = this;
    checkSymbols(received, n, this.q, "received", this.name);
    checkErasures(erasures, n);
    const { expTable: exp, logTable: log, order } = field;
    const codeword = new Uint16Array(received);

    const syndrome = new Uint16Array(r);
    let nonzero = false;
    for (let j = 0; j < r; j++) {
      const step = (firstRoot + j) % order;
      let v = 0;
      for (let i = 0; i < n; i++) v = (v === 0 ? 0 : exp[log[v]! + step]!) ^ codeword[i]!;
      syndrome[j] = v;
      if (v !== 0) nonzero = true;
    }
    const rho = erasures.length;
    if (!nonzero && rho === 0) return outcome(codeword, k, syndrome, false, []);
    if (rho > r) return outcome(codeword, k, syndrome, true, [], `${rho} erasures are more than n − k = ${r}`);

    // Γ(x) = ∏ (1 + X_e x) with X_e = β^(n−1−e), built in place.
    const gamma = new Uint16Array(rho + 1);
    gamma[0] = 1;
    erasures.forEach((e, j) => {
      const lx = n - 1 - e;
      for (let i = j + 1; i >= 1; i--) if (gamma[i - 1] !== 0) gamma[i]! ^= exp[log[gamma[i - 1]!]! + lx]!;
    });

    const { locator, length } = polym.berlekampMassey(field, syndrome, gamma);
    const deg = polym.degree(locator);
    const errors = length - rho;
    if (2 * errors + rho > r) {
      return outcome(codeword, k, syndrome, true, [], `uncorrectable: locating ${errors} errors beside ${rho} erasures needs 2·${errors} + ${rho} ≤ n − k = ${r}`);
    }
    if (deg !== length) return outcome(codeword, k, syndrome, true, [], `uncorrectable: the error locator has degree ${deg} but LFSR length ${length}`);
    const roots = polym.chienSearch(field, locator, n);
    if (roots.length !== deg) {
      return outcome(codeword, k, syndrome, true, [], `uncorrectable: the error locator of degree ${deg} has ${roots.length} distinct roots among the ${n} positions`);
    }

    // Ω_i = Σ_{j≤i} Λ_j S_(i−j) for i < deg Λ (deg Ω < deg Λ ≤ n − k).
    const omega = new Uint16Array(deg);
    for (let i = 0; i < deg; i++) {
      let v = 0;
      for (let j = 0; j <= i; j++) if (locator[j] !== 0 && syndrome[i - j] !== 0) v ^= exp[log[locator[j]!]! + log[syndrome[i - j]!]!]!;
      omega[i] = v;
    }
    const slope = polym.derivative(locator);
    const horner = (p: polym.PolyM, lx: number): number => {
      let v = 0;
      for (let i = p.length - 1; i >= 0; i--) v = (v === 0 ? 0 : exp[log[v]! + lx]!) ^ p[i]!;
      return v;
    };
    const erased = new Set(erasures);
    const offset = (((1 - firstRoot) % order) + order) % order;
    const corrected: number[] = [];
    for (const p of roots) {
      const lxInv = p === 0 ? 0 : order - p;
      const num = horner(omega, lxInv);
      const pos = n - 1 - p;
      if (num !== 0) {
        // The roots are simple, so Λ'(X^(−1)) ≠ 0.
        const den = horner(slope, lxInv);
        codeword[pos]! ^= exp[(log[num]! + ((p * offset) % order) + order - log[den]!) % order]!;
      }
      if (num !== 0 || erased.has(pos)) corrected.push(pos);
    }
    return outcome(codeword, k, syndrome, false, corrected.sort((a, b) => a - b));
  }
}

/**
 * Reed–Solomon code over GF(2^m) with generator g(x) = ∏_{i=0}^{n−k−1} (x − β^(b+i)); dmin = n − k + 1 (MDS);
 * shortened when n < 2^m − 1 (Lin & Costello 2004, ch. 7). InputError (paths m, n, k, firstRoot, primitivePoly,
 * primitiveElement, shorten) for bad parameters.
 */
export function rs(options: RsOptions): RsCode {
  const { m, k, firstRoot = 1, primitivePoly, primitiveElement } = options;
  const field = galoisField(m, primitivePoly, primitiveElement);
  const order = field.order;
  if (options.n !== undefined) checkInteger(options.n, "n", 2, order);
  if (options.shorten !== undefined) checkInteger(options.shorten, "shorten", 0, order - 2);
  if (options.n !== undefined && options.shorten !== undefined && options.n + options.shorten !== order) {
    throw new InputError(`n = ${options.n} and shorten = ${options.shorten} disagree: n + shorten must be 2^${m} − 1 = ${order}`, ["shorten"]);
  }
  const n = options.n ?? order - (options.shorten ?? 0);
  if (!Number.isInteger(k) || k < 1 || k >= n) {
    const where = options.n === undefined && options.shorten !== undefined ? ` (n = 2^${m} − 1 − shorten)` : "";
    throw new InputError(`k must be an integer from 1 to n − 1 = ${n - 1}${where}; got ${k}`, ["k"]);
  }
  checkInteger(firstRoot, "firstRoot", 0, order - 1);
  return new ReedSolomon(field, n, k, firstRoot);
}

function checkM(m: number): void {
  if (!Number.isInteger(m) || m < MIN_M || m > MAX_M) throw new InputError(`m must be an integer from ${MIN_M} to ${MAX_M}; got ${m}`, ["m"]);
}

/** Bits to m-bit symbols, most significant bit first; the length must be a multiple of m. */
export function bitsToSymbols(bits: Bits, m: number): Uint16Array {
  checkM(m);
  if (bits.length % m !== 0) throw new InputError(`${bits.length} bits are not a whole number of ${m}-bit symbols`);
  const out = new Uint16Array(bits.length / m);
  for (let i = 0; i < bits.length; i++) {
    if (bits[i]! > 1) throw new InputError(`bit ${i} is ${bits[i]}; only 0 and 1 are allowed`, [i]);
    out[(i / m) | 0] = (out[(i / m) | 0]! << 1) | bits[i]!;
  }
  return out;
}

/** m-bit symbols to bits, most significant bit first. */
export function symbolsToBits(symbols: Word, m: number): Bits {
  checkM(m);
  const out = new Uint8Array(symbols.length * m);
  for (let i = 0; i < symbols.length; i++) {
    const v = symbols[i]!;
    if (v >= 1 << m) throw new InputError(`symbol ${i} is ${v}; ${m}-bit symbols are 0 to ${(1 << m) - 1}`, [i]);
    for (let b = 0; b < m; b++) out[i * m + b] = (v >>> (m - 1 - b)) & 1;
  }
  return out;
}
