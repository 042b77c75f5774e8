import { parseBits } from "@/lib/core/bits";
import { MAX_ENUMERATION_WORK } from "@/lib/core/analysis";
import { MAX_SEARCH_PATTERNS, MAX_TABLE_REDUNDANCY, MAX_TABLE_STEPS } from "@/lib/core/codes/linear";
import { crcPreset } from "@/lib/core/codes/crc";
import { at } from "./endpoint";
import { MAX_MATRIX_N, type CodeSpec } from "./code-spec";
import type { WordInput } from "./codes";
import { refuse, workLimits } from "./work";

/**
 * The shape of the code a spec describes and the work its operations cost, read off the spec's parameters
 * without building anything (a Reed–Solomon generator, a BCH generator or a linear code's tables can take
 * seconds to build, so the estimate must come first). Work is in the units of lib/api/work.ts (about a
 * nanosecond each here); the constants were fitted to timings of each family's kernels on this machine and
 * err on the high side. BCH's n − k comes from its cyclotomic cosets. CODE_WORK_RULE publishes these formulas.
 */
export interface CodeWork {
  n: number;
  k: number;
  /** Bits per symbol: 1, or m for Reed–Solomon. */
  m: number;
  /** Building the encoder. */
  build: number;
  /** Building what decoding needs beyond the encoder (a linear code's minimum distance and syndrome table). */
  decoderBuild: number;
  encodePerWord: number;
  /** Worst case over received words (a linear code's pattern search tries every pattern up to its limit). */
  decodePerWord: number;
  /** What bounds the work, for refusals: "n − k = 5535 parity symbols", and how to ask for less. */
  scale: string;
}

const words32 = (bits: number) => Math.ceil(bits / 32);

/**
 * n − k of the narrow-sense primitive BCH code of designed distance 2t + 1 over GF(2^m): the degree of the
 * generator, the number of exponents in the cyclotomic cosets {i·2^j mod 2^m − 1} of 1 … 2t (Lin & Costello
 * 2004, ch. 6). At most 2^m steps, so it is cheap to know before the generator is built.
 */
function bchRedundancy(m: number, t: number): number {
  const n0 = 2 ** m - 1;
  const seen = new Uint8Array(n0);
  let r = 0;
  for (let i = 1; i <= Math.min(2 * t, n0 - 1); i++) {
    for (let e = i % n0; !seen[e]; e = (2 * e) % n0) {
      seen[e] = 1;
      r++;
    }
  }
  return r;
}

/** Rows and row length of a linear code's matrix: the first row is parsed (it is short); the others must match it. */
function matrixShape(spec: Extract<CodeSpec, { family: "linear" }>): { rows: number; n: number } {
  const field = spec.generator ? "generator" : "parityCheck";
  const rows = (spec.generator ?? spec.parityCheck)!;
  const n = at(["code", field, 0], () => parseBits(rows[0]!, MAX_MATRIX_N)).length;
  return { rows: rows.length, n };
}

/** Message bits a CRC spec's analysis covers, and its width. */
const crcWidth = (spec: Extract<CodeSpec, { family: "crc" }>) => spec.width ?? crcPreset(spec.preset!).width;

/** The formulas of codeWork and batchWork, for the reference. */
export const CODE_WORK_RULE =
  "Building the code: 64 for repetition, 64 + 32·n for parity, 8·2^r for Hamming, 2^16 for Golay, 4,096 for CRC, 2·rows·n·⌈n/32⌉ + 8·rows·n for a matrix code, " +
  "8·2^m + (m·t)²/4 for BCH, 8·2^m + 6·(n − k)² for Reed–Solomon. Per word encoded: 64 + 8·n for repetition, parity and Hamming, 256 for Golay, " +
  "64 + 8·(bits + width) for CRC, 8·k·⌈n/32⌉ + 16·n for a matrix code, n·(n − k)/32 + 16·n for BCH, 8·k·(n − k) + 16·n for Reed–Solomon. " +
  "Decoding adds, for a matrix code, its minimum distance 4·min(2^min(k, n−k)·⌈n/32⌉, 2^28) and, when n − k ≤ 20, its syndrome table 4·min(2^(n−k)·n, 2^26); " +
  "per word decoded: 64 + 8·n for repetition and parity, 64 + 16·n for Hamming, 4,096 for Golay, 64 + 8·(bits + width) for CRC, " +
  "8·(n − k)·⌈n/32⌉ + 16·n for a matrix code (+ 4·2^22·⌈(n − k)/32⌉ when n − k > 20: the pattern search), 6·n·t + 4·t² + 16·n for BCH, 12·n·(n − k) + 6·(n − k)² + 16·n for Reed–Solomon. " +
  "n and k in symbols for Reed–Solomon; a word's bits as sent (a `text` character counts 24).";

/** The code's work estimate, refusing at once a code whose construction alone is beyond the per-call limit. */
export function codeWork(spec: CodeSpec, crcMessageBits = 0): CodeWork {
  const cw = shapeAndWork(spec, crcMessageBits);
  if (cw.build > workLimits.max) {
    const rMax = spec.family === "rs" ? Math.floor(Math.sqrt((workLimits.max - 8 * 2 ** spec.m) / 6)) : 0;
    const advice =
      spec.family === "rs"
        ? `Building a Reed–Solomon generator costs 8·2^m + 6·(n − k)²: keep n − k at most ${rMax} (k ≥ ${cw.n - rMax} for n = ${cw.n}), and less when the request does more than build the code.`
        : `Choose a smaller code: building this one costs ${cw.build.toExponential(2)} work units.`;
    throw refuse(`Building this code (${cw.scale})`, cw.build, workLimits.max, "work units", advice, "/code");
  }
  return cw;
}

/** Bits in a word of a request, from its form alone (a string's characters bound its bits). */
export function wordBits(w: WordInput, m: number): number {
  if (typeof w === "string") return w.length;
  if (Array.isArray(w)) return w.length * m;
  if ("text" in w) return 8 * w.text.length * 3;
  return w.length ?? 4 * w.hex.length;
}

/**
 * Work of encoding or decoding a batch: the code's construction once, then each word; a batch beyond the
 * per-call limit is refused naming how many words of this code one call may carry.
 */
export function batchWork(spec: CodeSpec, words: WordInput[], op: "encode" | "decode"): number {
  const field = op === "encode" ? "messages" : "words";
  if (spec.family === "crc") {
    // A CRC's code depends on each word's length; its work is the register's, per bit.
    const width = shapeAndWork(spec, 0).n;
    return words.reduce((s, w) => s + 64 + 8 * (wordBits(w, 1) + width), 4096);
  }
  const cw = codeWork(spec);
  const base = cw.build + (op === "decode" ? cw.decoderBuild : 0);
  const per = op === "encode" ? cw.encodePerWord : cw.decodePerWord;
  const total = base + words.length * per;
  if (total > workLimits.max) {
    const allowed = Math.floor((workLimits.max - base) / per);
    const advice =
      allowed >= 1
        ? `This code allows at most ${allowed} ${allowed === 1 ? field.slice(0, -1) : field} per call; split the batch.`
        : `Not even one word of this code fits in one call (${cw.scale}); choose a smaller code.`;
    throw refuse(`${op === "encode" ? "Encoding" : "Decoding"} ${words.length} ${field} (${cw.scale})`, total, workLimits.max, "work units", advice, allowed >= 1 ? `/${field}` : "/code");
  }
  return total;
}

function shapeAndWork(spec: CodeSpec, crcMessageBits: number): CodeWork {
  switch (spec.family) {
    case "repetition":
    case "parity": {
      const n = spec.n;
      const k = spec.family === "repetition" ? 1 : n - 1;
      // A parity code lists its n − 1 message positions when it is built.
      return { n, k, m: 1, build: spec.family === "parity" ? 64 + 32 * n : 64, decoderBuild: 0, encodePerWord: 64 + 8 * n, decodePerWord: 64 + 8 * n, scale: `n = ${n}` };
    }
    case "hamming": {
      const n = 2 ** spec.r - 1 + (spec.extended ? 1 : 0);
      return { n, k: 2 ** spec.r - 1 - spec.r, m: 1, build: 8 * 2 ** spec.r, decoderBuild: 0, encodePerWord: 64 + 8 * n, decodePerWord: 64 + 16 * n, scale: `r = ${spec.r}` };
    }
    case "golay":
      return { n: spec.extended ? 24 : 23, k: 12, m: 1, build: 2 ** 16, decoderBuild: 0, encodePerWord: 256, decodePerWord: 4096, scale: "Golay" };
    case "crc": {
      const n = crcMessageBits + crcWidth(spec);
      return { n, k: crcMessageBits, m: 1, build: 4096, decoderBuild: 0, encodePerWord: 64 + 8 * n, decodePerWord: 64 + 8 * n, scale: `${n} bits` };
    }
    case "linear": {
      const { rows, n } = matrixShape(spec);
      const k = spec.generator ? rows : Math.max(0, n - rows);
      const r = n - k;
      // Gaussian elimination on packed rows; the minimum distance by enumerating the smaller of the code and its dual.
      const build = 2 * rows * n * words32(n) + 8 * rows * n;
      const dmin = 4 * Math.min(2 ** Math.min(k, r) * words32(n), MAX_ENUMERATION_WORK);
      const table = r <= MAX_TABLE_REDUNDANCY ? 4 * Math.min(2 ** r * n, MAX_TABLE_STEPS) : 0;
      const syndrome = 8 * r * words32(n) + 16 * n;
      const search = r <= MAX_TABLE_REDUNDANCY ? 0 : 4 * MAX_SEARCH_PATTERNS * words32(r);
      return { n, k, m: 1, build, decoderBuild: dmin + table, encodePerWord: 8 * k * words32(n) + 16 * n, decodePerWord: syndrome + search, scale: `a ${rows} × ${n} matrix` };
    }
    case "bch": {
      const n = Math.max(0, 2 ** spec.m - 1 - spec.shorten);
      // A t beyond n/2 is invalid and refused when the code is built; clamp it so the estimate stays finite.
      const t = Math.min(spec.t, Math.ceil(n / 2));
      const r = Math.min(bchRedundancy(spec.m, t), n);
      return {
        n,
        k: Math.max(0, n - r),
        m: 1,
        // The generator is the product of t minimal polynomials: quadratic in its degree m·t.
        build: 8 * 2 ** spec.m + (spec.m * t) ** 2 / 4,
        decoderBuild: 0,
        encodePerWord: (n * r) / 32 + 16 * n,
        // 2t syndromes over n bits, Berlekamp–Massey (t²), the Chien search (n·t).
        decodePerWord: 6 * n * t + 4 * t ** 2 + 16 * n,
        scale: `t = ${t} over n = ${n}`,
      };
    }
    case "rs": {
      const n = spec.n ?? 2 ** spec.m - 1;
      const r = Math.max(0, n - spec.k);
      return {
        n,
        k: spec.k,
        m: spec.m,
        // The generator ∏(x − α^(b+i)) over n − k roots: quadratic in n − k.
        build: 8 * 2 ** spec.m + 6 * r * r,
        decoderBuild: 0,
        encodePerWord: 8 * spec.k * r + 16 * n,
        // n − k syndromes over n symbols dominate (then Berlekamp–Massey, Chien, Forney).
        decodePerWord: 12 * n * r + 6 * r * r + 16 * n,
        scale: `n − k = ${r} parity symbols over n = ${n}`,
      };
    }
  }
}
