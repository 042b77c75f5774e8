import erfc from "@stdlib/math-base-special-erfc";
import erfcinv from "@stdlib/math-base-special-erfcinv";
import { InputError } from "./errors";
import { bisect, integrate } from "./numeric";

/** A Gray-mapped constellation on AWGN. */
export type Modulation = { scheme: "bpsk" } | { scheme: "qpsk" } | { scheme: "psk"; order: number } | { scheme: "qam"; order: number };

/** Largest M-PSK order accepted; beyond it the required Eb/N0 leaves the [−20, 80] dB search range. */
export const MAX_PSK_ORDER = 1024;
/** Square M-QAM constellation sizes accepted. */
export const QAM_ORDERS: readonly number[] = [4, 16, 64, 256, 1024, 4096];

/** Gaussian tail Q(x) = ½·erfc(x/√2) (Proakis & Salehi 2008, ch. 2). */
export function qfunc(x: number): number {
  return 0.5 * erfc(x / Math.SQRT2);
}

/** Inverse Gaussian tail Q⁻¹(p) = √2·erfcinv(2p) for p in [0, 1] (Proakis & Salehi 2008, ch. 2). */
export function qinv(p: number): number {
  if (!(p >= 0 && p <= 1)) throw new InputError(`p must be a probability in [0, 1]; got ${p}`);
  return Math.SQRT2 * erfcinv(2 * p);
}

// The cases with different formulas; M-PSK of order 2 and 4 are BPSK and QPSK.
type Scheme = { kind: "bpsk" | "qpsk" | "psk" | "qam"; M: number; k: number };

function resolve(mod: Modulation): Scheme {
  switch (mod.scheme) {
    case "bpsk":
      return { kind: "bpsk", M: 2, k: 1 };
    case "qpsk":
      return { kind: "qpsk", M: 4, k: 2 };
    case "psk": {
      const M = mod.order;
      if (!Number.isInteger(M) || M < 2 || M > MAX_PSK_ORDER || (M & (M - 1)) !== 0) {
        throw new InputError(`psk order must be a power of 2 from 2 to ${MAX_PSK_ORDER}; got ${M}`, ["order"]);
      }
      if (M === 2) return { kind: "bpsk", M, k: 1 };
      if (M === 4) return { kind: "qpsk", M, k: 2 };
      return { kind: "psk", M, k: Math.log2(M) };
    }
    case "qam": {
      const M = mod.order;
      if (!QAM_ORDERS.includes(M)) {
        throw new InputError(`qam order must be a square constellation size, one of ${QAM_ORDERS.join(", ")}; got ${M}`, ["order"]);
      }
      return { kind: "qam", M, k: Math.log2(M) };
    }
    default:
      throw new InputError(`unknown modulation scheme ${JSON.stringify((mod as { scheme: unknown }).scheme)}`, ["scheme"]);
  }
}

function checkEbN0(ebN0: number): void {
  if (!(ebN0 >= 0 && ebN0 < Infinity)) throw new InputError(`ebN0 must be a finite linear ratio ≥ 0; got ${ebN0}`);
}

// Beyond v = 27, e^{−v²} < 1e-316 and adds nothing to the integral.
const V_MAX = 27;

/** Exact M-PSK SER by Craig's integral (1/π)∫₀^{(M−1)π/M} exp(−k·Eb/N0·sin²(π/M)/sin²θ) dθ (Craig 1991; Proakis & Salehi 2008, ch. 4), adaptive Gauss–Legendre to relative 1e-13. */
export function pskSymbolErrorRate(order: number, ebN0: number): { value: number; absError: number } {
  // For c > 1 the substitution v = √c·cot θ gives e^{−c}/(π√c)·[∫₀^∞ + ∫₀^{√c·cot(π/M)}] e^{−v²}/(1 + v²/c) dv,
  // whose integrand no longer narrows as c grows and whose factor e^{−c} is taken out before it can underflow.
  const { M, k } = resolve({ scheme: "psk", order });
  checkEbN0(ebN0);
  const c = k * ebN0 * Math.sin(Math.PI / M) ** 2;
  const opts = { relTol: 1e-13 };
  if (c <= 1) {
    const f = (theta: number) => Math.exp(-c / Math.sin(theta) ** 2);
    const r = integrate(f, 0, Math.PI - Math.PI / M, opts);
    return { value: r.value / Math.PI, absError: r.absError / Math.PI };
  }
  const g = (v: number) => Math.exp(-v * v) / (1 + (v * v) / c);
  const whole = integrate(g, 0, V_MAX, opts);
  const part = integrate(g, 0, Math.min(V_MAX, Math.sqrt(c) / Math.tan(Math.PI / M)), opts);
  const scale = Math.exp(-c) / (Math.PI * Math.sqrt(c));
  return { value: scale * (whole.value + part.value), absError: scale * (whole.absError + part.absError) };
}

/** Largest M-PSK order whose exact Gray BER is served: it costs M/2 Craig-type integrals per point. */
export const MAX_EXACT_PSK_ORDER = 16;

/**
 * P(received phase in (ψ, π)) for phase 0 sent at Es/N0 on AWGN, ψ in (0, π): (1/2π)∫₀^{π−ψ} exp(−Es/N0·sin²ψ/sin²θ) dθ
 * (Pawula, Rice & Roberts, IEEE Trans. Commun. 30(8), 1982; Craig 1991), adaptive Gauss–Legendre to relative 1e-13
 * or the absolute error absTol, whichever is larger.
 */
function phaseTail(esN0: number, psi: number, absTol: number): number {
  const c = esN0 * Math.sin(psi) ** 2;
  if (c <= 1) {
    const opts = { relTol: 1e-13, absTol: 2 * Math.PI * absTol };
    return integrate((theta) => Math.exp(-c / Math.sin(theta) ** 2), 0, Math.PI - psi, opts).value / (2 * Math.PI);
  }
  // v = √c·cot θ as in pskSymbolErrorRate: e^{−c}/(2π√c)·∫_{−√c·cot ψ}^∞ e^{−v²}/(1 + v²/c) dv, integrated from its
  // lower end directly so that beyond ψ = π/2 no difference of two near-equal integrals is taken.
  const g = (v: number) => Math.exp(-v * v) / (1 + (v * v) / c);
  const lower = Math.max(-V_MAX, -Math.sqrt(c) / Math.tan(psi));
  if (lower >= V_MAX) return 0;
  const scale = Math.exp(-c) / (2 * Math.PI * Math.sqrt(c));
  if (scale === 0) return 0;
  const opts = { relTol: 1e-13, absTol: absTol / scale };
  const sum = lower < 0 ? integrate(g, lower, 0, opts).value + integrate(g, 0, V_MAX, opts).value : integrate(g, lower, V_MAX, opts).value;
  return scale * sum;
}

/**
 * Exact BER of M-PSK with the binary reflected Gray labelling on AWGN at linear Eb/N0 (Lee, "Computation of the bit
 * error rate of coherent M-ary PSK with Gray code bit mapping", IEEE Trans. Commun. 34(5), 1986, from memory; the
 * sector form below is checked against an enumeration over the phase density in the tests):
 * Pb = (1/k)·Σ_{d=1}^{M−1} w_d·P_d, with w_d the Hamming distance between the labels of points d apart, averaged over
 * the M points, and P_d the probability of deciding the point d sectors away, P_d = G((2d − 1)π/M) − G((2d + 1)π/M)
 * for d < M/2 and P_{M/2} = 2·G((M − 1)π/M), G(ψ) = (1/2π)∫₀^{π−ψ} exp(−k·Eb/N0·sin²ψ/sin²θ) dθ (Pawula et al. 1982).
 */
export function pskBerExact(order: number, ebN0: number): number {
  const { M, k } = resolve({ scheme: "psk", order });
  checkEbN0(ebN0);
  if (M > MAX_EXACT_PSK_ORDER) throw new InputError(`the exact Gray BER is served for M-PSK up to M = ${MAX_EXACT_PSK_ORDER}; got ${M}`, ["order"]);
  const gray = (i: number) => i ^ (i >> 1);
  const weight = (d: number) => {
    let total = 0;
    for (let i = 0; i < M; i++) for (let x = gray(i) ^ gray((i + d) % M); x; x &= x - 1) total++;
    return total / M;
  };
  const half = M / 2;
  // Every P_d is a share of the symbol error 2·G(π/M), so the other tails need only an absolute error below 1e-14 of it.
  const first = phaseTail(k * ebN0, Math.PI / M, 0);
  const tails = Array.from({ length: half }, (_, j) => (j === 0 ? first : phaseTail(k * ebN0, ((2 * j + 1) * Math.PI) / M, 1e-14 * first)));
  // The far sectors are the smallest terms: add them first.
  let sum = weight(half) * 2 * tails[half - 1]!;
  for (let d = half - 1; d >= 1; d--) sum += (weight(d) + weight(M - d)) * (tails[d - 1]! - tails[d]!);
  return sum / k;
}

/**
 * Which BER formula serves M-QAM and M-PSK: the exact one (Cho & Yoon for square M-QAM, the sector sum for Gray M-PSK
 * up to MAX_EXACT_PSK_ORDER), or the nearest-neighbour approximation (symbol errors to adjacent points only, one
 * wrong bit each). Left out: exact where it is served, else nearest-neighbour.
 */
export type BerFormula = "exact" | "nearest-neighbour";
/** The BER formulas by name. */
export const BER_FORMULAS: readonly BerFormula[] = ["exact", "nearest-neighbour"];

export type BerOptions = { berFormula?: BerFormula };

// Whether the exact BER formula applies: asked for, or left out where one is served.
function exactApplies({ kind, M }: Scheme, opts: BerOptions): boolean {
  const served = kind !== "psk" || M <= MAX_EXACT_PSK_ORDER;
  if (opts.berFormula === "exact" && !served) {
    throw new InputError(`the exact Gray BER is served for M-PSK up to M = ${MAX_EXACT_PSK_ORDER}; use berFormula "nearest-neighbour" for M = ${M}`, ["berFormula"]);
  }
  return opts.berFormula === undefined ? served : opts.berFormula === "exact";
}

// Cho & Yoon's coefficients summed over the bit positions k, by i: the terms with the same erfc argument.
const choYoonCache = new Map<number, Float64Array>();

function choYoonCoefficients(M: number): Float64Array {
  const cached = choYoonCache.get(M);
  if (cached) return cached;
  const side = Math.round(Math.sqrt(M));
  const bits = Math.round(Math.log2(side));
  const c = new Float64Array(side - 1);
  for (let k = 1; k <= bits; k++) {
    const w = 2 ** (k - 1);
    for (let i = 0; i < (1 - 2 ** -k) * side; i++) {
      const f = Math.floor((i * w) / side);
      c[i]! += (f % 2 === 0 ? 1 : -1) * (w - Math.floor((i * w) / side + 0.5));
    }
  }
  choYoonCache.set(M, c);
  return c;
}

/**
 * Exact BER of Gray-labelled square M-QAM on AWGN at linear Eb/N0 (Cho & Yoon, "On the general BER expression of
 * one- and two-dimensional amplitude modulations", IEEE Trans. Commun. 50(7), 2002, eqs. for I = J = √M):
 * Pb = (1/log2 √M)·Σ_{k=1}^{log2 √M} Pb(k),
 * Pb(k) = (1/√M)·Σ_{i=0}^{(1−2^{−k})√M − 1} (−1)^{⌊i·2^{k−1}/√M⌋}·(2^{k−1} − ⌊i·2^{k−1}/√M + ½⌋)·erfc((2i + 1)·√(3·log2 M·Eb/N0/(2(M − 1)))).
 * The terms of equal i are gathered and summed from the smallest; the i = 0 term, the nearest-neighbour
 * approximation, dominates at high SNR, so no digits cancel there.
 */
export function qamBerExact(order: number, ebN0: number): number {
  const { kind, M, k } = resolve({ scheme: "qam", order });
  if (kind !== "qam") throw new InputError(`qam order must be a square constellation size; got ${order}`, ["order"]);
  checkEbN0(ebN0);
  const c = choYoonCoefficients(M);
  const x = Math.sqrt((3 * k * ebN0) / (2 * (M - 1)));
  let sum = 0;
  for (let i = c.length - 1; i >= 0; i--) if (c[i] !== 0) sum += c[i]! * erfc((2 * i + 1) * x);
  return sum / (Math.sqrt(M) * (k / 2));
}

const CHO_YOON = "Cho & Yoon 2002";

/**
 * Uncoded BER and SER on AWGN with Gray mapping at linear Eb/N0, with which formula gave each and whether it is exact
 * (Proakis & Salehi 2008, ch. 4; square M-QAM BER by Cho & Yoon 2002 and M-PSK BER up to 16-PSK by the sector sum of
 * pskBerExact unless `berFormula` is "nearest-neighbour").
 */
export function uncodedErrorRates(
  mod: Modulation,
  ebN0: number,
  opts: BerOptions = {},
): { ber: number; ser: number; berExact: boolean; serExact: boolean; berMethod: string; serMethod: string } {
  const scheme = resolve(mod);
  const { kind, M, k } = scheme;
  checkEbN0(ebN0);
  const exact = exactApplies(scheme, opts);
  const src = "Proakis & Salehi 2008";
  switch (kind) {
    case "bpsk": {
      const q = qfunc(Math.sqrt(2 * ebN0));
      const method = `exact: Q(√(2·Eb/N0)) (${src})`;
      return { ber: q, ser: q, berExact: true, serExact: true, berMethod: method, serMethod: method };
    }
    case "qpsk": {
      const q = qfunc(Math.sqrt(2 * ebN0));
      return {
        ber: q,
        ser: q * (2 - q),
        berExact: true,
        serExact: true,
        berMethod: `exact: Q(√(2·Eb/N0)), Gray mapping (${src})`,
        serMethod: `exact: 1 − (1 − Q(√(2·Eb/N0)))² (${src})`,
      };
    }
    case "psk": {
      const ser = pskSymbolErrorRate(M, ebN0).value;
      const serMethod = `exact: Craig's integral (1/π)∫₀^{(M−1)π/M} exp(−k·Eb/N0·sin²(π/M)/sin²θ) dθ, adaptive Gauss–Legendre, relative error < 1e-12 (Craig 1991; ${src})`;
      if (exact) {
        return {
          ber: pskBerExact(M, ebN0),
          ser,
          berExact: true,
          serExact: true,
          berMethod:
            "exact: (1/k)·Σ_{d=1}^{M−1} w_d·P_d, Gray mapping: w_d the mean Hamming distance between labels d points apart, " +
            "P_d = G((2d − 1)π/M) − G((2d + 1)π/M) (P_{M/2} = 2·G((M − 1)π/M)) the probability of the sector d points away, " +
            "G(ψ) = (1/2π)∫₀^{π−ψ} exp(−k·Eb/N0·sin²ψ/sin²θ) dθ, adaptive Gauss–Legendre (Lee 1986; Pawula, Rice & Roberts 1982)",
          serMethod,
        };
      }
      return {
        ber: ser / k,
        ser,
        berExact: false,
        serExact: true,
        berMethod: `approximation: SER/k, Gray mapping with symbol errors to adjacent points only (${src})`,
        serMethod,
      };
    }
    case "qam": {
      const rootM = Math.sqrt(M);
      const q = qfunc(Math.sqrt((3 * k * ebN0) / (M - 1)));
      const pRail = 2 * (1 - 1 / rootM) * q;
      const serMethod = `exact: 1 − (1 − P)², P = 2(1 − 1/√M)·Q(√(3k·Eb/N0/(M − 1))) per rail of the square constellation (${src})`;
      const ser = pRail * (2 - pRail);
      // 4-QAM is QPSK: both formulas reduce to Q(√(2·Eb/N0)).
      if (M === 4) return { ber: q, ser, berExact: true, serExact: true, berMethod: `exact: Q(√(2·Eb/N0)), Gray mapping (${src})`, serMethod };
      if (exact) {
        return {
          ber: qamBerExact(M, ebN0),
          ser,
          berExact: true,
          serExact: true,
          berMethod:
            `exact: (1/log2 √M)·Σ_{k=1}^{log2 √M} (1/√M)·Σ_{i=0}^{(1−2^{−k})√M − 1} (−1)^{⌊i·2^{k−1}/√M⌋}·(2^{k−1} − ⌊i·2^{k−1}/√M + ½⌋)` +
            `·erfc((2i + 1)·√(3k·Eb/N0/(2(M − 1)))), Gray mapping (${CHO_YOON})`,
          serMethod,
        };
      }
      return {
        ber: (4 / k) * (1 - 1 / rootM) * q,
        ser,
        berExact: false,
        serExact: true,
        berMethod: `approximation: (4/k)(1 − 1/√M)·Q(√(3k·Eb/N0/(M − 1))), Gray mapping with symbol errors to adjacent points only (${src})`,
        serMethod,
      };
    }
  }
}

/**
 * The uncoded BER at Eb/N0 = 0, the supremum of the BER curve: ½ for BPSK, QPSK and the exact formulas (exact M-PSK
 * then decides a uniformly random label; exact M-QAM one of the two outermost levels of each rail); for the
 * nearest-neighbour approximations (M − 1)/(M·log2 M) for M-PSK (SER/k) and (2/log2 M)(1 − 1/√M) for M-QAM
 * (the formulas of uncodedErrorRates at 0).
 */
export function maximumUncodedBer(mod: Modulation, opts: BerOptions = {}): number {
  return maximumBer(resolve(mod), opts);
}

// BER at Eb/N0 = 0, the supremum of the BER curve, from the same formulas.
function maximumBer(scheme: Scheme, opts: BerOptions): number {
  const { kind, M, k } = scheme;
  if (kind === "psk" && !exactApplies(scheme, opts)) return (M - 1) / M / k;
  if (kind === "qam" && M > 4 && !exactApplies(scheme, opts)) return (2 / k) * (1 - 1 / Math.sqrt(M));
  return 0.5;
}

/**
 * Linear Eb/N0 where the uncoded BER (of the formula `opts` selects) equals targetBer: erfcinv(2·BER)² when
 * BER = Q(√(2·Eb/N0)) (BPSK, QPSK, 4-QAM; Proakis & Salehi 2008), else bisection on dB to 1e-10 dB on the same
 * formula uncodedErrorRates serves.
 */
export function requiredEbN0(mod: Modulation, targetBer: number, opts: BerOptions = {}): number {
  const scheme = resolve(mod);
  const max = maximumBer(scheme, opts);
  if (!(targetBer > 0)) throw new InputError(`targetBer must be a probability greater than 0; got ${targetBer}`);
  if (!(targetBer < max)) {
    throw new InputError(
      `the BER of ${describe(mod)} never exceeds ${max} (its value at Eb/N0 = 0), so targetBer must be below it; got ${targetBer}`,
    );
  }
  if (scheme.kind === "bpsk" || scheme.kind === "qpsk" || (scheme.kind === "qam" && scheme.M === 4)) {
    return erfcinv(2 * targetBer) ** 2;
  }
  const logTarget = Math.log(targetBer);
  const f = (db: number) => Math.log(uncodedErrorRates(mod, Math.pow(10, db / 10), opts).ber) - logTarget;
  // Targets just below the maximum need Eb/N0 under −20 dB; widen the bracket until the BER exceeds the target.
  let lo = -20;
  while (f(lo) < 0) {
    lo -= 20;
    if (lo < -300) throw new InputError(`targetBer ${targetBer} is too close to the maximum BER ${max} to resolve`);
  }
  return Math.pow(10, bisect(f, lo, 80, 1e-10, 200) / 10);
}

function describe(mod: Modulation): string {
  return "order" in mod ? `${mod.order}-${mod.scheme.toUpperCase()}` : mod.scheme.toUpperCase();
}
