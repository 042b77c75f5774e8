import { InputError } from "./errors";
import type { GaloisField } from "./gfpm";
import * as polym from "./polym";

/**
 * Polynomials over GF(2) as non-negative bigints: bit i is the coefficient of x^i
 * (so 0b1011n = x^3 + x + 1), which keeps any degree exact.
 */
export type Poly2 = bigint;

/** Degree of p; −1 for the zero polynomial. */
export function degree(p: Poly2): number {
  return p === 0n ? -1 : p.toString(2).length - 1;
}

/** Product a·b by carry-less shift-and-XOR multiplication (Lin & Costello 2004, ch. 2). */
export function mul(a: Poly2, b: Poly2): Poly2 {
  if (degree(a) < degree(b)) [a, b] = [b, a];
  let r = 0n;
  for (; b !== 0n; b >>= 1n, a <<= 1n) if (b & 1n) r ^= a;
  return r;
}

/** Quotient and remainder of a by b ≠ 0 by long division, deg r < deg b (Lin & Costello 2004, ch. 2). */
export function divmod(a: Poly2, b: Poly2): { quotient: Poly2; remainder: Poly2 } {
  if (b === 0n) throw new InputError("division by the zero polynomial");
  const db = degree(b);
  let q = 0n;
  for (let dr = degree(a); dr >= db; dr = degree(a)) {
    const s = BigInt(dr - db);
    q |= 1n << s;
    a ^= b << s;
  }
  return { quotient: q, remainder: a };
}

/** Greatest common divisor by Euclid's algorithm (Lin & Costello 2004, ch. 2); gcd(0, 0) = 0. */
export function gcd(a: Poly2, b: Poly2): Poly2 {
  while (b !== 0n) [a, b] = [b, divmod(a, b).remainder];
  return a;
}

/** Formal derivative Σ i·p_i x^(i−1): over GF(2) only the odd-degree terms survive (Lin & Costello 2004, ch. 2). */
export function derivative(p: Poly2): Poly2 {
  const bits = degree(p) + 1;
  if (bits < 2) return 0n;
  const evenPositions = BigInt("0b" + "01".repeat(Math.ceil(bits / 2)));
  return (p >> 1n) & evenPositions;
}

/** p(x) at an element x of GF(2^m) by Horner's rule (Lin & Costello 2004, ch. 2). */
export function evaluate(field: GaloisField, p: Poly2, x: number): number {
  const digits = p.toString(2);
  let r = 0;
  for (let i = 0; i < digits.length; i++) r = field.mul(r, x) ^ (digits.charCodeAt(i) - 48);
  return r;
}

/** Exponents of the nonzero terms, highest first: x^8 + x^7 + x^6 + x^4 + 1 → [8, 7, 6, 4, 0]. */
export function exponents(p: Poly2): number[] {
  const digits = p.toString(2);
  const out: number[] = [];
  for (let i = 0; i < digits.length; i++) if (digits[i] === "1") out.push(digits.length - 1 - i);
  return out;
}

/** p written out, highest power first, e.g. "x^8 + x^4 + x^3 + x + 1"; "0" for zero. */
export function format(p: Poly2): string {
  const terms = exponents(p).map((e) => (e === 0 ? "1" : e === 1 ? "x" : `x^${e}`));
  return terms.length === 0 ? "0" : terms.join(" + ");
}

/**
 * A least-degree factor of p (1 ≤ deg < deg p) by trial division over all polynomials of degree
 * 1..⌊deg p / 2⌋, or undefined when p is irreducible; meant for small degrees (Lin & Costello 2004, ch. 2).
 */
export function smallestFactor(p: Poly2): Poly2 | undefined {
  const dp = degree(p);
  for (let d = 1; 2 * d <= dp; d++) {
    for (let f = 1n << BigInt(d); f < 1n << BigInt(d + 1); f++) if (divmod(p, f).remainder === 0n) return f;
  }
  return undefined;
}

/** Cyclotomic coset of s modulo 2^m − 1: {s·2^j mod (2^m − 1)}, ascending (Lin & Costello 2004, ch. 2; MacWilliams & Sloane 1977, ch. 4). */
export function cyclotomicCoset(s: number, m: number): number[] {
  const order = 2 ** m - 1;
  const start = ((s % order) + order) % order;
  const coset = [start];
  for (let e = (start * 2) % order; e !== start; e = (e * 2) % order) coset.push(e);
  return coset.sort((a, b) => a - b);
}

/**
 * Minimal polynomial of β^s over GF(2), β = field.generator: ∏ (x − β^j) over j in the cyclotomic coset
 * of s; its coefficients lie in GF(2) (Lin & Costello 2004, ch. 2; MacWilliams & Sloane 1977, ch. 4).
 */
export function minimalPolynomial(field: GaloisField, s: number): Poly2 {
  let p: polym.PolyM = Uint16Array.of(1);
  for (const j of cyclotomicCoset(s, field.m)) p = polym.mul(field, p, Uint16Array.of(field.exp(j), 1));
  let r = 0n;
  for (let i = p.length - 1; i >= 0; i--) r = (r << 1n) | BigInt(p[i]!);
  return r;
}
