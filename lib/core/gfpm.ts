import { InputError } from "./errors";
import * as poly2 from "./poly2";

/** Smallest and largest m for GF(2^m). */
export const MIN_M = 2;
export const MAX_M = 16;

/**
 * Default primitive polynomial for each m (bit i = coefficient of x^i), the usual table choices
 * (Lin & Costello 2004, ch. 2, table of primitive polynomials, from memory); each is confirmed
 * primitive when its field is built and again in tests/unit/gfpm.test.ts.
 */
export const DEFAULT_PRIMITIVE_POLYNOMIALS: Readonly<Record<number, number>> = Object.freeze({
  2: 0x7, // x^2 + x + 1
  3: 0xb, // x^3 + x + 1
  4: 0x13, // x^4 + x + 1
  5: 0x25, // x^5 + x^2 + 1
  6: 0x43, // x^6 + x + 1
  7: 0x89, // x^7 + x^3 + 1
  8: 0x11d, // x^8 + x^4 + x^3 + x^2 + 1
  9: 0x211, // x^9 + x^4 + 1
  10: 0x409, // x^10 + x^3 + 1
  11: 0x805, // x^11 + x^2 + 1
  12: 0x1053, // x^12 + x^6 + x^4 + x + 1
  13: 0x201b, // x^13 + x^4 + x^3 + x + 1
  14: 0x4443, // x^14 + x^10 + x^6 + x + 1
  15: 0x8003, // x^15 + x + 1
  16: 0x1100b, // x^16 + x^12 + x^3 + x + 1
});

// Hex spelling of a polynomial or element for messages, e.g. 0x11D.
function hex(v: number): string {
  return `0x${v.toString(16).toUpperCase()}`;
}

function gcd(a: number, b: number): number {
  while (b !== 0) [a, b] = [b, a % b];
  return a;
}

/**
 * GF(2^m) = GF(2)[x]/(p(x)) with p primitive, elements as m-bit integers (bit i = coefficient of x^i),
 * multiplication through log/exp tables of a primitive element (Lin & Costello 2004, ch. 2).
 * The methods do not range-check their arguments: pass elements 0..size−1.
 */
export class GaloisField {
  /** Number of elements, 2^m. */
  readonly size: number;
  /** Order of the multiplicative group, 2^m − 1. */
  readonly order: number;

  constructor(
    readonly m: number,
    /** The field polynomial p(x), bit i = coefficient of x^i (degree m). */
    readonly poly: number,
    /** The primitive element whose powers the tables list (2 = the class of x unless chosen otherwise). */
    readonly generator: number,
    /** expTable[i] = generator^i for 0 ≤ i < 2·order: doubled so that a sum of two logs needs no reduction. */
    readonly expTable: Uint16Array,
    /** logTable[a] = log of a to the base generator, for a ≠ 0; logTable[0] is meaningless. */
    readonly logTable: Uint16Array,
  ) {
    this.size = 1 << m;
    this.order = this.size - 1;
  }

  /** a + b = a XOR b (characteristic 2). */
  add(a: number, b: number): number {
    return a ^ b;
  }

  /** a·b = exp(log a + log b), 0 if either is 0. */
  mul(a: number, b: number): number {
    return a === 0 || b === 0 ? 0 : this.expTable[this.logTable[a]! + this.logTable[b]!]!;
  }

  /** a / b = exp(log a − log b); InputError for b = 0. */
  div(a: number, b: number): number {
    if (b === 0) throw new InputError("division by 0 in GF(2^m)");
    return a === 0 ? 0 : this.expTable[this.logTable[a]! + this.order - this.logTable[b]!]!;
  }

  /** a^(−1) = exp(order − log a); InputError for a = 0. */
  inv(a: number): number {
    if (a === 0) throw new InputError("0 has no inverse in GF(2^m)");
    return this.expTable[this.order - this.logTable[a]!]!;
  }

  /** a^e = exp(e·log a mod (2^m − 1)) for any integer e; 0^e = 0 for e > 0, 0^0 = 1, InputError for 0^e with e < 0. */
  pow(a: number, e: number): number {
    if (!Number.isSafeInteger(e)) throw new InputError(`the exponent must be an integer; got ${e}`);
    if (a === 0) {
      if (e < 0) throw new InputError("0 has no inverse in GF(2^m)");
      return e === 0 ? 1 : 0;
    }
    const r = ((e % this.order) + this.order) % this.order;
    return this.expTable[(this.logTable[a]! * r) % this.order]!;
  }

  /** Discrete log of a ≠ 0 to the base generator, in 0..2^m − 2; InputError for 0. */
  log(a: number): number {
    if (a === 0) throw new InputError("0 has no logarithm in GF(2^m)");
    return this.logTable[a]!;
  }

  /** generator^i for any integer i (reduced mod 2^m − 1). */
  exp(i: number): number {
    if (!Number.isSafeInteger(i)) throw new InputError(`the exponent must be an integer; got ${i}`);
    return this.expTable[((i % this.order) + this.order) % this.order]!;
  }
}

function checkM(m: number): void {
  if (!Number.isInteger(m) || m < MIN_M || m > MAX_M) {
    throw new InputError(`m must be an integer from ${MIN_M} to ${MAX_M}; got ${m}`, ["m"]);
  }
}

/** Why p is not primitive: the least-degree factor by trial division, else the order of x modulo p (Lin & Costello 2004, ch. 2). */
function notPrimitive(m: number, poly: number, orderOfX: number): InputError {
  const p = BigInt(poly);
  const name = `${hex(poly)} (${poly2.format(p)})`;
  const factor = poly2.smallestFactor(p);
  const message =
    factor !== undefined
      ? `${name} is reducible: ${poly2.format(factor)} divides it; GF(2^${m}) needs a primitive polynomial`
      : `${name} is irreducible but not primitive: x has order ${orderOfX}, not 2^${m} − 1 = ${(1 << m) - 1}`;
  return new InputError(message, ["primitivePoly"]);
}

/** Powers of x modulo p by shift-and-reduce; x is primitive iff its first return to 1 is at step 2^m − 1 (Lin & Costello 2004, ch. 2). */
function baseField(m: number, poly: number): GaloisField {
  const size = 1 << m;
  const order = size - 1;
  const exp = new Uint16Array(2 * order);
  const log = new Uint16Array(size);
  let e = 1;
  for (let i = 0; i < order; i++) {
    if (e === 1 && i > 0) throw notPrimitive(m, poly, i);
    exp[i] = e;
    log[e] = i;
    e <<= 1;
    if (e & size) e ^= poly;
  }
  // p(0) = 0 makes x a zero divisor: its powers never come back to 1.
  if (e !== 1) throw notPrimitive(m, poly, 0);
  exp.copyWithin(order, 0, order);
  return new GaloisField(m, poly, 2, exp, log);
}

/** The same field with tables of another primitive element β: exp[i] = β^i, so logs are to the base β. */
function withGenerator(base: GaloisField, beta: number): GaloisField {
  const { m, order, size } = base;
  if (!Number.isInteger(beta) || beta < 1 || beta >= size) {
    throw new InputError(`primitiveElement must be a nonzero element of GF(2^${m}), 1 to ${size - 1}; got ${beta}`, ["primitiveElement"]);
  }
  // ord(x^j) = (2^m − 1)/gcd(j, 2^m − 1) in a cyclic group of that order.
  const elementOrder = order / gcd(base.logTable[beta]!, order);
  if (elementOrder !== order) {
    throw new InputError(`primitiveElement ${hex(beta)} has order ${elementOrder}, not 2^${m} − 1 = ${order}; it is not primitive`, ["primitiveElement"]);
  }
  const exp = new Uint16Array(2 * order);
  const log = new Uint16Array(size);
  let e = 1;
  for (let i = 0; i < order; i++) {
    exp[i] = e;
    log[e] = i;
    e = base.mul(e, beta);
  }
  exp.copyWithin(order, 0, order);
  return new GaloisField(m, base.poly, beta, exp, log);
}

const cache = new Map<string, GaloisField>();

/**
 * GF(2^m) for m = 2..16 from a primitive polynomial (default: DEFAULT_PRIMITIVE_POLYNOMIALS[m]) with
 * log/exp tables to the base `generator` (default 2, the class of x; another one must be primitive).
 * Cached by (m, poly, generator). InputError (paths m, primitivePoly, primitiveElement) names what is wrong
 * (Lin & Costello 2004, ch. 2).
 */
export function galoisField(m: number, primitivePoly?: number, generator = 2): GaloisField {
  checkM(m);
  const poly = primitivePoly ?? DEFAULT_PRIMITIVE_POLYNOMIALS[m]!;
  const key = `${m}:${poly}:${generator}`;
  const hit = cache.get(key);
  if (hit) return hit;
  if (!Number.isSafeInteger(poly) || poly <= 0) {
    throw new InputError(`primitivePoly must be a positive integer (bit i = coefficient of x^i); got ${poly}`, ["primitivePoly"]);
  }
  const degree = 31 - Math.clz32(poly);
  if (poly >= 2 ** 31 || degree !== m) {
    throw new InputError(`primitivePoly ${hex(poly)} has degree ${poly2.degree(BigInt(poly))}; GF(2^${m}) needs a polynomial of degree ${m}`, ["primitivePoly"]);
  }
  const baseKey = `${m}:${poly}:2`;
  const base = cache.get(baseKey) ?? baseField(m, poly);
  cache.set(baseKey, base);
  const field = generator === 2 ? base : withGenerator(base, generator);
  cache.set(key, field);
  return field;
}
