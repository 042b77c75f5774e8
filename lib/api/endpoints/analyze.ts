import { z } from "zod";
import { analyzeCode, undetectedErrorProbability, weightDistributionMethod, whyNoEnumeration } from "@/lib/core/analysis";
import { formatBits, type Bits } from "@/lib/core/bits";
import type { BlockCode } from "@/lib/core/codes/types";
import { correctingRadius, detectionCapability, log2BigInt } from "@/lib/core/distance";
import { InputError } from "@/lib/core/errors";
import { mdsWeightDistribution, qarySphereVolume } from "@/lib/core/mds";
import { codeSpec, type CodeSpec } from "../code-spec";
import { codeSummary, resolveCode, summarize } from "../codes";
import { at, defineEndpoint } from "../endpoint";
import { probability, tail, toTail } from "../schemas";

/** Matrices are returned up to this many entries each (k·n); larger ones are left out with a note. */
export const MAX_MATRIX_ENTRIES = 65_536;

const input = z
  .strictObject({
    code: codeSpec,
    crcMessageBits: z.number().int().min(1).max(4096).optional().meta({ description: "CRC only: the message length k the CRC protects (required for CRC)." }),
    p: probability.optional().meta({ description: "BSC crossover probability: adds the undetected-error probability from the weight distribution." }),
    matrices: z.boolean().default(true).meta({ description: `Return G and H in systematic form (when each has at most ${MAX_MATRIX_ENTRIES} entries).` }),
  })
  .superRefine((v, ctx) => {
    if (v.code.family === "crc" && v.crcMessageBits === undefined) ctx.addIssue({ code: "custom", path: ["crcMessageBits"], message: "A CRC's analysis needs the message length `crcMessageBits`." });
  })
  .meta({ id: "AnalyzeRequest" });

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
    sphereVolume: z.string().meta({ description: "Words within distance t of a codeword, Σ_{i≤t} C(n,i)(q−1)^i (exact)." }),
    log2SphereVolume: z.number(),
    weightDistribution: z
      .object({
        method: z.enum(["enumeration", "dual", "mds-formula"]),
        terms: z.array(z.object({ weight: z.number().int(), count: z.string() })).meta({ description: "Non-zero A_w (exact integers as strings)." }),
      })
      .meta({ description: "Enumerated for k ≤ 24; from the dual by the MacWilliams identity for n − k ≤ 24; the closed form for MDS (Reed–Solomon) codes." }),
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

function binaryAnalysis(code: BlockCode, spec: CodeSpec, p: number | undefined, wantMatrices: boolean): Out {
  // Refuse before building G, and point at the code spec itself (the core's error names its `generator` argument).
  if (weightDistributionMethod(code.n, code.k) === undefined) {
    throw new InputError(`${code.name} is too large to analyse: ${whyNoEnumeration(code.n, code.k)}, so neither the code nor its dual can be enumerated for the weight distribution`, ["code"]);
  }
  const rows = code.generatorRows?.();
  if (!rows) {
    if (spec.family === "parity" && spec.parity === "odd") {
      throw new InputError(`${code.name} is not linear (odd parity words are a coset of the even parity code), so it has no generator matrix to analyse; the even parity code has the same distances`, ["code", "parity"]);
    }
    throw new InputError(`${code.name} is too large to analyse: its generator matrix would have ${code.k}·${code.n} entries`, ["code"]);
  }
  const a = at(["code"], () => analyzeCode(rows));
  const fits = (m: Bits[]) => m.length * code.n <= MAX_MATRIX_ENTRIES;
  const show = wantMatrices && fits(a.systematic.generator) && fits(a.systematic.parityCheck);
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
    weightDistribution: { method: a.weightDistributionMethod, terms: terms(a.weightDistribution) },
    bounds: {
      hamming: { holds: a.bounds.hamming.holds, tight: a.bounds.hamming.tight, description: "2^k·V(n,t) ≤ 2^n (sphere packing); tight = perfect." },
      singleton: { holds: a.bounds.singleton.holds, tight: a.bounds.singleton.tight, maxDistance: a.bounds.singleton.maxDistance },
      gilbertVarshamov: a.bounds.gilbertVarshamov,
      plotkin: plotkin.applicable ? { applicable: true, maxSize: plotkin.maxSize.toString(), holds: plotkin.holds, tight: plotkin.tight } : { applicable: false },
      griesmer: a.bounds.griesmer,
    },
    perfect: a.perfect,
    mds: a.mds,
    ...(p !== undefined ? { undetectedError: toTail(undetectedErrorProbability(a.weightDistribution, p)) } : {}),
    ...(show
      ? { matrices: { generator: a.systematic.generator.map(formatBits), parityCheck: a.systematic.parityCheck.map(formatBits), permutation: a.systematic.permutation, permuted: a.systematic.permuted } }
      : wantMatrices
        ? { matricesOmitted: `G and H have more than ${MAX_MATRIX_ENTRIES} entries` }
        : {}),
  };
}

/** Reed–Solomon is MDS by construction: d = n − k + 1 and the closed-form weight distribution. */
function rsAnalysis(code: BlockCode, spec: CodeSpec, p: number | undefined): Out {
  const { n, k, q } = code;
  const d = n - k + 1;
  const t = correctingRadius(d);
  const weights = mdsWeightDistribution(n, k, q);
  const volume = qarySphereVolume(n, t, q);
  const lhs = BigInt(q) ** BigInt(k) * volume;
  const rhs = BigInt(q) ** BigInt(n);
  if (p !== undefined) throw new InputError("the undetected-error probability on a BSC is for binary codes; Reed–Solomon symbols are not bits", ["p"]);
  return {
    code: summarize(code, spec),
    n,
    k,
    rate: k / n,
    minimumDistance: d,
    correctingRadius: t,
    detectionCapability: detectionCapability(d),
    sphereVolume: volume.toString(),
    log2SphereVolume: log2BigInt(volume),
    weightDistribution: { method: "mds-formula", terms: terms(weights) },
    bounds: {
      hamming: { holds: lhs <= rhs, tight: lhs === rhs, description: "q^k·V_q(n,t) ≤ q^n (sphere packing over GF(q)); tight = perfect." },
      singleton: { holds: true, tight: true, maxDistance: d },
    },
    perfect: lhs === rhs,
    mds: true,
  };
}

/** The analysis of the code a spec describes. */
export function analyzeSpec(req: { code: CodeSpec; crcMessageBits?: number; p?: number; matrices: boolean }): Out {
  const code = resolveCode(req.code, ["code"], req.crcMessageBits);
  return code.q === 2 ? binaryAnalysis(code, req.code, req.p, req.matrices) : rsAnalysis(code, req.code, req.p);
}

/** Compute units: 1 per started 2^20 enumerated codewords × ⌈n/32⌉ words of work. */
export function analysisUnits(out: { n: number; k: number; weightDistribution: { method: string } }): number {
  const dim = out.weightDistribution.method === "mds-formula" ? 0 : Math.min(out.k, out.n - out.k);
  return Math.max(1, Math.ceil((2 ** dim * Math.ceil(out.n / 32)) / 2 ** 20));
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
    "and systematic generator and parity-check matrices. A binary code with both k and n − k above 24 is refused (422). Cost: 1 unit per started 2^20 enumerated codewords × ⌈n/32⌉.",
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
  cost: (_in, out) => analysisUnits(out),
  handler: analyzeSpec,
});
