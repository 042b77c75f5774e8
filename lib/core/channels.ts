import { InputError } from "./errors";
import { logBinomialPmf, logBinomialTails } from "./probability";

export { bscCapacity } from "./capacity";

/** A probability with its base-10 log, which stays finite when the value underflows; −Infinity only for impossible events. */
export type Tail = { value: number; log10: number };

function fromLn(ln: number): Tail {
  return { value: Math.exp(ln), log10: ln / Math.LN10 };
}

function checkCount(x: number, name: string, max: number): void {
  if (!Number.isInteger(x) || x < 0 || x > max) throw new InputError(`${name} must be an integer from 0 to ${max}; got ${x}`);
}

/** Probabilities of exactly, at most and more than i bit flips in n uses of a BSC with crossover p: the Bin(n, p) pmf, cdf and tail (Proakis & Salehi 2008; Loader 2000). */
export function bscFlips(n: number, i: number, p: number): { exactly: Tail; atMost: Tail; moreThan: Tail } {
  const { lower, upper } = logBinomialTails(n, i, p);
  checkCount(i, "i", n);
  return { exactly: fromLn(logBinomialPmf(n, i, p)), atMost: fromLn(lower), moreThan: fromLn(upper) };
}

/** Block error of a t-error-correcting length-n code under bounded-distance decoding on a BSC: P(more than t flips) = Σ_{j>t} C(n, j)pʲ(1 − p)^{n−j} (Proakis & Salehi 2008). */
export function bscBlockError(n: number, t: number, p: number): Tail {
  checkCount(t, "t", Number.MAX_SAFE_INTEGER);
  return fromLn(logBinomialTails(n, t, p).upper);
}

/** Post-decoding BER estimate P_b ≈ (1/n)·Σ_{j=t+1}^{n} j·C(n, j)pʲ(1 − p)^{n−j} (Sklar, Digital Communications, 2nd ed., 2001, from memory). */
export function bscPostDecodingBer(n: number, t: number, p: number): Tail {
  // j·C(n, j) = n·C(n − 1, j − 1) turns the sum into p·P(Bin(n − 1, p) ≥ t), one binomial tail.
  if (!Number.isInteger(n) || n < 1) throw new InputError(`n must be an integer ≥ 1; got ${n}`);
  checkCount(t, "t", Number.MAX_SAFE_INTEGER);
  const { upper } = logBinomialTails(n - 1, t - 1, p);
  // p·e^upper rounds once less than e^{ln p + upper}; p ≤ 1, so it underflows only when the sum does.
  return { value: p * Math.exp(upper), log10: (Math.log(p) + upper) / Math.LN10 };
}

/**
 * The number of bit flips in n uses of a BSC with crossover p, Bin(n, p): mean n·p, standard deviation √(n·p·(1 − p)),
 * most likely count ⌊(n + 1)p⌋ (at most n) with its probability; when (n + 1)p is a whole number from 1 to n,
 * (n + 1)p − 1 is as likely (Feller, An Introduction to Probability Theory, vol. 1, 3rd ed., 1968, §VI.3, from memory).
 */
export function bscFlipStatistics(n: number, p: number): { mean: number; standardDeviation: number; mostLikely: number; mostLikelyProbability: Tail; tiedWith?: number } {
  if (!Number.isInteger(n) || n < 1) throw new InputError(`n must be an integer ≥ 1; got ${n}`);
  if (!(p >= 0 && p <= 1)) throw new InputError(`p must be a probability from 0 to 1; got ${p}`);
  const np1 = (n + 1) * p;
  const mostLikely = Math.min(n, Math.floor(np1));
  const tie = np1 === mostLikely && mostLikely >= 1 && p < 1;
  return {
    mean: n * p,
    standardDeviation: Math.sqrt(n * p * (1 - p)),
    mostLikely,
    mostLikelyProbability: fromLn(logBinomialPmf(n, mostLikely, p)),
    ...(tie ? { tiedWith: mostLikely - 1 } : {}),
  };
}
