import { InputError } from "./errors";
import type { GaloisField } from "./gfpm";

/**
 * A polynomial over GF(2^m): p[i] is the coefficient of x^i (lowest power first, the reverse of the
 * codeword order). Trailing zeros are allowed; the zero polynomial may be empty.
 */
export type PolyM = Uint16Array;

/** Degree of p: the highest i with p[i] ≠ 0; −1 for the zero polynomial. */
export function degree(p: PolyM): number {
  let d = p.length - 1;
  while (d >= 0 && p[d] === 0) d--;
  return d;
}

/** p without trailing zero coefficients (a copy). */
export function trim(p: PolyM): PolyM {
  return p.slice(0, degree(p) + 1);
}

/** Product a·b by schoolbook convolution with log/exp tables (Lin & Costello 2004, ch. 2). */
export function mul(field: GaloisField, a: PolyM, b: PolyM): PolyM {
  const da = degree(a);
  const db = degree(b);
  if (da < 0 || db < 0) return new Uint16Array(0);
  const { expTable: exp, logTable: log } = field;
  const r = new Uint16Array(da + db + 1);
  for (let i = 0; i <= da; i++) {
    if (a[i] === 0) continue;
    const la = log[a[i]!]!;
    for (let j = 0; j <= db; j++) if (b[j] !== 0) r[i + j]! ^= exp[la + log[b[j]!]!]!;
  }
  return r;
}

/** Quotient and remainder of a by b ≠ 0 by long division, deg r < deg b (Lin & Costello 2004, ch. 2). */
export function divmod(field: GaloisField, a: PolyM, b: PolyM): { quotient: PolyM; remainder: PolyM } {
  const db = degree(b);
  if (db < 0) throw new InputError("division by the zero polynomial");
  const r = trim(a);
  const da = r.length - 1;
  const q = new Uint16Array(Math.max(da - db + 1, 0));
  const leadInv = field.inv(b[db]!);
  for (let i = da; i >= db; i--) {
    const c = field.mul(r[i]!, leadInv);
    if (c === 0) continue;
    q[i - db] = c;
    for (let j = 0; j <= db; j++) r[i - db + j]! ^= field.mul(c, b[j]!);
  }
  return { quotient: q, remainder: trim(r.subarray(0, db)) };
}

/** p(x) by Horner's rule (Lin & Costello 2004, ch. 2). */
export function evaluate(field: GaloisField, p: PolyM, x: number): number {
  let r = 0;
  for (let i = p.length - 1; i >= 0; i--) r = field.mul(r, x) ^ p[i]!;
  return r;
}

/** Monic greatest common divisor by Euclid's algorithm (Lin & Costello 2004, ch. 2); gcd(0, 0) = 0. */
export function gcd(field: GaloisField, a: PolyM, b: PolyM): PolyM {
  let x = trim(a);
  let y = trim(b);
  while (y.length > 0) [x, y] = [y, divmod(field, x, y).remainder];
  if (x.length === 0) return x;
  const leadInv = field.inv(x[x.length - 1]!);
  return x.map((c) => field.mul(c, leadInv));
}

/** Formal derivative Σ i·p_i x^(i−1); in characteristic 2, i·p_i is p_i for odd i and 0 for even i (Lin & Costello 2004, ch. 7). */
export function derivative(p: PolyM): PolyM {
  const d = new Uint16Array(Math.max(p.length - 1, 0));
  for (let i = 1; i < p.length; i += 2) d[i - 1] = p[i]!;
  return d;
}

/**
 * Berlekamp–Massey: the shortest LFSR Λ(x) = 1 + Λ_1 x + … + Λ_L x^L with Σ_i Λ_i S_{j−i} = 0 for
 * L ≤ j < N over syndromes S_0..S_{N−1}. With an erasure locator Γ(x) of degree ρ the iteration starts
 * from Λ = Γ, L = ρ at j = ρ (equivalent to running it on the Forney syndromes), so Λ = Γ·σ with σ the
 * error locator. Returns Λ trimmed and L; deg Λ ≠ L means more errors than the syndromes can locate
 * (Massey 1969; Lin & Costello 2004, ch. 6 and 7, from memory).
 */
export function berlekampMassey(field: GaloisField, syndromes: PolyM, erasureLocator: PolyM = Uint16Array.of(1)): { locator: PolyM; length: number } {
  const n = syndromes.length;
  const rho = degree(erasureLocator);
  if (rho < 0 || rho > n) throw new InputError(`the erasure locator must be nonzero with degree at most ${n}; got degree ${rho}`);
  const { expTable: exp, logTable: log, order } = field;
  const size = n + 1;
  const c = new Uint16Array(size);
  let b = new Uint16Array(size);
  let spare = new Uint16Array(size);
  c.set(erasureLocator.subarray(0, rho + 1));
  b.set(erasureLocator.subarray(0, rho + 1));
  let length = rho;
  let shift = 1;
  let lastDiscrepancy = 1;
  for (let r = rho; r < n; r++) {
    let d = syndromes[r]!;
    for (let i = 1; i <= length; i++) {
      const ci = c[i]!;
      const si = syndromes[r - i]!;
      if (ci !== 0 && si !== 0) d ^= exp[log[ci]! + log[si]!]!;
    }
    if (d === 0) {
      shift++;
      continue;
    }
    let scale = log[d]! + order - log[lastDiscrepancy]!;
    if (scale >= order) scale -= order;
    const lengthens = 2 * length <= r + rho;
    if (lengthens) spare.set(c);
    // Λ ← Λ − (d / d_last)·x^shift·B
    for (let i = 0; i + shift < size; i++) if (b[i] !== 0) c[i + shift]! ^= exp[scale + log[b[i]!]!]!;
    if (lengthens) {
      length = r + 1 + rho - length;
      [b, spare] = [spare, b];
      lastDiscrepancy = d;
      shift = 1;
    } else {
      shift++;
    }
  }
  return { locator: trim(c), length };
}

/**
 * Chien search: the exponents p in 0..n−1 (n ≤ 2^m − 1) with Λ(β^(−p)) = 0, β = field.generator,
 * ascending, found by stepping each term Λ_i β^(−ip) by β^(−i); stops after deg Λ roots (Chien 1964;
 * Lin & Costello 2004, ch. 6).
 */
export function chienSearch(field: GaloisField, locator: PolyM, n: number): number[] {
  const deg = degree(locator);
  const { expTable: exp, logTable: log, order } = field;
  const terms: number[] = [];
  const steps: number[] = [];
  for (let i = 0; i <= deg; i++) {
    if (locator[i] === 0) continue;
    terms.push(log[locator[i]!]!);
    steps.push(i % order);
  }
  const e = Int32Array.from(terms);
  const roots: number[] = [];
  for (let p = 0; p < n && roots.length < deg; p++) {
    let s = 0;
    for (let j = 0; j < e.length; j++) {
      s ^= exp[e[j]!]!;
      const next = e[j]! - steps[j]!;
      e[j] = next < 0 ? next + order : next;
    }
    if (s === 0) roots.push(p);
  }
  return roots;
}
