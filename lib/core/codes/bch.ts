import type { Bits } from "../bits";
import { InputError } from "../errors";
import { checkBinaryWord, rejectErasures } from "../gf2";
import { type GaloisField, galoisField } from "../gfpm";
import * as poly2 from "../poly2";
import * as polym from "../polym";
import { byteView, checkBinaryBatch, firstNonBit, NON_BITS, nibble, SPREAD } from "./hamming";
import type { BlockCode, DecodeResult, Word } from "./types";

// Local bindings of the shared word helpers: a transpiled import can be a getter, too slow to call per byte.
const gather = nibble;
const spread = SPREAD;

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

/**
 * A decoder's result over one buffer laid out [codeword (n) | message (k) | syndrome (r)], codeword and
 * syndrome already filled: one allocation instead of three, since a typed array's own buffer costs far more
 * than a view of a shared one. The message is copied from the codeword's first k bits.
 */
function outcome(buffer: Bits, n: number, k: number, failure: boolean, correctedPositions: number[], reason?: string): DecodeResult {
  buffer.copyWithin(n, 0, k);
  const message = buffer.subarray(n, n + k);
  const codeword = buffer.subarray(0, n);
  const syndrome = buffer.subarray(n + k);
  return reason === undefined ? { message, codeword, correctedPositions, syndrome, failure } : { message, codeword, correctedPositions, syndrome, failure, reason };
}

/** Syndromes S_1..S_2t (sums), then Λ and the two other registers of Berlekamp's algorithm, 2t + 1 coefficients each. */
interface DecoderScratch {
  sums: Uint16Array;
  lambda: Uint16Array;
  prev: Uint16Array;
  spare: Uint16Array;
}

const quadraticTables = new WeakMap<GaloisField, Int32Array>();

/** solutions[c]: a y with y² + y = c in GF(2^m), the other being y + 1, or −1 when there is none; listed from every even y once per field. */
function quadraticSolutions(field: GaloisField): Int32Array {
  const hit = quadraticTables.get(field);
  if (hit) return hit;
  const solutions = new Int32Array(field.size).fill(-1);
  for (let y = 0; y < field.size; y += 2) solutions[field.mul(y, y) ^ y] = y;
  quadraticTables.set(field, solutions);
  return solutions;
}

/**
 * What Chien search reports for an error locator of degree 1 or 2 (ascending p < n with Λ(β^(−p)) = 0,
 * distinct), solved in closed form: 1 + Λ1·x vanishes at x = 1/Λ1, so p = log Λ1; for 1 + Λ1·x + Λ2·x²,
 * x = (Λ1/Λ2)·y turns it into y² + y = Λ2/Λ1², read from `solutions` (quadraticSolutions), and Λ1 = 0
 * leaves the one double root x = Λ2^(−1/2) (Berlekamp, Rumsey & Solomon 1967).
 */
function smallLocatorRoots(field: GaloisField, solutions: Int32Array, locator: polym.PolyM, n: number): number[] {
  const { logTable: log, order } = field;
  const l1 = locator[1] ?? 0;
  const l2 = locator[2] ?? 0;
  let p = -1;
  let q = -1;
  if (l2 === 0) {
    p = log[l1]!;
  } else if (l1 === 0) {
    // X = √Λ2: halve the log modulo the odd order.
    const l = log[l2]!;
    p = l % 2 === 0 ? l / 2 : (l + order) / 2;
  } else {
    const y = solutions[field.div(l2, field.mul(l1, l1))]!;
    if (y >= 0) {
      // p = −log x = log Λ2 − log Λ1 − log y, for y and y + 1 (neither is 0 or 1, since Λ2 ≠ 0).
      const base = log[l2]! + 2 * order - log[l1]!;
      const a = (base - log[y]!) % order;
      const b = (base - log[y ^ 1]!) % order;
      p = Math.min(a, b);
      q = Math.max(a, b);
    }
  }
  const roots: number[] = [];
  if (p >= 0 && p < n) roots.push(p);
  if (q >= 0 && q < n) roots.push(q);
  return roots;
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
  /** Decoder scratch, made on the first decode and reused likewise. */
  private scratch?: DecoderScratch;
  /** quadraticSolutions(field), fetched on the first locator of degree 2. */
  private quadratic?: Int32Array;

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

  /** reg ← (reg·x^8 + byte·x^r) mod g(x): with R = R_hi·x^(r−8) + R_lo, that is R_lo·x^8 + ((R_hi + byte)·x^r mod g), one table row (Lin & Costello 2004, ch. 5). */
  private shiftIn(byte: number): void {
    const { words, table, reg } = this;
    const row = ((reg[0]! >>> 24) ^ byte) * words;
    for (let w = 0; w < words - 1; w++) reg[w] = ((reg[w]! << 8) | (reg[w + 1]! >>> 24)) ^ table[row + w]!;
    reg[words - 1] = (reg[words - 1]! << 8) ^ table[row + words - 1]!;
  }

  /**
   * For each of `count` words at src (one every `stride` entries): x^r·u(x) mod g(x) for its first k bits u,
   * by a byte-wise division circuit fed eight bits at a time from two 32-bit reads (Lin & Costello 2004,
   * ch. 5), with u copied to out (one word every n entries) and, with `parity`, the remainder after it, four
   * bits to a 32-bit write. The last remainder stays in `reg`. Returns the OR of what was read: a non-bit
   * shows outside 0x01010101.
   */
  private divideEach(src: Bits, stride: number, out: Bits, count: number, parity: boolean): number {
    const { k, n, r, reg, table } = this;
    const sv = byteView(src);
    const ov = byteView(out);
    // Leading zero bits leave a zero register unchanged, so the first k mod 8 bits make a byte of their own.
    const head = k & 7;
    // A register of one word (r ≤ 32, most codes) is stepped in a local; wider ones through shiftIn.
    const narrow = this.words === 1;
    let seen = 0;
    for (let i = 0, from = 0, to = 0; i < count; i++, from += stride, to += n) {
      reg.fill(0);
      let byte = 0;
      for (let j = 0; j < head; j++) {
        const b = src[from + j]!;
        out[to + j] = b;
        seen |= b;
        byte = (byte << 1) | b;
      }
      // The mask keeps a non-bit inside the table; such input is rejected by the caller.
      if (head > 0) this.shiftIn(byte & 255);
      let low = reg[0]!;
      for (let f = from + head, t = to + head, end = from + k; f < end; f += 8, t += 8) {
        const hi = sv.getUint32(f, true);
        const lo = sv.getUint32(f + 4, true);
        ov.setUint32(t, hi, true);
        ov.setUint32(t + 4, lo, true);
        seen |= hi | lo;
        const v = (gather(hi) << 4) | gather(lo);
        if (narrow) low = (low << 8) ^ table[(low >>> 24) ^ v]!;
        else this.shiftIn(v);
      }
      if (narrow) reg[0] = low;
      if (!parity) continue;
      let j = 0;
      for (; j + 4 <= r; j += 4) ov.setUint32(to + k + j, spread[(reg[j >>> 5]! >>> (28 - (j & 31))) & 15]!, true);
      for (; j < r; j++) out[to + k + j] = (reg[j >>> 5]! >>> (31 - (j & 31))) & 1;
    }
    return seen;
  }

  /** Systematic encoding c(x) = x^(n−k)·m(x) + (x^(n−k)·m(x) mod g(x)) with a byte-wise division circuit (Lin & Costello 2004, ch. 5). */
  encode(message: Word): Bits {
    const u = checkBinaryWord(message, this.k, "message", this.name);
    const out = new Uint8Array(this.n);
    this.divideEach(u, this.k, out, 1, true);
    return out;
  }

  /** encode for `count` messages stored back to back, by the same byte-wise division circuit, validated once. */
  encodeBatch(messages: Word, count: number): Bits {
    const m = checkBinaryBatch(messages, count, this.k, this.name);
    const out = new Uint8Array(count * this.n);
    if (this.divideEach(m, this.k, out, count, true) & NON_BITS) throw firstNonBit(m, this.k);
    return out;
  }

  /**
   * Bounded-distance decoding up to t errors: syndromes S_j = r(α^j) = (r mod g)(α^j), j = 1..2t, with
   * S_2j = S_j², Berlekamp's algorithm for Λ(x), its roots in closed form for deg Λ ≤ 2 and by Chien search
   * above; failure when deg Λ > t, deg Λ ≠ L, or Λ does not have deg Λ distinct roots among the code's
   * positions (Lin & Costello 2004, ch. 6). A zero remainder returns at once.
   */
  decode(received: Word, erasures?: number[]): DecodeResult {
    const { field, r, k, n, t, reg } = this;
    const w = received instanceof Uint8Array && received.length === n ? received : checkBinaryWord(received, n, "received", this.name);
    // The codeword starts as a copy of the word; the syndrome goes at n + k (see outcome).
    const buffer = new Uint8Array(n + k + r);
    let seen = this.divideEach(w, n, buffer, 1, false);
    // r(x) mod g(x) = (x^r·u(x) mod g(x)) + received parity, for u the first k bits.
    let nonzero = 0;
    for (let j = 0, at = n + k; j < r; j++) {
      const b = w[k + j]!;
      buffer[k + j] = b;
      seen |= b;
      const bit = ((reg[j >>> 5]! >>> (31 - (j & 31))) & 1) ^ b;
      buffer[at + j] = bit;
      nonzero |= bit;
    }
    if (seen & NON_BITS) checkBinaryWord(w, n, "received", this.name);
    rejectErasures(erasures, this.name);
    if (nonzero === 0) return outcome(buffer, n, k, false, []);

    const { expTable: exp, order } = field;
    // S[j − 1] = S_j; g(α^j) = 0 for j ≤ 2t, so the remainder gives the same values as r(x).
    // Remainder bit i is the coefficient of x^(r−1−i), so its term is α^((r−1−i)·j), stepped down by j.
    const scratch = (this.scratch ??= {
      sums: new Uint16Array(2 * t),
      lambda: new Uint16Array(2 * t + 1),
      prev: new Uint16Array(2 * t + 1),
      spare: new Uint16Array(2 * t + 1),
    });
    const s = scratch.sums;
    for (let j = 1; j < 2 * t; j += 2) {
      let v = 0;
      for (let i = n + k, end = i + r, e = ((r - 1) * j) % order; i < end; i++) {
        if (buffer[i]) v ^= exp[e]!;
        e -= j;
        if (e < 0) e += order;
      }
      s[j - 1] = v;
    }
    for (let j = 2; j <= 2 * t; j += 2) s[j - 1] = field.mul(s[j / 2 - 1]!, s[j / 2 - 1]!);

    const length = this.binaryBerlekamp(scratch);
    const locator = scratch.lambda;
    const deg = polym.degree(locator);
    if (length > t) return outcome(buffer, n, k, true, [], `more than t = ${t} errors: the shortest error-locating LFSR has length ${length}`);
    if (deg !== length) return outcome(buffer, n, k, true, [], `uncorrectable: the error locator has degree ${deg} but LFSR length ${length}`);
    const roots = deg <= 2 ? smallLocatorRoots(field, (this.quadratic ??= quadraticSolutions(field)), locator, n) : polym.chienSearch(field, locator, n);
    if (roots.length !== deg) {
      return outcome(buffer, n, k, true, [], `uncorrectable: the error locator of degree ${deg} has ${roots.length} distinct roots among the ${n} positions`);
    }
    // With deg Λ ≤ t distinct roots, S_2j = S_j² forces every error value to be 1, so flipping these
    // bits always yields a codeword: no separate syndrome re-check is needed.
    // Roots come ascending, so their positions n − 1 − p come out ascending backwards.
    const positions: number[] = [];
    for (let i = roots.length - 1; i >= 0; i--) positions.push(n - 1 - roots[i]!);
    for (const i of positions) buffer[i]! ^= 1;
    return outcome(buffer, n, k, false, positions);
  }

  /**
   * Berlekamp's algorithm for binary BCH codes: the shortest LFSR Λ(x) = 1 + Λ_1 x + … + Λ_L x^L generating
   * S_1..S_2t, stepping through the odd syndromes only, since S_2j = S_j² makes every other discrepancy zero;
   * so the same Λ and L as the general Berlekamp–Massey (polym.berlekampMassey) in t steps, with no
   * allocation (Berlekamp 1968; Lin & Costello 2004, ch. 6). Leaves Λ in scratch.lambda and returns L.
   */
  private binaryBerlekamp(scratch: DecoderScratch): number {
    const { expTable: exp, logTable: log, order } = this.field;
    const { sums: s, lambda: c } = scratch;
    let { prev: b, spare } = scratch;
    const size = c.length;
    c.fill(0);
    b.fill(0);
    c[0] = 1;
    b[0] = 1;
    let length = 0;
    let shift = 1;
    let last = 1;
    for (let r = 0; r < s.length; r += 2) {
      let d = s[r]!;
      for (let i = 1; i <= length; i++) {
        const ci = c[i]!;
        const si = s[r - i]!;
        if (ci !== 0 && si !== 0) d ^= exp[log[ci]! + log[si]!]!;
      }
      if (d !== 0) {
        let scale = log[d]! + order - log[last]!;
        if (scale >= order) scale -= order;
        const lengthens = 2 * length <= r;
        if (lengthens) spare.set(c);
        // Λ ← Λ − (d / d_last)·x^shift·B
        for (let i = 0; i + shift < size; i++) if (b[i] !== 0) c[i + shift]! ^= exp[scale + log[b[i]!]!]!;
        if (lengthens) {
          length = r + 1 - length;
          const old = b;
          b = spare;
          spare = old;
          last = d;
          shift = 0;
        }
      }
      // This step and the next, whose discrepancy is zero.
      shift += 2;
    }
    return length;
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
