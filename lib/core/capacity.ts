import expm1 from "@stdlib/math-base-special-expm1";
import log1p from "@stdlib/math-base-special-log1p";
import { InputError } from "./errors";
import { bisect } from "./numeric";

function checkProbability(x: number, name: string): void {
  if (!(x >= 0 && x <= 1)) throw new InputError(`${name} must be a probability in [0, 1]; got ${x}`);
}

function checkNonNegative(x: number, name: string): void {
  if (!(x >= 0 && x < Infinity)) throw new InputError(`${name} must be a finite number ≥ 0; got ${x}`);
}

/** Binary entropy H2(p) = −p·log2 p − (1 − p)·log2(1 − p) in bits, H2(0) = H2(1) = 0 (Shannon 1948). */
export function binaryEntropy(p: number): number {
  checkProbability(p, "p");
  if (p === 0 || p === 1) return 0;
  // H2 is symmetric; working from the smaller of p and 1 − p keeps 1 − p exact.
  const a = p > 0.5 ? 1 - p : p;
  return (-a * Math.log(a) - (1 - a) * log1p(-a)) / Math.LN2;
}

/** BSC capacity C = 1 − H2(p) bits per channel use (Shannon 1948). */
export function bscCapacity(p: number): number {
  checkProbability(p, "p");
  const x = 1 - 2 * p;
  if (Math.abs(x) >= 0.5) return 1 - binaryEntropy(p);
  // Near p = ½, 1 − H2 cancels; its series Σ x^{2m}/(m(2m − 1)) / (2 ln 2), x = 1 − 2p, keeps relative accuracy.
  const x2 = x * x;
  let term = x2;
  let sum = 0;
  for (let m = 1; term > 1e-18 * sum || sum === 0; m++) {
    if (term === 0) break;
    sum += term / (m * (2 * m - 1));
    term *= x2;
  }
  return sum / (2 * Math.LN2);
}

/** BEC capacity C = 1 − ε bits per channel use (Elias 1955). */
export function becCapacity(eps: number): number {
  checkProbability(eps, "eps");
  return 1 - eps;
}

/** Decibels to a linear power ratio, 10^(dB/10). */
export function dbToLinear(db: number): number {
  if (!Number.isFinite(db)) throw new InputError(`a dB value must be finite; got ${db}`);
  return Math.pow(10, db / 10);
}

/** A linear power ratio to decibels, 10·log10(x); 0 gives −Infinity. */
export function linearToDb(x: number): number {
  checkNonNegative(x, "a linear power ratio");
  return 10 * Math.log10(x);
}

/** Real AWGN capacity C = ½·log2(1 + SNR) bits per real channel use (Shannon 1948). */
export function awgnCapacityReal(snr: number): number {
  checkNonNegative(snr, "snr");
  return (0.5 * log1p(snr)) / Math.LN2;
}

/** Complex AWGN capacity C = log2(1 + SNR) bits per complex channel use (Shannon 1948). */
export function awgnCapacityComplex(snr: number): number {
  checkNonNegative(snr, "snr");
  return log1p(snr) / Math.LN2;
}

/** Shannon–Hartley capacity C = B·log2(1 + S/N) bits per second (Shannon 1948). */
export function shannonHartley(bandwidthHz: number, snr: number): number {
  checkNonNegative(bandwidthHz, "bandwidthHz");
  checkNonNegative(snr, "snr");
  return (bandwidthHz * log1p(snr)) / Math.LN2;
}

/**
 * Minimum linear Eb/N0 on the real AWGN channel at R bits per real dimension, (2^{2R} − 1)/(2R), ln 2 at R = 0
 * (Shannon 1948). Per complex symbol (2 real dimensions) the same limit reads (2^R − 1)/R. Written as
 * ln 2 · expm1(x)/x with x = 2R·ln 2, so that a subnormal R (where 2R loses its digits) still gives ln 2.
 */
export function shannonLimitEbN0(rate: number): number {
  checkNonNegative(rate, "rate");
  const x = 2 * rate * Math.LN2;
  if (x === 0) return Math.LN2;
  return (expm1(x) / x) * Math.LN2;
}

function softplus(x: number): number {
  return x > 0 ? x + log1p(Math.exp(-x)) : log1p(Math.exp(x));
}

// ln|sinh y| and ln cosh y for y ≥ 0, valid where sinh and cosh overflow.
function logSinh(y: number): number {
  return y < 1 ? Math.log(Math.sinh(y)) : y - Math.LN2 + log1p(-Math.exp(-2 * y));
}

function logCosh(y: number): number {
  return y - Math.LN2 + log1p(Math.exp(-2 * y));
}

// Above this Es/N0 (30 dB) the capacity is 1 to double precision and the integral is not needed.
const HIGH_ES_N0 = 1000;
// Beyond |z| = 13, e^{−z²/2} < 1e-36 outweighs the at most linear growth of the other factor.
const Z_MAX = 13;

/** BPSK-input AWGN capacity C = 1 − E[log2(1 + e^{−2Y/σ²})], Y ~ N(1, σ²), σ² = 1/(2·Es/N0), bits per use (Shannon 1948), by trapezoid sums (Trefethen & Weideman 2014) with the h vs h/2 change as absError. */
export function bpskAwgnCapacity(esN0: number): { capacity: number; absError: number } {
  // With L = 2Y/σ² ~ N(μ, 2μ), μ = 4·Es/N0, s = √(2μ), pairing z with −z gives
  // C·ln 2 = f(μ) − ½·E[ln(1 + sinh²(sz/2)/cosh²(μ/2))], f(μ) = ln 2 − softplus(−μ),
  // which loses no digits at low SNR, unlike 1 − E[log2(1 + e^{−L})] with E close to 1 there.
  checkNonNegative(esN0, "esN0");
  if (esN0 === 0) return { capacity: 0, absError: 0 };
  // 1 − C ≤ (1 + 1/ln 2)·Q(√(2·Es/N0)) + √(2μ)·φ(√(μ/2))/ln 2, which underflows to 0 here.
  if (esN0 > HIGH_ES_N0) return { capacity: 1, absError: 0 };
  const mu = 4 * esN0;
  const s = Math.sqrt(2 * mu);
  const f0 = -log1p(expm1(-mu) / 2);
  const lc = logCosh(mu / 2);
  const g = (z: number) => Math.exp(-0.5 * z * z) * softplus(2 * (logSinh((s * z) / 2) - lc));
  // The integrand has singularities at distance π/s from the real axis; a step of a ninth of that
  // (or ½ when s is small) makes the trapezoid error about e^{−9π}·|integral| at step h.
  const h = Math.min(0.5, Math.PI / (9 * s));
  const steps = Math.ceil(Z_MAX / h);
  let coarse = g(0) / 2;
  let fine = 0;
  for (let i = 1; i <= steps; i++) {
    coarse += g(i * h);
    fine += g((i - 0.5) * h);
  }
  // Sums over z ≥ 0 of an even integrand: E = 2·h·Σ' g / √(2π).
  const norm = 2 / Math.sqrt(2 * Math.PI);
  const eCoarse = norm * h * coarse;
  const eFine = norm * (h / 2) * (coarse + fine);
  const capacity = (f0 - eFine / 2) / Math.LN2;
  const absError = Math.abs(eFine - eCoarse) / 2 / Math.LN2;
  return { capacity, absError };
}

/**
 * Minimum linear Eb/N0 for BPSK input on AWGN at code rate R: the Eb/N0 where C_BPSK(R·Eb/N0) = R (Shannon 1948),
 * by bisection on ln(Es/N0) to a bracket of 1e-13, so relative 1e-13 in Eb/N0. The capacity itself is good to
 * about 1e-15 bits (the h/2 trapezoid sum, whose error is about the square of the h-vs-h/2 change), which moves
 * the root by that over Es/N0·dC/d(Es/N0), about 1e-15 relative: the answer is within relative 1e-12.
 */
export function bpskShannonLimitEbN0(rate: number): number {
  if (!(rate > 0 && rate < 1)) throw new InputError(`rate must lie strictly between 0 and 1 for BPSK input; got ${rate}`);
  const capacityAtLn = (lnEsN0: number) => bpskAwgnCapacity(Math.exp(lnEsN0)).capacity - rate;
  // C ≤ Es/N0 / ln 2 (the Gaussian-input bound), so Es/N0 = R·ln 2 / 10^{0.1} has C < R.
  const lo = Math.log(rate * Math.LN2) - 0.1 * Math.LN10;
  const hi = Math.log(HIGH_ES_N0);
  if (capacityAtLn(hi) <= 0) throw new InputError(`rate ${rate} is too close to 1 for a double-precision answer`);
  return Math.exp(bisect(capacityAtLn, lo, hi, 1e-13, 200)) / rate;
}

/** Gap to a limit in dB: Eb/N0[dB] − 10·log10(limit). */
export function gapToLimitDb(ebN0Db: number, limitEbN0Linear: number): number {
  if (!Number.isFinite(ebN0Db)) throw new InputError(`ebN0Db must be finite; got ${ebN0Db}`);
  if (!(limitEbN0Linear > 0 && limitEbN0Linear < Infinity)) {
    throw new InputError(`the limit must be a finite linear Eb/N0 > 0; got ${limitEbN0Linear}`);
  }
  return ebN0Db - 10 * Math.log10(limitEbN0Linear);
}
