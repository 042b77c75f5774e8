import chisquareQuantile from "@stdlib/stats-base-dists-chisquare-quantile";
import { InputError } from "../errors";
import { checkConfidence } from "./binomial-interval";
import { checkCount, logBinomialCdfLarge, MAX_TRIALS } from "./binomial-tail";

/**
 * How long an error-rate test must run: the test passes when at most k errors occur in n independent bits, and a
 * pass shows BER ≤ target at confidence CL when P(X ≤ k | n, target) ≤ 1 − CL — the one-sided Clopper–Pearson
 * bound of a pass is then at most the target (Clopper & Pearson, Biometrika 1934).
 */

/** Most errors a plan may allow: the exact search sums the tail term by term. */
export const MAX_ALLOWED_ERRORS = 10_000;

function checkTarget(target: number): void {
  if (!(target > 0 && target < 1)) throw new InputError(`target must be an error rate strictly between 0 and 1; got ${target}`, ["target"]);
}

/** Chi-square (Poisson) form of the test length: N = χ²(2(k + 1), CL) / (2·target) bits (common practice; the Poisson limit of the exact binomial). */
export function chiSquareTestLength(target: number, confidence: number, allowedErrors: number): { bits: number; chiSquare: number } {
  checkTarget(target);
  checkConfidence(confidence);
  checkCount("allowedErrors", allowedErrors, MAX_ALLOWED_ERRORS);
  const chiSquare = chisquareQuantile(confidence, 2 * (allowedErrors + 1));
  return { bits: chiSquare / (2 * target), chiSquare };
}

/**
 * Exact binomial test length: the smallest n with P(X ≤ k | n, target) ≤ 1 − CL (Clopper & Pearson 1934), found by
 * bisection on integers over the log-CDF, which falls as n grows; the bracket starts from the chi-square form.
 */
export function exactTestLength(target: number, confidence: number, allowedErrors: number): number {
  const { bits: poisson } = chiSquareTestLength(target, confidence, allowedErrors);
  const k = allowedErrors;
  const logRisk = Math.log1p(-confidence);
  const passes = (n: number) => n <= MAX_TRIALS && logBinomialCdfLarge(n, k, target) <= logRisk;
  // With n ≤ k bits a test cannot fail, so the answer is above k.
  let lo = k;
  let hi = Math.max(k + 1, Math.ceil(poisson));
  while (!passes(hi)) {
    if (hi >= MAX_TRIALS) throw new InputError(`demonstrating an error rate of ${target} at confidence ${confidence} with ${k} errors allowed needs more than 2^53 − 1 bits`, ["target"]);
    lo = hi;
    hi = Math.min(MAX_TRIALS, hi * 2);
  }
  // Invariant: lo fails (or is at most k), hi passes.
  while (hi - lo > 1) {
    const mid = lo + Math.floor((hi - lo) / 2);
    if (passes(mid)) hi = mid;
    else lo = mid;
  }
  return hi;
}

/** Probability that the test (at most k errors in n bits) passes when the true BER is `trueBer`: P(X ≤ k | n, trueBer), its power at a good link (binomial CDF, Loader 2000 terms). */
export function passProbability(bits: number, allowedErrors: number, trueBer: number): number {
  return Math.exp(logBinomialCdfLarge(bits, allowedErrors, trueBer));
}

/**
 * For a result that is not yet decided (k errors in n bits, Clopper–Pearson upper bound above the target): how many
 * more error-free bits bring the one-sided bound to the target, the exact test length for k errors less n; 0 if the
 * bound is already at or below it (Clopper & Pearson 1934).
 */
export function moreErrorFreeBits(errors: number, bits: number, target: number, confidence: number): number {
  checkCount("bits", bits, MAX_TRIALS);
  checkCount("errors", errors, Math.min(bits, MAX_ALLOWED_ERRORS));
  return Math.max(0, exactTestLength(target, confidence, errors) - bits);
}
