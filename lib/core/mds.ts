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
  const A: bigint[] = new Array<bigint>(n + 1).fill(0n);
  A[0] = 1n;
  for (let w = d; w <= n; w++) {
    let s = 0n;
    for (let j = 0; j <= w - d; j++) {
      const term = binomial(w, j) * (Q ** BigInt(w - d + 1 - j) - 1n);
      s += j % 2 === 0 ? term : -term;
    }
    A[w] = binomial(n, w) * s;
  }
  return A;
}

/** Volume of a Hamming sphere over GF(q): V_q(n, t) = Σ_{i≤t} C(n, i)(q − 1)^i (MacWilliams & Sloane 1977, ch. 1). */
export function qarySphereVolume(n: number, t: number, q: number): bigint {
  let v = 0n;
  for (let i = 0; i <= Math.min(t, n); i++) v += binomial(n, i) * BigInt(q - 1) ** BigInt(i);
  return v;
}
