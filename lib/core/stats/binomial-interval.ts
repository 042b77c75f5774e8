import erfcinv from "@stdlib/math-base-special-erfcinv";
import expm1 from "@stdlib/math-base-special-expm1";
import betaQuantile from "@stdlib/stats-base-dists-beta-quantile";
import { InputError } from "../errors";
import { checkCount, MAX_TRIALS } from "./binomial-tail";

/**
 * Intervals for a binomial proportion: k events (errors) in n independent trials (bits or frames). They are exact
 * only when the trials are independent with one probability; after decoding, bit errors come in bursts inside failed
 * frames, so for a coded link count frames, not bits.
 */

export interface Interval {
  lower: number;
  upper: number;
}

/** Refuse a confidence level outside the open interval (0, 1). */
export function checkConfidence(confidence: number): void {
  if (!(confidence > 0 && confidence < 1)) throw new InputError(`confidence must be a fraction strictly between 0 and 1, e.g. 0.95; got ${confidence}`, ["confidence"]);
}

function checkCounts(k: number, n: number): void {
  checkCount("n", n, MAX_TRIALS);
  if (n === 0) throw new InputError("n must be at least 1 trial", ["n"]);
  checkCount("k", k, n);
}

/**
 * One-sided Clopper–Pearson upper bound: the p with P(X ≤ k | n, p) = 1 − CL, the CL quantile of Beta(k + 1, n − k)
 * (Clopper & Pearson, Biometrika 1934); for k = 0 the closed form 1 − (1 − CL)^(1/n), by expm1 so 1e-15 keeps its digits.
 */
export function clopperPearsonUpper(k: number, n: number, confidence: number): number {
  checkCounts(k, n);
  checkConfidence(confidence);
  if (k === n) return 1;
  if (k === 0) return -expm1(Math.log1p(-confidence) / n);
  return betaQuantile(confidence, k + 1, n - k);
}

/** One-sided Clopper–Pearson lower bound: the 1 − CL quantile of Beta(k, n − k + 1), 0 for k = 0 (Clopper & Pearson 1934). */
export function clopperPearsonLower(k: number, n: number, confidence: number): number {
  checkCounts(k, n);
  checkConfidence(confidence);
  if (k === 0) return 0;
  // By symmetry with the upper bound of the non-events, so k = n has the same closed form.
  if (k === n) return Math.exp(Math.log1p(-confidence) / n);
  return betaQuantile(1 - confidence, k, n - k + 1);
}

/** Two-sided Clopper–Pearson interval at CL: each one-sided bound at (1 + CL)/2 (Clopper & Pearson, Biometrika 1934). */
export function clopperPearson(k: number, n: number, confidence: number): Interval {
  checkConfidence(confidence);
  const oneSided = (1 + confidence) / 2;
  return { lower: clopperPearsonLower(k, n, oneSided), upper: clopperPearsonUpper(k, n, oneSided) };
}

/**
 * Wilson score interval (Wilson, JASA 1927): (p̂ + z²/2n ± z·√(p̂(1 − p̂)/n + z²/4n²)) / (1 + z²/n), z = Φ⁻¹((1 + CL)/2).
 * The lower end is taken as p̂²/(centre + radius), the same value without the cancellation of centre − radius when
 * p̂ is small (their product is p̂²(1 + z²/n)).
 */
export function wilson(k: number, n: number, confidence: number): Interval {
  checkCounts(k, n);
  checkConfidence(confidence);
  const z = Math.SQRT2 * erfcinv(1 - confidence);
  const z2n = (z * z) / n;
  const ph = k / n;
  const centre = ph + z2n / 2;
  const radius = z * Math.sqrt((ph * (1 - ph)) / n + z2n / (4 * n));
  return { lower: k === 0 ? 0 : (ph * ph) / (centre + radius), upper: k === n ? 1 : Math.min(1, (centre + radius) / (1 + z2n)) };
}
