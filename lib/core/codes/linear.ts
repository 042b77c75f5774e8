import { minimumDistanceFromWeights, weightDistribution, weightDistributionMethod, whyNoEnumeration } from "../analysis";
import { type Bits, packBits, popcount32 } from "../bits";
import { correctingRadius, sphereVolume } from "../distance";
import { InputError } from "../errors";
import { checkBinaryWord, checkFullRank, checkMatrix, nullSpace, rejectErasures, rref } from "../gf2";
import type { BlockCode, DecodeResult, Word } from "./types";

/** Coset-leader tables are built up to 2^20 syndromes (n − k ≤ 20)… */
export const MAX_TABLE_REDUNDANCY = 20;
/** …and up to 2^26 table-building steps (syndromes × distinct non-zero columns of H, about half a second). */
export const MAX_TABLE_STEPS = 2 ** 26;
/** Beyond the table, bounded-distance search tries at most Σ_{i≤t} C(n, i) ≤ 2^22 error patterns per word. */
export const MAX_SEARCH_PATTERNS = 2 ** 22;

/** A binary linear code from a matrix, with its parity-check matrix. */
export interface LinearCode extends BlockCode {
  generatorRows(): Bits[];
  /** H ((n − k) × n) with H·Gᵀ = 0; the syndrome is H·rᵀ with this H. */
  parityCheckRows(): Bits[];
}

type Corrector = (syndromeInt: number, syndromeWords: Uint32Array, received: Bits) => { positions: number[]; failure: false } | { positions: number[]; failure: true; reason: string };

/**
 * Coset-leader table by breadth-first search over syndromes: level w holds the syndromes whose lightest
 * error pattern has weight w, reached from level w − 1 by one more column of H. A syndrome's leader is
 * unique exactly when every predecessor's leader is unique and it has w (predecessor, position) pairs,
 * since each of its minimum-weight patterns drops to level w − 1 in w ways (Lin & Costello 2004, ch. 3,
 * standard array; uniqueness count from memory).
 */
function cosetTable(columnInts: Int32Array, r: number, t: number): Corrector {
  const size = 1 << r;
  // One 16-bit cell per syndrome keeps the search to one random access a step: bits 0–4 the level
  // (31 = not reached; levels never exceed r ≤ 20), bit 5 "leader unique", bits 6–15 the pair count,
  // saturating at 1023, which is still exact when compared with a level.
  const UNSEEN = 31;
  const UNIQUE = 32;
  const info = new Uint16Array(size).fill(UNSEEN);
  const via = new Int32Array(size);
  // Distinct non-zero columns with their first position and how many positions share them.
  const first = new Map<number, number>();
  const counts = new Map<number, number>();
  columnInts.forEach((c, p) => {
    if (c === 0) return;
    if (!first.has(c)) first.set(c, p);
    counts.set(c, (counts.get(c) ?? 0) + 1);
  });
  const colValue = Int32Array.from(first.keys());
  const colPosition = Int32Array.from(first.values());
  const colPairs = Uint16Array.from(colValue, (c) => Math.min(counts.get(c)!, 1023) << 6);
  const queue = new Int32Array(size);
  let head = 0;
  let tail = 1;
  info[0] = UNIQUE;
  for (let w = 1; head < tail; w++) {
    const levelStart = tail;
    for (const end = tail; head < end; head++) {
      const s = queue[head]!;
      const u = info[s]! & UNIQUE;
      for (let i = 0; i < colValue.length; i++) {
        const s2 = s ^ colValue[i]!;
        const x = info[s2]!;
        const l = x & 31;
        if (l === UNSEEN) {
          info[s2] = w | u | colPairs[i]!;
          via[s2] = colPosition[i]!;
          queue[tail++] = s2;
        } else if (l === w) {
          info[s2] = w | (x & u) | Math.min((x >>> 6) + (colPairs[i]! >>> 6), 1023) << 6;
        }
      }
    }
    for (let i = levelStart; i < tail; i++) {
      const x = info[queue[i]!]!;
      if (x >>> 6 !== w) info[queue[i]!] = x & ~UNIQUE;
    }
  }
  return (s) => {
    const w = info[s]! & 31;
    const positions: number[] = [];
    for (let x = s; x !== 0; x ^= columnInts[positions[positions.length - 1]!]!) positions.push(via[x]!);
    positions.sort((a, b) => a - b);
    if (w <= t) return { positions, failure: false };
    if (info[s]! & UNIQUE) return { positions, failure: true, reason: `more than t = ${t} errors: the nearest codeword is at distance ${w}; decoded to it (maximum likelihood), but correction is only guaranteed up to t` };
    return { positions: [], failure: true, reason: `more than t = ${t} errors: several codewords are at distance ${w} (the coset leader is not unique); not corrected` };
  };
}

/** Bounded-distance decoding by trying every error pattern of weight 1..t in turn until one has the received syndrome (Lin & Costello 2004, ch. 3). */
function patternSearch(columnWords: Uint32Array, n: number, sw: number, t: number): Corrector {
  const partial = Array.from({ length: t + 1 }, () => new Uint32Array(sw));
  const chosen: number[] = [];
  const matches = (acc: Uint32Array, p: number): boolean => {
    for (let w = 0; w < sw; w++) if (acc[w] !== columnWords[p * sw + w]) return false;
    return true;
  };
  const search = (depth: number, start: number, weight: number): boolean => {
    const acc = partial[depth]!;
    if (depth === weight - 1) {
      for (let p = start; p < n; p++) {
        if (matches(acc, p)) {
          chosen[depth] = p;
          return true;
        }
      }
      return false;
    }
    const next = partial[depth + 1]!;
    for (let p = start; p <= n - (weight - depth); p++) {
      for (let w = 0; w < sw; w++) next[w] = acc[w]! ^ columnWords[p * sw + w]!;
      chosen[depth] = p;
      if (search(depth + 1, p + 1, weight)) return true;
    }
    return false;
  };
  return (_s, target) => {
    if (target.every((x) => x === 0)) return { positions: [], failure: false };
    partial[0]!.set(target);
    for (let weight = 1; weight <= t; weight++) {
      if (search(0, 0, weight)) return { positions: chosen.slice(0, weight), failure: false };
    }
    return { positions: [], failure: true, reason: `no error pattern of weight ≤ t = ${t} has this syndrome: more than t errors; not corrected` };
  };
}

/**
 * Any binary linear code from a full-rank generator G (k × n) or parity-check matrix H ((n − k) × n).
 * Encoding is c = m·G (with H given, G is H's null-space basis, which carries the message bits at the
 * non-pivot columns of H's reduced echelon form). Decoding is syndrome decoding with bounded-distance
 * semantics, t = ⌊(dmin − 1)/2⌋: a coset-leader table when n − k ≤ 20 (up to 2^20 syndromes and 2^26
 * building steps), else a search over error patterns of weight ≤ t (at most 2^22 per word), else the
 * decoder throws InputError. A received word whose coset leader is heavier than t is reported as failure:
 * decoded to the nearest codeword when that is unique, left unchanged on a tie. dmin is exact, found on
 * first use by enumerating the code or its dual (dimension ≤ 24, at most 2^28 word operations), else
 * undefined (MacWilliams & Sloane 1977, ch. 1; Lin & Costello 2004, ch. 3).
 */
export function linear(spec: { generator?: Bits[]; parityCheck?: Bits[] }): LinearCode {
  const { generator, parityCheck } = spec;
  if ((generator === undefined) === (parityCheck === undefined)) throw new InputError("give either generator or parityCheck (one of them)", []);
  let g: Bits[];
  let h: Bits[];
  let n: number;
  if (generator !== undefined) {
    n = checkMatrix(generator, "generator");
    checkFullRank(generator, "generator");
    g = generator.map((row) => row.slice());
    h = nullSpace(g, n);
  } else {
    n = checkMatrix(parityCheck!, "parityCheck");
    checkFullRank(parityCheck!, "parityCheck");
    h = parityCheck!.map((row) => row.slice());
    g = nullSpace(h, n);
  }
  const field = generator !== undefined ? "generator" : "parityCheck";
  const k = g.length;
  const r = n - k;
  const name = `linear (${n},${k})`;
  const stride = (n + 31) >>> 5;
  const gPacked = g.map(packBits);
  const hPacked = h.map(packBits);

  // Systematic when every message bit i has a column of G equal to the unit vector e_i: then m_i = c at that column.
  const unitColumn = new Array<number>(k).fill(-1);
  for (let j = n - 1; j >= 0; j--) {
    let ones = 0;
    let row = 0;
    for (let i = 0; i < k; i++) {
      if (g[i]![j]) {
        ones++;
        row = i;
      }
    }
    if (ones === 1) unitColumn[row] = j;
  }
  const messagePositions = unitColumn.every((j) => j >= 0) ? unitColumn : undefined;
  // Otherwise rref([G | I_k]) = [A·G | A] with A·G the identity on the information set J, so m = c_J·A.
  const augmented = messagePositions
    ? undefined
    : rref(
        g.map((row, i) => {
          const x = new Uint8Array(n + k);
          x.set(row);
          x[n + i] = 1;
          return x;
        }),
      );
  const messageOf = (c: Bits): Bits => {
    if (messagePositions) return Uint8Array.from(messagePositions, (j) => c[j]!);
    const m = new Uint8Array(k);
    augmented!.pivots.forEach((p, i) => {
      if (c[p]) for (let j = 0; j < k; j++) m[j]! ^= augmented!.rows[i]![n + j]!;
    });
    return m;
  };

  const encodeBits = (m: Bits): Bits => {
    const acc = new Uint32Array(stride);
    for (let i = 0; i < k; i++) if (m[i]) for (let w = 0; w < stride; w++) acc[w]! ^= gPacked[i]![w]!;
    return Uint8Array.from({ length: n }, (_, j) => (acc[j >>> 5]! >>> (j & 31)) & 1);
  };
  let dminCache: { value: number | undefined } | undefined;
  const dmin = (): number | undefined => {
    if (!dminCache) {
      const known = k > 0 && weightDistributionMethod(n, k) !== undefined;
      dminCache = { value: known ? minimumDistanceFromWeights(weightDistribution(g).weights) : undefined };
    }
    return dminCache.value;
  };

  let corrector: Corrector | undefined;
  const buildCorrector = (): Corrector => {
    // A code with one codeword (the zero word) decodes every word to it.
    if (k === 0) return (_s, _words, received) => ({ positions: [...received.keys()].filter((p) => received[p]), failure: false });
    const d = dmin();
    if (d === undefined) {
      throw new InputError(
        `${name} cannot be decoded: the minimum distance is unknown (${whyNoEnumeration(n, k)}), so bounded-distance decoding has no radius t`,
        [field],
      );
    }
    const t = correctingRadius(d);
    const sw = Math.max(1, (r + 31) >>> 5);
    const columnWords = new Uint32Array(n * sw);
    for (let i = 0; i < r; i++) for (let p = 0; p < n; p++) if (h[i]![p]) columnWords[p * sw + (i >>> 5)]! |= 1 << (i & 31);
    let why: string;
    if (r <= MAX_TABLE_REDUNDANCY) {
      const columnInts = Int32Array.from({ length: n }, (_, p) => columnWords[p * sw]!);
      const steps = 2 ** r * new Set(columnInts).size;
      if (steps <= MAX_TABLE_STEPS) return cosetTable(columnInts, r, t);
      why = `a coset-leader table for n = ${n} would take about ${steps} steps (limit 2^26)`;
    } else {
      why = `n − k = ${r} is too large for a coset-leader table (limit ${MAX_TABLE_REDUNDANCY})`;
    }
    const patterns = sphereVolume(n, t);
    if (patterns > BigInt(MAX_SEARCH_PATTERNS)) {
      throw new InputError(`${name} cannot be decoded: ${why}, and t-error search (t = ${t}) would need Σ_{i≤${t}} C(${n}, i) = ${patterns} patterns per word (limit 2^22)`, [field]);
    }
    return patternSearch(columnWords, n, sw, t);
  };

  const code: LinearCode = {
    family: "linear",
    name,
    n,
    k,
    q: 2,
    get dmin() {
      return dmin();
    },
    ...(messagePositions ? { messagePositions: [...messagePositions] } : {}),
    bitOrder:
      (generator !== undefined
        ? "Codeword = message · G: message bit i selects generator row i" + (messagePositions ? ", and reappears unchanged at messagePositions[i] (a unit column of G)." : ".")
        : "Codeword = message · G with G the null-space basis of H, which has the identity at the non-pivot columns of H's reduced echelon form: message bit i sits at messagePositions[i].") +
      " Syndrome bit i = row i of the parity-check matrix times the received word.",
    supportsErasures: false,
    encode(message: Word): Bits {
      return encodeBits(checkBinaryWord(message, k, "message", name));
    },
    decode(received: Word, erasures?: number[]): DecodeResult {
      const w = checkBinaryWord(received, n, "received", name);
      rejectErasures(erasures, name);
      corrector ??= buildCorrector();
      const packed = packBits(w);
      const syndrome = new Uint8Array(r);
      const syndromeWords = new Uint32Array(Math.max(1, (r + 31) >>> 5));
      for (let i = 0; i < r; i++) {
        let x = 0;
        for (let q = 0; q < stride; q++) x ^= hPacked[i]![q]! & packed[q]!;
        syndrome[i] = popcount32(x) & 1;
        syndromeWords[i >>> 5]! |= syndrome[i]! << (i & 31);
      }
      const result = corrector(syndromeWords[0]!, syndromeWords, w);
      const codeword = w.slice();
      for (const p of result.positions) codeword[p]! ^= 1;
      const base = { message: messageOf(codeword), codeword, correctedPositions: result.positions, syndrome };
      return result.failure ? { ...base, failure: true, reason: result.reason } : { ...base, failure: false };
    },
    generatorRows: () => g.map((row) => row.slice()),
    parityCheckRows: () => h.map((row) => row.slice()),
  };
  return code;
}
