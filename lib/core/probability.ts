import expm1 from "@stdlib/math-base-special-expm1";
import log1p from "@stdlib/math-base-special-log1p";
import { InputError } from "./errors";
import { log1mexp } from "./numeric";

/** Largest number of trials the binomial functions accept. */
export const MAX_BINOMIAL_N = 1_000_000;

const LN_2PI = Math.log(2 * Math.PI);
// A term below this fraction of the running sum no longer changes a double.
const LOG_NEGLIGIBLE = Math.log(1e-17);

/** Stirling series of stirlerr(n), with as many terms as double precision needs at n (Loader 2000). */
function stirlerrSeries(n: number): number {
  const nn = n * n;
  if (n > 500) return (1 / 12 - 1 / 360 / nn) / n;
  if (n > 80) return (1 / 12 - (1 / 360 - 1 / 1260 / nn) / nn) / n;
  if (n > 35) return (1 / 12 - (1 / 360 - (1 / 1260 - 1 / 1680 / nn) / nn) / nn) / n;
  return (1 / 12 - (1 / 360 - (1 / 1260 - (1 / 1680 - 1 / 1188 / nn) / nn) / nn) / nn) / n;
}

// stirlerr(n) for n < SMALL_LIMIT, where the series is short of double precision. Built downward from
// n = 64 (series error < 1e-19) with stirlerr(n) = stirlerr(n + 1) + Σ_{m≥1} x^{2m}/(2m + 1), x = 1/(2n + 1),
// which is (n + ½)·ln((n + 1)/n) − 1 expanded so that no digits cancel.
const SMALL_LIMIT = 36;
const SMALL_STIRLERR = (() => {
  const table = new Float64Array(SMALL_LIMIT);
  let s = stirlerrSeries(64);
  for (let n = 63; n >= 1; n--) {
    const x2 = 1 / ((2 * n + 1) * (2 * n + 1));
    let term = x2;
    let d = 0;
    for (let m = 1; term > 1e-20 * d || d === 0; m++) {
      d += term / (2 * m + 1);
      term *= x2;
    }
    s += d;
    if (n < SMALL_LIMIT) table[n] = s;
  }
  return table;
})();

/** stirlerr(n) = ln n! − ln(√(2πn)·(n/e)ⁿ) for integers n ≥ 1 (Loader 2000, "Fast and Accurate Computation of Binomial Probabilities"). */
export function stirlerr(n: number): number {
  return n < SMALL_LIMIT ? SMALL_STIRLERR[n]! : stirlerrSeries(n);
}

/** Deviance term bd0(x, M) = x·ln(x/M) + M − x, by a series when x ≈ M so nothing cancels (Loader 2000). */
export function bd0(x: number, M: number): number {
  if (Math.abs(x - M) < 0.1 * (x + M)) {
    let v = (x - M) / (x + M);
    let s = (x - M) * v;
    let ej = 2 * x * v;
    v *= v;
    for (let j = 1; j < 1000; j++) {
      ej *= v;
      const s1 = s + ej / (2 * j + 1);
      if (s1 === s) return s1;
      s = s1;
    }
    return s;
  }
  return x * Math.log(x / M) + M - x;
}

function checkN(n: number): void {
  if (!Number.isInteger(n) || n < 0 || n > MAX_BINOMIAL_N) {
    throw new InputError(`n must be an integer from 0 to ${MAX_BINOMIAL_N}; got ${n}`);
  }
}

function checkK(k: number): void {
  if (!Number.isInteger(k)) throw new InputError(`k must be an integer; got ${k}`);
}

function checkP(p: number): void {
  if (!(p >= 0 && p <= 1)) throw new InputError(`p must be a probability in [0, 1]; got ${p}`);
}

// Loader's saddle-point form, arguments already valid; q = 1 − p.
function logPmf(n: number, k: number, p: number, q: number): number {
  if (k < 0 || k > n) return -Infinity;
  if (p === 0) return k === 0 ? 0 : -Infinity;
  if (q === 0) return k === n ? 0 : -Infinity;
  if (k === 0) return n * log1p(-p);
  if (k === n) return n * Math.log(p);
  const lc = stirlerr(n) - stirlerr(k) - stirlerr(n - k) - bd0(k, n * p) - bd0(n - k, n * q);
  return lc - 0.5 * (LN_2PI + Math.log(k) + log1p(-k / n));
}

/** ln P(X = k), X ~ Bin(n, p), by the saddle-point expansion with stirlerr and bd0 (Loader 2000); −Infinity if impossible. */
export function logBinomialPmf(n: number, k: number, p: number): number {
  checkN(n);
  checkK(k);
  checkP(p);
  return logPmf(n, k, p, 1 - p);
}

/** P(X = k), X ~ Bin(n, p) (Loader 2000). */
export function binomialPmf(n: number, k: number, p: number): number {
  return Math.exp(logBinomialPmf(n, k, p));
}

// ln Σ pmf(j) for j = start, start + step, … inside [0, n], where the terms never increase.
function logTailSum(n: number, p: number, q: number, start: number, step: 1 | -1): number {
  const l0 = logPmf(n, start, p, q);
  if (l0 === -Infinity) return -Infinity;
  let sum = 1;
  let prev = l0;
  for (let j = start + step; j >= 0 && j <= n; j += step) {
    const lj = logPmf(n, j, p, q);
    sum += Math.exp(lj - l0);
    // The pmf is log-concave, so later ratios are smaller and the rest is at most t·r/(1 − r).
    const r = lj - prev;
    if (lj + r - Math.log(-expm1(r)) < l0 + Math.log(sum) + LOG_NEGLIGIBLE) break;
    prev = lj;
  }
  return l0 + Math.log(sum);
}

/** ln P(X ≤ k) and ln P(X > k) for X ~ Bin(n, p) by log-space tail sums of Loader 2000 terms, the complement by ln(1 − eˣ) (Mächler 2012). */
export function logBinomialTails(n: number, k: number, p: number): { lower: number; upper: number } {
  // The tail away from the mode ⌊(n + 1)p⌋ is summed outward from its edge; the side holding the mode,
  // which holds most of the mass, is its complement, so values near 1 keep their small distance to 1.
  checkN(n);
  checkK(k);
  checkP(p);
  if (k < 0) return { lower: -Infinity, upper: 0 };
  if (k >= n) return { lower: 0, upper: -Infinity };
  const q = 1 - p;
  if (p === 0) return { lower: 0, upper: -Infinity };
  if (q === 0) return { lower: -Infinity, upper: 0 };
  const mode = Math.min(n, Math.floor((n + 1) * p));
  if (k < mode) {
    const lower = Math.min(0, logTailSum(n, p, q, k, -1));
    return { lower, upper: log1mexp(lower) };
  }
  const upper = Math.min(0, logTailSum(n, p, q, k + 1, 1));
  return { lower: log1mexp(upper), upper };
}

/** ln P(X ≤ k), X ~ Bin(n, p), by tail summation in log space (Loader 2000 terms). */
export function logBinomialCdf(n: number, k: number, p: number): number {
  return logBinomialTails(n, k, p).lower;
}

/** ln P(X > k), X ~ Bin(n, p), by tail summation in log space (Loader 2000 terms). */
export function logBinomialSf(n: number, k: number, p: number): number {
  return logBinomialTails(n, k, p).upper;
}

/** P(X ≤ k), X ~ Bin(n, p) (Loader 2000 terms). */
export function binomialCdf(n: number, k: number, p: number): number {
  return Math.exp(logBinomialCdf(n, k, p));
}

/** P(X > k), X ~ Bin(n, p) (Loader 2000 terms). */
export function binomialSf(n: number, k: number, p: number): number {
  return Math.exp(logBinomialSf(n, k, p));
}
