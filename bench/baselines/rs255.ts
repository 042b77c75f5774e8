/**
 * Deliberately plain Reed–Solomon (255,223), t = 16, over GF(2^8) with 0x11D, roots α^1..α^32, for the
 * benchmark: no tables anywhere. Same conventions as lib/core/codes/rs.ts with defaults (firstRoot 1,
 * primitive element x): symbol 0 = coefficient of x^254, message symbols first; decode returns the
 * message (uncorrected on failure).
 */

const N = 255;
const K = 223;
const R = N - K;
const FIELD_POLY = 0x11d;

/** a·b in GF(2^8) by shift-and-add with reduction by 0x11D (Lin & Costello 2004, ch. 2). */
function gfMul(a: number, b: number): number {
  let r = 0;
  for (; b !== 0; b >>>= 1) {
    if (b & 1) r ^= a;
    a <<= 1;
    if (a & 0x100) a ^= FIELD_POLY;
  }
  return r;
}

/** a^e by repeated multiplication. */
function gfPow(a: number, e: number): number {
  let r = 1;
  for (let i = 0; i < e; i++) r = gfMul(r, a);
  return r;
}

/** a^(−1) = a^254 (Fermat). */
function gfInv(a: number): number {
  return gfPow(a, 254);
}

/** p(x) by Horner's rule, coefficients lowest power first. */
function evaluate(p: number[], x: number): number {
  let v = 0;
  for (let i = p.length - 1; i >= 0; i--) v = gfMul(v, x) ^ p[i]!;
  return v;
}

// g(x) = ∏_{i=1}^{32} (x − α^i), highest power first.
const GENERATOR = (() => {
  let g = [1];
  for (let i = 1; i <= R; i++) {
    const root = gfPow(2, i);
    const next = [...g, 0];
    for (let j = 0; j < g.length; j++) next[j + 1]! ^= gfMul(g[j]!, root);
    g = next;
  }
  return g;
})();

/** Systematic encoding: x^32·m(x) mod g(x) by long division one symbol at a time (Lin & Costello 2004, ch. 7). */
export function encode(message: Uint16Array): Uint16Array {
  const work = new Uint16Array(N);
  work.set(message);
  for (let i = 0; i < K; i++) {
    const c = work[i]!;
    if (c === 0) continue;
    for (let j = 0; j < GENERATOR.length; j++) work[i + j]! ^= gfMul(c, GENERATOR[j]!);
  }
  const out = new Uint16Array(N);
  out.set(message);
  out.set(work.subarray(K), K);
  return out;
}

/**
 * Textbook decoding: syndromes S_j = r(α^(j+1)) by Horner, Berlekamp–Massey, Chien search by evaluating Λ at
 * every α^(−p), Forney's Y = Ω(X^(−1))/Λ'(X^(−1)) (Lin & Costello 2004, ch. 7). Fails when L > 16, deg Λ ≠ L
 * or the roots are not deg Λ.
 */
export function decode(received: Uint16Array): Uint16Array {
  const message = received.slice(0, K);
  const s: number[] = [];
  for (let j = 0; j < R; j++) {
    const x = gfPow(2, j + 1);
    let v = 0;
    for (let i = 0; i < N; i++) v = gfMul(v, x) ^ received[i]!;
    s.push(v);
  }
  if (s.every((v) => v === 0)) return message;

  let c = [1];
  let b = [1];
  let length = 0;
  let shift = 1;
  let last = 1;
  for (let r = 0; r < R; r++) {
    let d = s[r]!;
    for (let i = 1; i <= length; i++) d ^= gfMul(c[i] ?? 0, s[r - i]!);
    if (d === 0) {
      shift++;
      continue;
    }
    const scale = gfMul(d, gfInv(last));
    const next = c.slice();
    for (let i = 0; i < b.length; i++) {
      while (next.length <= i + shift) next.push(0);
      next[i + shift]! ^= gfMul(scale, b[i]!);
    }
    if (2 * length <= r) {
      b = c;
      length = r + 1 - length;
      last = d;
      shift = 1;
    } else {
      shift++;
    }
    c = next;
  }
  while (c.length > 1 && c[c.length - 1] === 0) c.pop();
  const deg = c.length - 1;
  if (length > R / 2 || deg !== length) return message;

  const roots: number[] = [];
  const alphaInv = gfInv(2);
  for (let p = 0, x = 1; p < N; p++, x = gfMul(x, alphaInv)) if (evaluate(c, x) === 0) roots.push(p);
  if (roots.length !== deg) return message;

  const omega: number[] = [];
  for (let i = 0; i < deg; i++) {
    let v = 0;
    for (let j = 0; j <= i; j++) v ^= gfMul(c[j]!, s[i - j]!);
    omega.push(v);
  }
  const slope = c.slice(1).map((v, i) => (i % 2 === 0 ? v : 0));
  const word = received.slice();
  for (const p of roots) {
    const xInv = gfPow(2, (N - p) % N);
    word[N - 1 - p]! ^= gfMul(evaluate(omega, xInv), gfInv(evaluate(slope, xInv)));
  }
  return word.slice(0, K);
}
