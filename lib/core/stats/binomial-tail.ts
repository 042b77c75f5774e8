import expm1 from "@stdlib/math-base-special-expm1";
import log1p from "@stdlib/math-base-special-log1p";
import { InputError } from "../errors";
import { log1mexp } from "../numeric";
import { bd0, stirlerr } from "../probability";

/**
 * Binomial terms for the trial counts of long error-rate tests (10^12 bits and more), which lib/core/probability
 * does not take (it stops at 10^6 trials). The same Loader 2000 saddle-point terms, for n up to 2^53 − 1.
 */

/** Largest number of trials: every integer up to it is exact in a double. */
export const MAX_TRIALS = Number.MAX_SAFE_INTEGER;

const LN_2PI = Math.log(2 * Math.PI);
// A term below this fraction of the running sum no longer changes a double.
const LOG_NEGLIGIBLE = Math.log(1e-17);

/** Refuse anything but an integer count from 0 to `max`, naming the argument. */
export function checkCount(name: string, v: number, max: number): void {
  if (!Number.isInteger(v) || v < 0 || v > max) throw new InputError(`${name} must be an integer from 0 to ${max}; got ${v}`, [name]);
}

/** Refuse anything but a probability in [0, 1], naming the argument. */
export function checkProbability(name: string, p: number): void {
  if (!(p >= 0 && p <= 1)) throw new InputError(`${name} must be a probability in [0, 1]; got ${p}`, [name]);
}

/** ln P(X = k), X ~ Bin(n, p), n ≤ 2^53 − 1, by Loader's saddle-point form with stirlerr and bd0 (Loader 2000); arguments not checked. */
export function logPmfUnchecked(n: number, k: number, p: number): number {
  if (k < 0 || k > n) return -Infinity;
  const q = 1 - p;
  if (p === 0) return k === 0 ? 0 : -Infinity;
  if (q === 0) return k === n ? 0 : -Infinity;
  if (k === 0) return n * log1p(-p);
  if (k === n) return n * Math.log(p);
  const lc = stirlerr(n) - stirlerr(k) - stirlerr(n - k) - bd0(k, n * p) - bd0(n - k, n * q);
  return lc - 0.5 * (LN_2PI + Math.log(k) + log1p(-k / n));
}

// ln Σ pmf(j) for j = start, start + step, … inside [0, n], where the terms never increase (outward from the mode).
function logTailSum(n: number, p: number, start: number, step: 1 | -1): number {
  const l0 = logPmfUnchecked(n, start, p);
  if (l0 === -Infinity) return -Infinity;
  let sum = 1;
  let prev = l0;
  for (let j = start + step; j >= 0 && j <= n; j += step) {
    const lj = logPmfUnchecked(n, j, p);
    sum += Math.exp(lj - l0);
    // The pmf is log-concave, so later ratios are smaller and the rest is at most t·r/(1 − r).
    const r = lj - prev;
    if (lj + r - Math.log(-expm1(r)) < l0 + Math.log(sum) + LOG_NEGLIGIBLE) break;
    prev = lj;
  }
  return l0 + Math.log(sum);
}

/**
 * ln P(X ≤ k), X ~ Bin(n, p), n up to 2^53 − 1: the tail away from the mode summed outward from its edge with
 * Loader 2000 terms, the side holding the mode as its complement ln(1 − eˣ) (Mächler 2012). Terms stop once the rest
 * cannot change a double, so the cost is about the tail's width, √(np) or so, not k.
 */
export function logBinomialCdfLarge(n: number, k: number, p: number): number {
  checkCount("n", n, MAX_TRIALS);
  if (!Number.isInteger(k)) throw new InputError(`k must be an integer; got ${k}`, ["k"]);
  checkProbability("p", p);
  if (k < 0) return -Infinity;
  if (k >= n || p === 0) return 0;
  if (p === 1) return -Infinity;
  const mode = Math.min(n, Math.floor((n + 1) * p));
  if (k < mode) return Math.min(0, logTailSum(n, p, k, -1));
  return log1mexp(Math.min(0, logTailSum(n, p, k + 1, 1)));
}
