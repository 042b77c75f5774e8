import gammaln from "@stdlib/math-base-special-gammaln";
import { InputError } from "./errors";

function binomial(n: number, k: number): bigint {
  if (k < 0 || k > n) return 0n;
  let r = 1n;
  for (let i = 1; i <= k; i++) r = (r * BigInt(n - k + i)) / BigInt(i);
  return r;
}

/**
 * Weight distribution of an MDS [n, k, d = n − k + 1] code over GF(q):
 * A_w = C(n, w)·Σ_{j=0}^{w−d} (−1)^j·C(w, j)·(q^{w−d+1−j} − 1) for d ≤ w ≤ n, A_0 = 1
 * (MacWilliams & Sloane 1977, ch. 11, Theorem 6). Exact, in BigInt.
 */
export function mdsWeightDistribution(n: number, k: number, q: number): bigint[] {
  if (!Number.isInteger(n) || !Number.isInteger(k) || k < 1 || k > n) throw new InputError(`need 1 ≤ k ≤ n; got n = ${n}, k = ${k}`);
  if (!Number.isInteger(q) || q < 2) throw new InputError(`q must be an integer ≥ 2; got ${q}`);
  const d = n - k + 1;
  const Q = BigInt(q);
  // q^0 … q^k once, and each C(w, j) from C(w, j − 1): quadratic in k instead of cubic.
  const powers = [1n];
  for (let e = 1; e <= k; e++) powers.push(powers[e - 1]! * Q);
  const A: bigint[] = new Array<bigint>(n + 1).fill(0n);
  A[0] = 1n;
  let cnw = binomial(n, d - 1);
  for (let w = d; w <= n; w++) {
    cnw = (cnw * BigInt(n - w + 1)) / BigInt(w);
    let s = 0n;
    let cwj = 1n;
    for (let j = 0; j <= w - d; j++) {
      if (j > 0) cwj = (cwj * BigInt(w - j + 1)) / BigInt(j);
      const term = cwj * (powers[w - d + 1 - j]! - 1n);
      s += j % 2 === 0 ? term : -term;
    }
    A[w] = cnw * s;
  }
  return A;
}

/** Volume of a Hamming sphere over GF(q): V_q(n, t) = Σ_{i≤t} C(n, i)(q − 1)^i (MacWilliams & Sloane 1977, ch. 1). */
export function qarySphereVolume(n: number, t: number, q: number): bigint {
  let v = 1n;
  let term = 1n;
  const q1 = BigInt(q - 1);
  // C(n, i)(q − 1)^i from the previous term: one multiply and one exact division each.
  for (let i = 1; i <= Math.min(t, n); i++) {
    term = (term * BigInt(n - i + 1) * q1) / BigInt(i);
    v += term;
  }
  return v;
}

/**
 * log2 V_q(n, t) in floating point, for spheres too large to count exactly: the terms' logarithms
 * ln C(n, i) + i·ln(q − 1) from ln Γ, summed by log-sum-exp (MacWilliams & Sloane 1977, ch. 1).
 */
export function log2QarySphereVolume(n: number, t: number, q: number): number {
  const top = Math.min(t, n);
  const lq = Math.log(q - 1);
  const terms: number[] = [];
  for (let i = 0; i <= top; i++) terms.push(gammaln(n + 1) - gammaln(i + 1) - gammaln(n - i + 1) + i * lq);
  const max = Math.max(...terms);
  return (max + Math.log(terms.reduce((s, x) => s + Math.exp(x - max), 0))) / Math.LN2;
}
