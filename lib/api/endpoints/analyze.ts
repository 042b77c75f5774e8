import { z } from "zod";
import { codeMatrices, codeParameters, distanceParameters, MAX_ENUMERATION_DIMENSION, MAX_ENUMERATION_WORK, undetectedErrorProbability, weightDistribution, weightDistributionMethod, whyNoEnumeration } from "@/lib/core/analysis";
import { formatBits } from "@/lib/core/bits";
import type { BlockCode } from "@/lib/core/codes/types";
import { correctingRadius, detectionCapability, log2BigInt } from "@/lib/core/distance";
import { InputError } from "@/lib/core/errors";
import { log2QarySphereVolume, mdsWeightDistribution, qarySphereVolume } from "@/lib/core/mds";
import { analysisRules, codeIs, codeSpec, type CodeSpec } from "../code-spec";
import { codeSummary, resolveCode, summarize } from "../codes";
import { codeWork } from "../code-work";
import { at, defineEndpoint } from "../endpoint";
import { refuse } from "../work";
import { documentRules, probability, tail, toTail } from "../schemas";

/** Matrices are returned up to this many entries each (k·n); larger ones are left out with a note. */
export const MAX_MATRIX_ENTRIES = 65_536;
/** An exact weight distribution is returned up to this many decimal digits in all (about the body limit). */
export const MAX_WEIGHT_DIGITS = 2 ** 22;
/** A sphere volume is counted exactly up to this many bits; beyond, only its log2 is given. */
export const MAX_EXACT_VOLUME_BITS = 2 ** 16;

const input = documentRules(
  z
    .strictObject({
      code: codeSpec,
      crcMessageBits: z.number().int().min(1).max(4096).optional().meta({ description: "CRC only: the message length k the CRC protects (required for CRC)." }),
      p: probability.optional().meta({ description: "BSC crossover probability: adds the undetected-error probability from the weight distribution (binary codes, not Reed–Solomon)." }),
      matrices: z.boolean().default(true).meta({ description: `Return G and H in systematic form (when each has at most ${MAX_MATRIX_ENTRIES} entries).` }),
      weightDistribution: z
        .boolean()
        .default(true)
        .meta({ description: `Return the weight distribution (exact integers, at most ${MAX_WEIGHT_DIGITS} digits in all). false skips it, and for Reed–Solomon codes also the work of computing it.` }),
    })
    .superRefine((v, ctx) => {
      if (v.code.family === "crc" && v.crcMessageBits === undefined) ctx.addIssue({ code: "custom", path: ["crcMessageBits"], message: "A CRC's analysis needs the message length `crcMessageBits`." });
    })
    .meta({ id: "AnalyzeRequest" }),
  { allOf: [...analysisRules, { if: codeIs(["rs"]), then: { properties: { p: false } } }] },
);

const bound = z.object({ holds: z.boolean(), tight: z.boolean() });

const output = z
  .object({
    code: codeSummary,
    n: z.number().int(),
    k: z.number().int(),
    rate: z.number(),
    minimumDistance: z.number().int(),
    correctingRadius: z.number().int().meta({ description: "t = ⌊(dmin − 1)/2⌋." }),
    detectionCapability: z.number().int().meta({ description: "dmin − 1." }),
    sphereVolume: z
      .string()
      .optional()
      .meta({ description: `Words within distance t of a codeword, Σ_{i≤t} C(n,i)(q−1)^i, exact; left out when it has more than ${MAX_EXACT_VOLUME_BITS} bits (see log2SphereVolume).` }),
    log2SphereVolume: z.number(),
    weightDistribution: z
      .object({
        method: z.enum(["enumeration", "dual", "closed-form", "mds-formula"]),
        terms: z.array(z.object({ weight: z.number().int(), count: z.string() })).meta({ description: "Non-zero A_w (exact integers as strings)." }),
      })
      .optional()
      .meta({
        description:
          "Enumerated for k ≤ 24; from the dual by the MacWilliams identity for n − k ≤ 24; closed forms for repetition and parity codes and for MDS (Reed–Solomon) codes. Left out when `weightDistribution` is false.",
      }),
    bounds: z.object({
      hamming: bound.extend({ description: z.string() }),
      singleton: bound.extend({ maxDistance: z.number().int() }),
      gilbertVarshamov: z.object({ distance: z.number().int(), reached: z.boolean() }).optional().meta({ description: "Binary codes: some [n,k] code reaches this distance." }),
      plotkin: z.object({ applicable: z.boolean(), maxSize: z.string().optional(), holds: z.boolean().optional(), tight: z.boolean().optional() }).optional(),
      griesmer: bound.extend({ minLength: z.number().int() }).optional(),
    }),
    perfect: z.boolean(),
    mds: z.boolean(),
    undetectedError: tail.optional().meta({ description: "P(error pattern is a non-zero codeword) on a BSC with crossover p." }),
    matrices: z
      .object({
        generator: z.array(z.string()),
        parityCheck: z.array(z.string()),
        permutation: z.array(z.number().int()).meta({ description: "Column j of these systematic matrices is column permutation[j] of the code." }),
        permuted: z.boolean(),
      })
      .optional(),
    matricesOmitted: z.string().optional(),
  })
  .meta({ id: "AnalyzeResult" });

type Out = z.output<typeof output>;

const terms = (w: bigint[]) => w.flatMap((c, weight) => (c > 0n ? [{ weight, count: c.toString() }] : []));

type Request = { code: CodeSpec; crcMessageBits?: number; p?: number; matrices: boolean; weightDistribution: boolean };

const words64 = (bits: number) => Math.ceil(bits / 64);

/** Decimal digits of an exact binary weight distribution: at most 2^k per term, and Σ_w log10 C(n, w) ≈ 0.22·n² in all. */
const binaryDigits = (n: number, k: number) => Math.min((n + 1) * (0.30103 * k + 1), 0.22 * n * n + n);
/** Decimal digits of an MDS weight distribution: A_w ≈ C(n, w)·(q − 1)^(w − d + 1). */
const mdsDigits = (n: number, k: number, m: number) => 0.22 * n * n + 0.30103 * m * ((k * (k + 1)) / 2) + n;

/** Does the code's family give its weight distribution in closed form (no generator matrix needed)? */
export const closedForm = (spec: CodeSpec) => spec.family === "repetition" || (spec.family === "parity" && spec.parity === "even");

/**
 * The work of an analysis, estimated from the spec before anything is built, and the refusals that name
 * what is too large: enumeration 2^min(k, n−k)·⌈n/32⌉ word operations (then the MacWilliams transform,
 * (n + 1)² big-integer steps), closed forms for repetition, parity and MDS codes, big-integer bounds of
 * n bits, matrices rows × columns, and the digits of the exact weight distribution returned.
 */
export function analysisWork(req: Request): number {
  const cw = codeWork(req.code, req.crcMessageBits ?? 0);
  const { n, k, m } = cw;
  let work = cw.build;
  if (req.code.family === "rs") {
    const t = Math.floor((n - k) / 2);
    if (req.weightDistribution) {
      const digits = mdsDigits(n, k, m);
      if (digits > MAX_WEIGHT_DIGITS) {
        throw refuse(`The exact weight distribution of this Reed–Solomon code (${cw.scale})`, digits, MAX_WEIGHT_DIGITS, "decimal digits", "Send `weightDistribution: false` to get every other parameter, or choose a shorter code.", "/weightDistribution");
      }
      work += 4 * ((k * k) / 2) * words64(k * m + n) + 4 * n * words64(n);
    }
    const volumeBits = t * m + n;
    work += volumeBits <= MAX_EXACT_VOLUME_BITS ? 4 * t * words64(volumeBits) : 64 * t;
    return work;
  }
  const r = n - k;
  if (closedForm(req.code)) {
    // The closed-form counts are built only when they are returned or P_ud needs them: n big integers of up to n bits.
    if (req.weightDistribution || req.p !== undefined) work += 4 * n * words64(n);
  } else {
    const method = weightDistributionMethod(n, k);
    const enumeration = 2 ** Math.min(k, r) * Math.ceil(n / 32);
    if (method === undefined) {
      const advice = `Here ${whyNoEnumeration(n, k)}: analysis needs min(k, n − k) ≤ 24 and 2^min(k, n − k)·⌈n/32⌉ ≤ 2^28.`;
      throw Math.min(k, r) > MAX_ENUMERATION_DIMENSION
        ? refuse(`The dimension enumerated for the weight distribution of this (${n},${k}) code, min(k, n − k),`, Math.min(k, r), MAX_ENUMERATION_DIMENSION, "dimensions", advice, "/code")
        : refuse(`Enumerating the (${n},${k}) code or its dual for the weight distribution`, enumeration, MAX_ENUMERATION_WORK, "word operations", advice, "/code");
    }
    work += 8 * k * n + 4 * enumeration + (method === "dual" ? 2 * k * n * Math.ceil(n / 32) + 4 * (n + 1) ** 2 * words64(n) : 0);
  }
  if (req.weightDistribution) {
    const digits = binaryDigits(n, k);
    if (digits > MAX_WEIGHT_DIGITS) {
      throw refuse(`The exact weight distribution of this code (n = ${n}, k = ${k})`, digits, MAX_WEIGHT_DIGITS, "decimal digits", "Send `weightDistribution: false` to get every other parameter, or choose a shorter code.", "/weightDistribution");
    }
  }
  // Gilbert–Varshamov's sum stops below 2^(n−k): at most min(n, 2^(n−k)) terms of n − k + 1 bits. The sphere
  // volume has t + 1 terms of up to n bits, t from the family's known distance or the Singleton bound n − k + 1.
  const d = req.code.family === "repetition" ? n : req.code.family === "parity" ? 2 : r + 1;
  work += 8 * Math.min(n, 2 ** r) * words64(r + 1) + 8 * (Math.floor((d - 1) / 2) + 1) * words64(n);
  if (req.matrices && matricesFit(n, k)) work += 4 * k * n * Math.ceil(n / 32);
  return work;
}

const matricesFit = (n: number, k: number) => k * n <= MAX_MATRIX_ENTRIES && (n - k) * n <= MAX_MATRIX_ENTRIES;

function binaryAnalysis(code: BlockCode, spec: CodeSpec, req: Request): Out {
  const rows = code.weightDistribution ? undefined : code.generatorRows?.();
  if (!code.weightDistribution && !rows) {
    if (spec.family === "parity" && spec.parity === "odd") {
      throw new InputError(`${code.name} is not linear (odd parity words are a coset of the even parity code), so it has no generator matrix to analyse; the even parity code has the same distances`, ["code", "parity"]);
    }
    throw new InputError(`${code.name} is too large to analyse: its generator matrix would have ${code.k}·${code.n} entries`, ["code"]);
  }
  if (rows && weightDistributionMethod(code.n, code.k) === undefined) {
    throw new InputError(`${code.name} is too large to analyse: ${whyNoEnumeration(code.n, code.k)}, so neither the code nor its dual can be enumerated for the weight distribution`, ["code"]);
  }
  // A closed-form family knows its d exactly: its weights are counted only when they are returned or P_ud needs them.
  const knownD = code.weightDistribution && code.dmin !== undefined && !code.dminIsDesigned && !req.weightDistribution && req.p === undefined ? code.dmin : undefined;
  const wd = knownD !== undefined ? undefined : rows ? at(["code"], () => weightDistribution(rows)) : { weights: code.weightDistribution!(), method: "closed-form" as const };
  const a = wd ? at(["code"], () => codeParameters(code.k, wd.weights, wd.method)) : at(["code"], () => distanceParameters(code.n, code.k, knownD!));
  const show = req.matrices && matricesFit(code.n, code.k);
  const m = show ? codeMatrices(rows ?? code.generatorRows!()) : undefined;
  const plotkin = a.bounds.plotkin;
  return {
    code: summarize(code, spec),
    n: a.n,
    k: a.k,
    rate: a.rate,
    minimumDistance: a.minimumDistance,
    correctingRadius: a.correctingRadius,
    detectionCapability: a.detectionCapability,
    sphereVolume: a.sphereVolume.toString(),
    log2SphereVolume: log2BigInt(a.sphereVolume),
    ...(req.weightDistribution && wd ? { weightDistribution: { method: wd.method, terms: terms(wd.weights) } } : {}),
    bounds: {
      hamming: { holds: a.bounds.hamming.holds, tight: a.bounds.hamming.tight, description: "2^k·V(n,t) ≤ 2^n (sphere packing); tight = perfect." },
      singleton: { holds: a.bounds.singleton.holds, tight: a.bounds.singleton.tight, maxDistance: a.bounds.singleton.maxDistance },
      gilbertVarshamov: a.bounds.gilbertVarshamov,
      plotkin: plotkin.applicable ? { applicable: true, maxSize: plotkin.maxSize.toString(), holds: plotkin.holds, tight: plotkin.tight } : { applicable: false },
      griesmer: a.bounds.griesmer,
    },
    perfect: a.perfect,
    mds: a.mds,
    ...(req.p !== undefined && wd ? { undetectedError: toTail(undetectedErrorProbability(wd.weights, req.p)) } : {}),
    ...(m
      ? { matrices: { generator: m.systematic.generator.map(formatBits), parityCheck: m.systematic.parityCheck.map(formatBits), permutation: m.systematic.permutation, permuted: m.systematic.permuted } }
      : req.matrices
        ? { matricesOmitted: `G and H have more than ${MAX_MATRIX_ENTRIES} entries` }
        : {}),
  };
}

/**
 * Reed–Solomon is MDS by construction: d = n − k + 1 and the closed-form weight distribution. A sphere too
 * large to count exactly still bounds the code: q^k·V ≤ q^n holds for every code, with equality (perfect)
 * only for the trivial code k = n among Reed–Solomon codes (a q-ary perfect single-error code has length
 * (q^r − 1)/(q − 1) ≥ q + 1 > n; Hamming 1950, MacWilliams & Sloane 1977, ch. 6).
 */
function rsAnalysis(code: BlockCode, spec: CodeSpec, req: Request): Out {
  const { n, k, q } = code;
  const m = Math.log2(q);
  const d = n - k + 1;
  const t = correctingRadius(d);
  if (req.p !== undefined) throw new InputError("the undetected-error probability on a BSC is for binary codes; Reed–Solomon symbols are not bits", ["p"]);
  const exact = t * m + n <= MAX_EXACT_VOLUME_BITS ? qarySphereVolume(n, t, q) : undefined;
  const lhs = exact !== undefined ? BigInt(q) ** BigInt(k) * exact : undefined;
  const rhs = BigInt(q) ** BigInt(n);
  const perfect = lhs !== undefined ? lhs === rhs : k === n;
  return {
    code: summarize(code, spec),
    n,
    k,
    rate: k / n,
    minimumDistance: d,
    correctingRadius: t,
    detectionCapability: detectionCapability(d),
    ...(exact !== undefined ? { sphereVolume: exact.toString() } : {}),
    log2SphereVolume: exact !== undefined ? log2BigInt(exact) : log2QarySphereVolume(n, t, q),
    ...(req.weightDistribution ? { weightDistribution: { method: "mds-formula" as const, terms: terms(mdsWeightDistribution(n, k, q)) } } : {}),
    bounds: {
      hamming: { holds: lhs === undefined || lhs <= rhs, tight: perfect, description: "q^k·V_q(n,t) ≤ q^n (sphere packing over GF(q)); tight = perfect." },
      singleton: { holds: true, tight: true, maxDistance: d },
    },
    perfect,
    mds: true,
  };
}

/** The analysis of the code a spec describes. */
export function analyzeSpec(req: Request): Out {
  const code = resolveCode(req.code, ["code"], req.crcMessageBits);
  return code.q === 2 ? binaryAnalysis(code, req.code, req) : rsAnalysis(code, req.code, req);
}

export const analyze = defineEndpoint({
  id: "codes.analyze",
  method: "POST",
  path: "/codes/analyze",
  scope: "compute",
  tag: "Block codes",
  summary: "A code's parameters: weight distribution, minimum distance, bounds, matrices",
  description:
    "n, k, rate, minimum distance, t, detection capability, sphere volume, the weight distribution (enumerated for k ≤ 24, from the dual by the MacWilliams identity for n − k ≤ 24, closed form for Reed–Solomon), " +
    "Hamming, Singleton, Gilbert–Varshamov, Plotkin and Griesmer bounds with whether the code meets each, perfect and MDS flags, the undetected-error probability on a BSC, " +
    "and systematic generator and parity-check matrices. A binary code with both k and n − k above 24 is refused (422).",
  input,
  output,
  examples: {
    hamming: { summary: "Hamming (7,4): perfect, dmin 3", value: { code: { family: "hamming", r: 3 }, p: 0.001 } },
    golay: { summary: "Golay (23,12): perfect, t = 3", value: { code: { family: "golay" } } },
    bch: { summary: "BCH (31,21), t = 2, from the dual", value: { code: { family: "bch", m: 5, t: 2 }, matrices: false } },
    matrix: { summary: "A (6,3) code from its generator matrix", value: { code: { family: "linear", generator: ["100110", "010101", "001011"] }, p: 0.01 } },
    rs: { summary: "Reed–Solomon (15,11) over GF(16): MDS", value: { code: { family: "rs", m: 4, k: 11 } } },
    crc: { summary: "CRC-8/SMBUS protecting 16-bit messages", value: { code: { family: "crc", preset: "CRC-8/SMBUS" }, crcMessageBits: 16, p: 0.01 } },
  },
  work: analysisWork,
  workRule:
    "building the code (as for /encode: for Reed–Solomon 8·2^m + 6·(n − k)², for BCH 8·2^m + (m·t)²/4) + enumeration 4·2^min(k, n−k)·⌈n/32⌉ (+ 2·k·n·⌈n/32⌉ + 4·(n+1)²·⌈n/64⌉ through the dual) " +
    "or the closed form (repetition and parity 4·n·⌈n/64⌉ when the weight distribution or `p` is asked for; Reed–Solomon 2·k²·⌈(k·m + n)/64⌉ + 4·n·⌈n/64⌉ when the weight distribution is asked for) " +
    "+ 8·k·n to read the generator + for binary codes the bounds 8·min(n, 2^(n−k))·⌈(n−k+1)/64⌉ + 8·(t+1)·⌈n/64⌉ (t from the family's distance, else ⌊(n−k)/2⌋) " +
    "and 4·k·n·⌈n/32⌉ for matrices that are returned; for Reed–Solomon the sphere volume 4·t·⌈(t·m + n)/64⌉ (64·t when only its log2 is given, beyond 2^16 bits).",
  handler: analyzeSpec,
});
