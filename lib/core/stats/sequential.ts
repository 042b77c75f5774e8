import log1p from "@stdlib/math-base-special-log1p";
import { InputError } from "../errors";
import { bisect } from "../numeric";
import { checkConfidence, type Interval } from "./binomial-interval";
import { checkCount, logPmfUnchecked, MAX_TRIALS } from "./binomial-tail";

/**
 * A sequential decision on "error rate ≤ target" that stays valid when it is checked after every chunk and the run
 * stops as soon as it is decided (optional stopping), for independent trials (bits of an uncoded memoryless link, or
 * frames) with one error probability p.
 *
 * The construction is a confidence sequence from a mixture martingale (Howard, Ramdas, McAuliffe & Sekhon,
 * "Time-uniform, nonparametric, nonasymptotic confidence sequences", Ann. Statist. 49(2), 2021): for each p,
 * M_n(p) = ∫ q^k (1 − q)^(n−k) π(q) dq / (p^k (1 − p)^(n−k)) with the prior π = Beta(1, b) is a nonnegative martingale
 * with mean 1 when the true rate is p, so by Ville's inequality P(M_n(p) ≥ 1/α for some n) ≤ α, α = 1 − confidence.
 * The set {p : M_n(p) < 1/α} therefore covers the true rate at every n at once. The verdict is `refuted` when the whole
 * set lies above the target, `supported` when it lies below, else `continue`; deciding against the truth needs the set
 * to miss the true rate, so its chance is at most α whatever the true rate and however often the rule is checked.
 * Near the target the rule may never decide: the caller's budget ends the run (inconclusive).
 *
 * b = ⌈1/target⌉ − 1 puts the prior's mean at about the target, where the evidence has to be weighed: an error-free
 * run is `supported` after about n·target = 4.74 at 95 % (x − ln(1 + x) = ln 20), against 3.0 for a fixed-length test.
 */

export type Verdict = "supported" | "refuted" | "continue";

export interface SequentialPlan {
  target: number;
  confidence: number;
  /** ln(1/α), α = 1 − confidence: the level M_n must reach. */
  logThreshold: number;
  /** The prior Beta(1, priorB). */
  priorB: number;
}

export const SEQUENTIAL_METHOD =
  "Anytime-valid confidence sequence for an error probability: the Beta(1, b)-mixture likelihood ratio for independent trials, b = ⌈1/target⌉ − 1, " +
  "a nonnegative martingale at the true rate, bounded by Ville's inequality, so checking after every chunk and stopping when decided keeps the chance " +
  "of a wrong verdict at most 1 − confidence (Howard, Ramdas, McAuliffe & Sekhon, Ann. Statist. 49(2), 2021).";

/** The plan of a sequential test of "rate ≤ target" at a confidence: α = 1 − confidence, prior Beta(1, ⌈1/target⌉ − 1) (see the module's doc). */
export function sequentialPlan(target: number, confidence: number): SequentialPlan {
  if (!(target > 0 && target <= 0.5)) throw new InputError(`target must be an error rate above 0 and at most 0.5; got ${target}`, ["target"]);
  checkConfidence(confidence);
  const priorB = Math.ceil(1 / target) - 1;
  if (priorB > MAX_TRIALS / 2) throw new InputError(`target must be at least ${(2 / MAX_TRIALS).toExponential(1)}; got ${target}`, ["target"]);
  return { target, confidence, logThreshold: -Math.log1p(-confidence), priorB };
}

function checkTotals(errors: number, trials: number, priorB: number): void {
  // The mixture is a binomial term over trials + b − 1 trials, which must stay an exact integer.
  checkCount("trials", trials, MAX_TRIALS - priorB);
  checkCount("errors", errors, trials);
}

/**
 * ln M_n(p) for k errors in n trials with the Beta(1, b) prior: ln b − ln(n + b) − ln Bin(k; n + b − 1, p) + (b − 1)·ln(1 − p),
 * from ∫ q^k (1 − q)^(n−k+b−1) b dq = b / ((n + b)·C(n + b − 1, k)), the binomial term by Loader's saddle-point form (Loader 2000).
 */
export function logMixtureRatio(plan: SequentialPlan, errors: number, trials: number, p: number): number {
  const b = plan.priorB;
  return Math.log(b) - Math.log(trials + b) - logPmfUnchecked(trials + b - 1, errors, p) + (b - 1) * log1p(-p);
}

/**
 * The verdict after `errors` errors in `trials` trials in all, counted from the start (call it after every chunk with the
 * running totals): supported, refuted, or continue (see the module's doc for the method and its error guarantee).
 */
export function decide(plan: SequentialPlan, errors: number, trials: number): Verdict {
  checkTotals(errors, trials, plan.priorB);
  if (trials === 0) return "continue";
  const rate = errors / trials;
  if (rate === plan.target) return "continue";
  // ln M_n(p) is convex in p with its minimum at k/n, so beyond the target on one side it only grows.
  if (logMixtureRatio(plan, errors, trials, plan.target) < plan.logThreshold) return "continue";
  return rate < plan.target ? "supported" : "refuted";
}

/**
 * The confidence sequence at this point: the p with M_n(p) < 1/α, an interval around k/n found by bisection on ln p
 * (to a relative 1e-9); it holds the true rate at every n at once with probability at least the confidence.
 */
export function confidenceSequence(plan: SequentialPlan, errors: number, trials: number): Interval {
  checkTotals(errors, trials, plan.priorB);
  if (trials === 0) return { lower: 0, upper: 1 };
  const excess = (p: number) => logMixtureRatio(plan, errors, trials, p) - plan.logThreshold;
  const rate = errors / trials;
  const edge = (from: number, to: number) => Math.exp(bisect((lp) => excess(Math.exp(lp)), Math.log(from), Math.log(to), 1e-9, 200));
  // M_n(k/n) ≤ 1 (a mixture of likelihoods is at most the largest), so k/n is always inside; M_n grows without bound
  // towards p = 0 when k > 0 and towards p = 1 when k < n. p = 1 itself is left out: there the formula is ∞ − ∞.
  return {
    lower: errors === 0 ? 0 : edge(Number.MIN_VALUE, Math.min(rate, 1 - Number.EPSILON)),
    upper: errors === trials ? 1 : excess(1 - Number.EPSILON) < 0 ? 1 : edge(Math.max(rate, Number.MIN_VALUE), 1 - Number.EPSILON),
  };
}
