import { type Bits, packBits, popcount32 } from "./bits";
import { InputError } from "./errors";

function requireCount(x: number, name: string): void {
  if (!Number.isSafeInteger(x) || x < 0) throw new InputError(`${name} must be a non-negative integer; got ${x}`);
}

/** Hamming weight: the number of ones in the word (Hamming 1950). */
export function hammingWeight(bits: Bits): number {
  let w = 0;
  for (let i = 0; i < bits.length; i++) w += bits[i]!;
  return w;
}

/** Hamming distance d(a, b) = weight(a ⊕ b) by packed XOR and popcount, with the first maxPositions differing positions (0-based) (Hamming 1950). */
export function hammingDistance(
  a: Bits,
  b: Bits,
  maxPositions: number,
): { distance: number; positions: number[]; positionsTruncated: boolean } {
  if (a.length !== b.length) throw new InputError(`the words differ in length: ${a.length} and ${b.length} bits`);
  requireCount(maxPositions, "maxPositions");
  const pa = packBits(a);
  const pb = packBits(b);
  let distance = 0;
  const positions: number[] = [];
  for (let w = 0; w < pa.length; w++) {
    let x = (pa[w]! ^ pb[w]!) >>> 0;
    if (x === 0) continue;
    distance += popcount32(x);
    while (x !== 0 && positions.length < maxPositions) {
      // Lowest set bit first, so positions come out in increasing order.
      positions.push(w * 32 + 31 - Math.clz32(x & -x));
      x = (x & (x - 1)) >>> 0;
    }
  }
  return { distance, positions, positionsTruncated: distance > positions.length };
}

/** Minimum distance min_{i<j} d(w_i, w_j) of equal-length words with the first maxPairs closest pairs in lexicographic order; duplicates give 0 (MacWilliams & Sloane 1977, ch. 1). */
export function codebookDistance(
  words: Bits[],
  maxPairs: number,
): { minimumDistance: number; closestPairs: [number, number][]; closestPairsTruncated: boolean; pairsCompared: number } {
  if (words.length < 2) throw new InputError(`a codebook needs at least 2 words; got ${words.length}`);
  requireCount(maxPairs, "maxPairs");
  const n = words[0]!.length;
  for (let i = 1; i < words.length; i++) {
    const len = words[i]!.length;
    if (len !== n) throw new InputError(`word ${i} has ${len} bits but word 0 has ${n}; all words need the same length`, [i]);
  }
  const m = words.length;
  const stride = (n + 31) >>> 5;
  const packed = new Uint32Array(m * stride);
  words.forEach((w, i) => packed.set(packBits(w), i * stride));

  let best = n + 1;
  let closestPairs: [number, number][] = [];
  let truncated = false;
  for (let i = 0; i < m; i++) {
    const oi = i * stride;
    for (let j = i + 1; j < m; j++) {
      const oj = j * stride;
      let d = 0;
      // A pair stops counting once it is already farther apart than the best pair so far.
      for (let w = 0; w < stride && d <= best; w++) d += popcount32(packed[oi + w]! ^ packed[oj + w]!);
      if (d > best) continue;
      if (d < best) {
        best = d;
        closestPairs = [];
        truncated = false;
      }
      if (closestPairs.length < maxPairs) closestPairs.push([i, j]);
      else truncated = true;
    }
  }
  return { minimumDistance: best, closestPairs, closestPairsTruncated: truncated, pairsCompared: (m * (m - 1)) / 2 };
}

/** Error-correcting radius t = ⌊(dmin − 1)/2⌋, 0 for dmin ≤ 1 (Hamming 1950; MacWilliams & Sloane 1977, ch. 1). */
export function correctingRadius(dmin: number): number {
  requireCount(dmin, "dmin");
  return dmin <= 1 ? 0 : Math.floor((dmin - 1) / 2);
}

/** Guaranteed error-detection capability dmin − 1, 0 for dmin = 0 (MacWilliams & Sloane 1977, ch. 1). */
export function detectionCapability(dmin: number): number {
  requireCount(dmin, "dmin");
  return Math.max(dmin - 1, 0);
}

/** Volume of a Hamming sphere V(n, t) = Σ_{i=0}^{min(t,n)} C(n, i), exact (MacWilliams & Sloane 1977, ch. 1). */
export function sphereVolume(n: number, t: number): bigint {
  requireCount(n, "n");
  requireCount(t, "t");
  const top = Math.min(t, n);
  let term = 1n;
  let sum = 1n;
  const bn = BigInt(n);
  for (let i = 1; i <= top; i++) {
    // C(n, i) = C(n, i−1)·(n − i + 1)/i divides exactly.
    term = (term * (bn - BigInt(i) + 1n)) / BigInt(i);
    sum += term;
  }
  return sum;
}

/** log2(x) of a positive bigint from its bit length and top 64 bits, accurate to double precision at any size. */
export function log2BigInt(x: bigint): number {
  if (x < 0n) throw new InputError("log2BigInt needs a non-negative value");
  if (x === 0n) return -Infinity;
  if (x < 2n ** 53n) return Math.log2(Number(x));
  const hex = x.toString(16);
  const bitLength = (hex.length - 1) * 4 + (32 - Math.clz32(parseInt(hex[0]!, 16)));
  const shift = bitLength - 64;
  return Math.log2(Number(x >> BigInt(shift))) + shift;
}

function toBigCount(size: bigint | number): bigint {
  if (typeof size === "bigint") {
    if (size < 0n) throw new InputError("size must be non-negative");
    return size;
  }
  requireCount(size, "size");
  return BigInt(size);
}

/** Perfect code test: size·V(n, t) = 2^n exactly (MacWilliams & Sloane 1977). */
export function isPerfect(size: bigint | number, n: number, t: number): boolean {
  return toBigCount(size) * sphereVolume(n, t) === 1n << BigInt(n);
}

/** Hamming (sphere-packing) bound size·V(n, t) ≤ 2^n, exact (Hamming 1950; MacWilliams & Sloane 1977, ch. 1). */
export function hammingBoundHolds(size: bigint | number, n: number, t: number): boolean {
  return toBigCount(size) * sphereVolume(n, t) <= 1n << BigInt(n);
}
