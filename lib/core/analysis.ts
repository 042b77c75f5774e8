import { type Bits, packBits, popcount32 } from "./bits";
import type { Tail } from "./channels";
import { correctingRadius, detectionCapability, sphereVolume } from "./distance";
import { InputError } from "./errors";
import { checkFullRank, checkMatrix, nullSpace, permuteColumns, systematicForm } from "./gf2";

/** Largest dimension whose 2^k words are enumerated (of the code or of its dual)… */
export const MAX_ENUMERATION_DIMENSION = 24;
/** …within 2^28 word operations (2^dimension words × ⌈n/32⌉ 32-bit words each, about 2 s). */
export const MAX_ENUMERATION_WORK = 2 ** 28;

const enumerable = (dimension: number, n: number) => dimension <= MAX_ENUMERATION_DIMENSION && 2 ** dimension * Math.ceil(n / 32) <= MAX_ENUMERATION_WORK;

/** Which enumeration weightDistribution uses for an [n, k] code: the code's 2^k words, its dual's 2^(n−k), whichever is smaller; undefined when neither fits the limits. */
export function weightDistributionMethod(n: number, k: number): "enumeration" | "dual" | undefined {
  const r = n - k;
  if (enumerable(Math.min(k, r), n)) return k <= r ? "enumeration" : "dual";
  return undefined;
}

/** Why neither the code nor its dual can be enumerated, for error messages. */
export function whyNoEnumeration(n: number, k: number): string {
  const r = n - k;
  if (k > MAX_ENUMERATION_DIMENSION && r > MAX_ENUMERATION_DIMENSION) return `k = ${k} and n − k = ${r} both exceed ${MAX_ENUMERATION_DIMENSION}`;
  return `enumerating 2^${Math.min(k, r)} words of ${n} bits would take more than 2^28 word operations`;
}

/** Weight counts of all 2^k combinations of packed rows, visited in Gray-code order so each step XORs in one row. */
function grayCodeWeights(rows: readonly Bits[], n: number): Float64Array {
  const k = rows.length;
  const counts = new Float64Array(n + 1);
  counts[0] = 1;
  const total = 2 ** k;
  const stride = (n + 31) >>> 5;
  if (stride === 1) {
    const words = Uint32Array.from(rows, (r) => packBits(r)[0] ?? 0);
    let cur = 0;
    for (let i = 1; i < total; i++) {
      // Gray code g(i) = i ⊕ (i >> 1) differs from g(i − 1) in bit ctz(i).
      cur ^= words[31 - Math.clz32(i & -i)]!;
      counts[popcount32(cur)]!++;
    }
    return counts;
  }
  const flat = new Uint32Array(k * stride);
  rows.forEach((r, i) => flat.set(packBits(r), i * stride));
  const cur = new Uint32Array(stride);
  for (let i = 1; i < total; i++) {
    const base = (31 - Math.clz32(i & -i)) * stride;
    let weight = 0;
    for (let w = 0; w < stride; w++) weight += popcount32((cur[w]! ^= flat[base + w]!));
    counts[weight]!++;
  }
  return counts;
}

/**
 * Weight distribution A_0..A_n of the code spanned by full-rank rows (k ≤ 24, 2^k·⌈n/32⌉ ≤ 2^28), by enumerating all 2^k
 * codewords in Gray-code order with packed XOR and popcount (MacWilliams & Sloane 1977, ch. 1; Gray code
 * enumeration from memory).
 */
export function enumerateWeightDistribution(rows: readonly Bits[], n?: number): bigint[] {
  const cols = rows.length === 0 ? n : checkMatrix(rows, "generator");
  if (cols === undefined) throw new InputError("a code with no generator rows needs its length n", ["n"]);
  if (!enumerable(rows.length, cols)) {
    throw new InputError(`enumerating 2^${rows.length} codewords of ${cols} bits is beyond the limit (dimension ≤ ${MAX_ENUMERATION_DIMENSION}, at most 2^28 word operations)`, ["generator"]);
  }
  checkFullRank(rows, "generator");
  return Array.from(grayCodeWeights(rows, cols), (c) => BigInt(c));
}

/**
 * MacWilliams identity: from the weight distribution B of a linear code D of length n, the
 * distribution of its dual, A_j = |D|^{−1}·Σ_i B_i·K_j(i), with the Krawtchouk polynomials
 * K_j(i) = Σ_s (−1)^s C(i, s) C(n − i, j − s) from their three-term recurrence
 * (j + 1)K_{j+1} = (n − 2i)K_j − (n − j + 1)K_{j−1}, exact in BigInt (MacWilliams & Sloane 1977, ch. 5).
 * The same transform maps A back to B.
 */
export function macWilliamsTransform(weights: readonly bigint[]): bigint[] {
  const n = weights.length - 1;
  if (n < 0) throw new InputError("the weight distribution is empty; it needs A_0..A_n", ["weights"]);
  weights.forEach((b, i) => {
    if (typeof b !== "bigint" || b < 0n) throw new InputError(`weight count ${i} must be a non-negative integer`, ["weights", i]);
  });
  if (weights[0] !== 1n) throw new InputError(`A_0 is ${weights[0]}; a linear code has exactly one word of weight 0`, ["weights", 0]);
  const size = weights.reduce((a, b) => a + b, 0n);
  if ((size & (size - 1n)) !== 0n) throw new InputError(`the counts add up to ${size}, not a power of two; no linear code has this distribution`, ["weights"]);
  const bn = BigInt(n);
  const sums = new Array<bigint>(n + 1).fill(0n);
  for (let i = 0; i <= n; i++) {
    const b = weights[i]!;
    if (b === 0n) continue;
    const bi = BigInt(i);
    let prev = 1n;
    let cur = bn - 2n * bi;
    sums[0]! += b;
    if (n >= 1) sums[1]! += b * cur;
    for (let j = 1; j < n; j++) {
      const bj = BigInt(j);
      const next = ((bn - 2n * bi) * cur - (bn - bj + 1n) * prev) / (bj + 1n);
      prev = cur;
      cur = next;
      sums[j + 1]! += b * cur;
    }
  }
  return sums.map((s, j) => {
    if (s < 0n || s % size !== 0n) throw new InputError(`the transform gives a non-integer or negative count at weight ${j}; these are not the weights of a linear code`, ["weights"]);
    return s / size;
  });
}

/**
 * Weight distribution of the code with full-rank generator rows: by enumeration of whichever of the
 * code (2^k words) and its dual (2^(n−k) words, then the MacWilliams identity) is smaller, up to
 * dimension 24 and 2^28 word operations (MacWilliams & Sloane 1977, ch. 5).
 */
export function weightDistribution(generator: readonly Bits[]): { weights: bigint[]; method: "enumeration" | "dual" } {
  const n = checkMatrix(generator, "generator");
  checkFullRank(generator, "generator");
  const k = generator.length;
  const method = weightDistributionMethod(n, k);
  if (method === undefined) throw new InputError(`the weight distribution needs the code or its dual enumerated, but ${whyNoEnumeration(n, k)}`, ["generator"]);
  if (method === "enumeration") return { weights: enumerateWeightDistribution(generator), method };
  return { weights: macWilliamsTransform(enumerateWeightDistribution(nullSpace(generator), n)), method };
}

/** Minimum distance: the smallest non-zero weight with A_j > 0, undefined for a code with one word (MacWilliams & Sloane 1977, ch. 1). */
export function minimumDistanceFromWeights(weights: readonly bigint[]): number | undefined {
  const d = weights.findIndex((a, j) => j > 0 && a > 0n);
  return d < 0 ? undefined : d;
}

/** Gilbert–Varshamov guarantee: the largest d ≤ n with Σ_{i=0}^{d−2} C(n−1, i) < 2^{n−k}, so an [n, k, d] linear code exists (Varshamov 1957; MacWilliams & Sloane 1977, ch. 1). */
export function gilbertVarshamovDistance(n: number, k: number): number {
  if (!Number.isInteger(n) || n < 1) throw new InputError(`n must be an integer ≥ 1; got ${n}`, ["n"]);
  if (!Number.isInteger(k) || k < 1 || k > n) throw new InputError(`k must be an integer from 1 to n = ${n}; got ${k}`, ["k"]);
  const limit = 1n << BigInt(n - k);
  // S(1) = 0 and S(d + 1) = S(d) + C(n − 1, d − 1); S grows with d. C(n − 1, i) follows from C(n − 1, i − 1),
  // so only the terms the sum reaches are computed.
  let sum = 0n;
  let c = 1n;
  let d = 1;
  while (d < n && sum + c < limit) {
    sum += c;
    c = (c * BigInt(n - d)) / BigInt(d);
    d++;
  }
  return d;
}

export interface Bounds {
  /** 2^k·V(n, t) ≤ 2^n; tight = perfect. */
  hamming: { lhs: bigint; rhs: bigint; holds: boolean; tight: boolean };
  /** d ≤ n − k + 1; tight = MDS. */
  singleton: { maxDistance: number; holds: boolean; tight: boolean };
  /** Existence: some [n, k] linear code has d ≥ distance; `reached` when this code's d does too. */
  gilbertVarshamov: { distance: number; reached: boolean };
  /** M = 2^k ≤ maxSize when 2d ≥ n; not applicable otherwise. */
  plotkin: { applicable: false } | { applicable: true; maxSize: bigint; holds: boolean; tight: boolean };
  /** n ≥ Σ_{i<k} ⌈d/2^i⌉. */
  griesmer: { minLength: number; holds: boolean; tight: boolean };
}

/**
 * Bounds for an [n, k, d] binary linear code: Hamming (sphere packing) 2^k·V(n, t) ≤ 2^n, Singleton
 * d ≤ n − k + 1, Gilbert–Varshamov (existence), Plotkin M ≤ 2⌊d/(2d − n)⌋ for 2d > n and M ≤ 2n for
 * 2d = n, Griesmer n ≥ Σ_{i<k} ⌈d/2^i⌉ (MacWilliams & Sloane 1977, ch. 1, 2 and 17).
 */
export function codeBounds(n: number, k: number, d: number): Bounds {
  const gv = gilbertVarshamovDistance(n, k);
  if (!Number.isInteger(d) || d < 1 || d > n) throw new InputError(`d must be an integer from 1 to n = ${n}; got ${d}`, ["d"]);
  const t = correctingRadius(d);
  const lhs = (1n << BigInt(k)) * sphereVolume(n, t);
  const rhs = 1n << BigInt(n);
  const size = 1n << BigInt(k);
  let plotkin: Bounds["plotkin"] = { applicable: false };
  if (2 * d >= n) {
    const maxSize = 2 * d > n ? 2n * BigInt(Math.floor(d / (2 * d - n))) : 2n * BigInt(n);
    plotkin = { applicable: true, maxSize, holds: size <= maxSize, tight: size === maxSize };
  }
  let minLength = 0;
  for (let i = 0; i < k; i++) {
    const term = Math.ceil(d / 2 ** i);
    // Every later term is 1 too.
    if (term === 1) {
      minLength += k - i;
      break;
    }
    minLength += term;
  }
  return {
    hamming: { lhs, rhs, holds: lhs <= rhs, tight: lhs === rhs },
    singleton: { maxDistance: n - k + 1, holds: d <= n - k + 1, tight: d === n - k + 1 },
    gilbertVarshamov: { distance: gv, reached: d >= gv },
    plotkin,
    griesmer: { minLength, holds: n >= minLength, tight: n === minLength },
  };
}

function lnBig(x: bigint): number {
  const s = x.toString(16);
  if (s.length <= 13) return Math.log(Number(x));
  // Top 13 hex digits carry full double precision; the rest is a power of 16.
  return Math.log(parseInt(s.slice(0, 13), 16)) + (s.length - 13) * 4 * Math.LN2;
}

/**
 * Undetected-error probability of a linear code on a BSC with crossover p: P_ud = Σ_{i≥1} A_i p^i (1 − p)^{n−i},
 * the chance that the error pattern is a non-zero codeword, summed in log space (MacWilliams & Sloane 1977,
 * ch. 1; Lin & Costello 2004, ch. 3).
 */
export function undetectedErrorProbability(weights: readonly bigint[], p: number): Tail {
  if (!(p >= 0 && p <= 1)) throw new InputError(`p must be a probability from 0 to 1; got ${p}`, ["p"]);
  const n = weights.length - 1;
  const lnP = Math.log(p);
  const lnQ = Math.log1p(-p);
  // 0·ln 0 = 0: at p = 1 the weight-n term is A_n, at p = 0 every term vanishes.
  const xlog = (a: number, l: number) => (a === 0 ? 0 : a * l);
  const terms: number[] = [];
  for (let i = 1; i <= n; i++) {
    const a = weights[i]!;
    if (a > 0n) terms.push(lnBig(a) + xlog(i, lnP) + xlog(n - i, lnQ));
  }
  const top = Math.max(...terms, -Infinity);
  if (top === -Infinity) return { value: 0, log10: -Infinity };
  const ln = top + Math.log(terms.reduce((s, x) => s + Math.exp(x - top), 0));
  return { value: Math.exp(ln), log10: ln / Math.LN10 };
}

/** What analysis reports about an [n, k] binary linear code from its weight distribution. */
export interface CodeParameters {
  n: number;
  k: number;
  rate: number;
  /** A_0..A_n. */
  weightDistribution: bigint[];
  weightDistributionMethod: "enumeration" | "dual" | "closed-form";
  minimumDistance: number;
  /** t = ⌊(d − 1)/2⌋. */
  correctingRadius: number;
  /** d − 1. */
  detectionCapability: number;
  /** V(n, t) = Σ_{i≤t} C(n, i). */
  sphereVolume: bigint;
  bounds: Bounds;
  perfect: boolean;
  mds: boolean;
}

/** A code's matrices: H in its own column order, and G = [I_k | P], H = [Pᵀ | I_{n−k}] after permuting columns (column j of each is original column permutation[j]). */
export interface CodeMatrices {
  /** H with H·Gᵀ = 0 in the code's own column order. */
  parityCheck: Bits[];
  systematic: { generator: Bits[]; parityCheck: Bits[]; permutation: number[]; permuted: boolean };
}

export type CodeAnalysis = CodeParameters & CodeMatrices;

/**
 * Minimum distance, t, detection capability, sphere volume, the Hamming / Singleton / Gilbert–Varshamov /
 * Plotkin / Griesmer bounds and the perfect and MDS flags of an [n, k] binary linear code with the weight
 * distribution A_0..A_n (MacWilliams & Sloane 1977, ch. 1, 2 and 17).
 */
export function codeParameters(k: number, weights: bigint[], method: CodeParameters["weightDistributionMethod"]): CodeParameters {
  const d = minimumDistanceFromWeights(weights);
  if (d === undefined) throw new InputError("the code has a single codeword, so it has no minimum distance", ["generator"]);
  return { ...distanceParameters(weights.length - 1, k, d), weightDistribution: weights, weightDistributionMethod: method };
}

/** The same parameters from n, k and a known minimum distance d, for codes whose d is known without their weights. */
export function distanceParameters(n: number, k: number, d: number): Omit<CodeParameters, "weightDistribution" | "weightDistributionMethod"> {
  const bounds = codeBounds(n, k, d);
  return {
    n,
    k,
    rate: k / n,
    minimumDistance: d,
    correctingRadius: correctingRadius(d),
    detectionCapability: detectionCapability(d),
    sphereVolume: sphereVolume(n, correctingRadius(d)),
    bounds,
    perfect: bounds.hamming.tight,
    mds: bounds.singleton.tight,
  };
}

/** Systematic G and H of the code with full-rank generator rows, and H in the code's own order (MacWilliams & Sloane 1977, ch. 1). */
export function codeMatrices(generator: readonly Bits[]): CodeMatrices {
  const sys = systematicForm(generator, "generator");
  const parityCheck = nullSpace(generator);
  return {
    parityCheck,
    systematic: {
      generator: sys.rows,
      parityCheck: permuteColumns(parityCheck, sys.permutation),
      permutation: sys.permutation,
      permuted: sys.permutation.some((c, j) => c !== j),
    },
  };
}

/**
 * Parameters of the binary linear code with the given full-rank generator rows: weight distribution,
 * minimum distance, t, detection capability, sphere volume, the Hamming / Singleton / Gilbert–Varshamov /
 * Plotkin / Griesmer bounds, perfect and MDS flags, and systematic generator and parity-check matrices
 * (MacWilliams & Sloane 1977, ch. 1, 2, 5 and 17).
 */
export function analyzeCode(generator: readonly Bits[]): CodeAnalysis {
  const { weights, method } = weightDistribution(generator);
  return { ...codeParameters(generator.length, weights, method), ...codeMatrices(generator) };
}
