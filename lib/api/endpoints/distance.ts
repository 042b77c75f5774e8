import { z } from "zod";
import { parseBits } from "@/lib/core/bits";
import { InputError } from "@/lib/core/errors";
import { codebookDistance, correctingRadius, detectionCapability, hammingBoundHolds, hammingDistance, hammingWeight, isPerfect, log2BigInt, sphereVolume } from "@/lib/core/distance";
import { analysisRules, codeSpec } from "../code-spec";
import { at, defineEndpoint } from "../endpoint";
import { analysisWork, analyzeSpec, closedForm } from "./analyze";
import { weightDistributionMethod } from "@/lib/core/analysis";
import type { CodeSpec } from "../code-spec";
import { wordBits } from "../code-work";
import { bitsInput, bitsOf, documentRules, MAX_WORD_BITS } from "../schemas";

export const MAX_CODEBOOK_WORDS = 4096;

const distanceMethod = (spec: CodeSpec, n: number, k: number): "enumeration" | "dual" | "closed-form" | "mds-formula" => (spec.family === "rs" ? "mds-formula" : closedForm(spec) ? "closed-form" : (weightDistributionMethod(n, k) ?? "enumeration"));
export const MAX_CODEBOOK_WORD_BITS = 4096;
/** Words × length of a codebook: bounds the pairwise work to about 2^27 word operations. */
export const MAX_CODEBOOK_BITS = 1_048_576;
const MAX_POSITIONS = 10_000;
const MAX_PAIRS = 1000;

const input = documentRules(
  z
    .strictObject({
      a: bitsInput.optional().meta({ description: "First word (with `b`)." }),
      b: bitsInput.optional().meta({ description: "Second word, the same length as `a`." }),
      codebook: z.array(bitsOf(MAX_CODEBOOK_WORD_BITS, "CodebookWord")).min(2).max(MAX_CODEBOOK_WORDS).optional().meta({
        description: `Words of one length (2 to ${MAX_CODEBOOK_WORDS} words, at most ${MAX_CODEBOOK_WORD_BITS} bits each, at most ${MAX_CODEBOOK_BITS} bits in all).`,
      }),
      code: codeSpec.optional().meta({ description: "A code spec: the minimum distance of that code (as POST /codes/analyze finds it; odd parity is refused there)." }),
      crcMessageBits: z.number().int().min(1).max(4096).optional().meta({ description: "With a CRC `code`: the message length (required there)." }),
    })
    .superRefine((v, ctx) => {
      const pair = v.a !== undefined || v.b !== undefined;
      const modes = [pair, v.codebook !== undefined, v.code !== undefined].filter(Boolean).length;
      if (modes > 1) ctx.addIssue({ code: "custom", path: v.code !== undefined ? ["code"] : ["codebook"], message: "Send one of: `a` and `b`, `codebook`, or `code`." });
      else if (modes === 0) ctx.addIssue({ code: "custom", path: [], message: "Send `a` and `b` (two words), `codebook` (a list of words) or `code` (a code spec)." });
      else if (v.code?.family === "crc" && v.crcMessageBits === undefined) ctx.addIssue({ code: "custom", path: ["crcMessageBits"], message: "A CRC code needs `crcMessageBits`." });
      else if (pair && v.a === undefined) ctx.addIssue({ code: "custom", path: ["a"], message: "`a` is required with `b`." });
      else if (pair && v.b === undefined) ctx.addIssue({ code: "custom", path: ["b"], message: "`b` is required with `a`." });
    })
    .meta({ id: "DistanceRequest", description: "Exactly one of: `a` and `b`, `codebook`, or `code`." }),
  { oneOf: [{ required: ["a", "b"] }, { required: ["codebook"] }, { required: ["code"] }], dependentRequired: { a: ["b"], b: ["a"] }, allOf: analysisRules },
);

const pairResult = z.object({
  kind: z.literal("pair"),
  length: z.number().int().meta({ description: "Bits in each word." }),
  distance: z.number().int().meta({ description: "Hamming distance: positions where the words differ." }),
  weightA: z.number().int(),
  weightB: z.number().int(),
  positions: z.array(z.number().int()).meta({ description: `0-based positions that differ (first ${MAX_POSITIONS}).` }),
  positionsTruncated: z.boolean(),
});

const codebookResult = z.object({
  kind: z.literal("codebook"),
  words: z.number().int(),
  length: z.number().int(),
  minimumDistance: z.number().int(),
  correctingRadius: z.number().int().meta({ description: "t = ⌊(dmin − 1)/2⌋ errors corrected by bounded-distance decoding." }),
  detectionCapability: z.number().int().meta({ description: "dmin − 1 errors always detected." }),
  sphereVolume: z.string().meta({ description: "Σ_{i≤t} C(n, i): words within distance t of a codeword (exact integer, as a string)." }),
  log2SphereVolume: z.number(),
  perfect: z.boolean().meta({ description: "The spheres of radius t around the codewords fill the space exactly: M·V(n, t) = 2^n." }),
  hammingBoundHolds: z.boolean().meta({ description: "M·V(n, t) ≤ 2^n (always true for a codebook with distinct words)." }),
  closestPairs: z.array(z.tuple([z.number().int(), z.number().int()])).meta({ description: `Index pairs at the minimum distance (first ${MAX_PAIRS}).` }),
  closestPairsTruncated: z.boolean(),
  pairsCompared: z.number().int(),
});

const codeResult = z.object({
  kind: z.literal("code"),
  name: z.string(),
  n: z.number().int(),
  k: z.number().int(),
  minimumDistance: z.number().int(),
  correctingRadius: z.number().int(),
  detectionCapability: z.number().int(),
  method: z.enum(["enumeration", "dual", "closed-form", "mds-formula"]).meta({ description: "How dmin was found: enumerating the code or its dual, or the family's closed form." }),
});

const output = z.discriminatedUnion("kind", [pairResult, codebookResult, codeResult]).meta({ id: "DistanceResult" });

export const distance = defineEndpoint({
  id: "distance",
  method: "POST",
  path: "/distance",
  scope: "compute",
  tag: "Words and codebooks",
  summary: "Hamming distance of two words, or the minimum distance of a codebook",
  description:
    `With \`a\` and \`b\`: the Hamming distance, both weights and the differing positions (words up to ${MAX_WORD_BITS} bits). ` +
    "With `codebook`: the minimum distance and closest pairs, the error-correcting radius t, detection capability, decoding-sphere volume and whether the code is perfect. " +
    "With `code`: the code's minimum distance, found as POST /codes/analyze finds it.",
  input,
  output,
  examples: {
    pair: { summary: "Two bytes written with group separators", value: { a: "1011 0010", b: "1001_0110" } },
    hex: { summary: "Two 16-bit words in hex", value: { a: { hex: "f00d" }, b: { hex: "beef" } } },
    codebook: { summary: "A four-word codebook of length 5", value: { codebook: ["00000", "01101", "10110", "11011"] } },
    code: { summary: "Minimum distance of the extended Golay code", value: { code: { family: "golay", extended: true } } },
  },
  work: (req) => {
    if (req.code) return analysisWork({ code: req.code, crcMessageBits: req.crcMessageBits, matrices: false, weightDistribution: false });
    if (req.codebook) {
      const m = req.codebook.length;
      const n = wordBits(req.codebook[0]!, 1);
      return 64 + 8 * m * n + 4 * ((m * (m - 1)) / 2) * Math.ceil(n / 32);
    }
    return 64 + 4 * (wordBits(req.a!, 1) + wordBits(req.b!, 1));
  },
  workRule:
    "a pair: 4 per bit of the two words + 64; a codebook of M words of n bits: 4·M(M − 1)/2·⌈n/32⌉ word comparisons + 8·M·n + 64; a code: as POST /codes/analyze without matrices or the weight distribution.",
  handler: (req) => {
    if (req.code) {
      const a = analyzeSpec({ code: req.code, crcMessageBits: req.crcMessageBits, matrices: false, weightDistribution: false });
      return { kind: "code" as const, name: a.code.name, n: a.n, k: a.k, minimumDistance: a.minimumDistance, correctingRadius: a.correctingRadius, detectionCapability: a.detectionCapability, method: distanceMethod(req.code, a.n, a.k) };
    }
    if (req.codebook) {
      const words = req.codebook.map((w, i) => at(["codebook", i], () => parseBits(w, MAX_CODEBOOK_WORD_BITS)));
      const n = words[0]!.length;
      if (words.length * n > MAX_CODEBOOK_BITS) {
        throw new InputError(`${words.length} words of ${n} bits are ${words.length * n} bits; a codebook may hold at most ${MAX_CODEBOOK_BITS}.`, ["codebook"]);
      }
      const r = at(["codebook"], () => codebookDistance(words, MAX_PAIRS));
      const t = correctingRadius(r.minimumDistance);
      const volume = sphereVolume(n, t);
      return {
        kind: "codebook" as const,
        words: words.length,
        length: n,
        minimumDistance: r.minimumDistance,
        correctingRadius: t,
        detectionCapability: detectionCapability(r.minimumDistance),
        sphereVolume: volume.toString(),
        log2SphereVolume: log2BigInt(volume),
        perfect: r.minimumDistance > 0 && isPerfect(words.length, n, t),
        hammingBoundHolds: hammingBoundHolds(words.length, n, t),
        closestPairs: r.closestPairs,
        closestPairsTruncated: r.closestPairsTruncated,
        pairsCompared: r.pairsCompared,
      };
    }
    const a = at(["a"], () => parseBits(req.a!, MAX_WORD_BITS));
    const b = at(["b"], () => parseBits(req.b!, MAX_WORD_BITS));
    const d = at(["b"], () => hammingDistance(a, b, MAX_POSITIONS));
    return { kind: "pair" as const, length: a.length, distance: d.distance, weightA: hammingWeight(a), weightB: hammingWeight(b), positions: d.positions, positionsTruncated: d.positionsTruncated };
  },
});
