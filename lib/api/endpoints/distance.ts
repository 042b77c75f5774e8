import { z } from "zod";
import { parseBits } from "@/lib/core/bits";
import { InputError } from "@/lib/core/errors";
import { codebookDistance, correctingRadius, detectionCapability, hammingBoundHolds, hammingDistance, hammingWeight, isPerfect, log2BigInt, sphereVolume } from "@/lib/core/distance";
import { codeSpec } from "../code-spec";
import { at, defineEndpoint } from "../endpoint";
import { analysisUnits, analyzeSpec } from "./analyze";
import { bitsInput, MAX_WORD_BITS } from "../schemas";

export const MAX_CODEBOOK_WORDS = 4096;
export const MAX_CODEBOOK_WORD_BITS = 4096;
/** Words × length of a codebook: bounds the pairwise work to about 2^27 word operations. */
export const MAX_CODEBOOK_BITS = 1_048_576;
const MAX_POSITIONS = 10_000;
const MAX_PAIRS = 1000;

const input = z
  .strictObject({
    a: bitsInput.optional().meta({ description: "First word (with `b`)." }),
    b: bitsInput.optional().meta({ description: "Second word, the same length as `a`." }),
    codebook: z.array(bitsInput).min(2).max(MAX_CODEBOOK_WORDS).optional().meta({
      description: `Words of one length (2 to ${MAX_CODEBOOK_WORDS} words, at most ${MAX_CODEBOOK_WORD_BITS} bits each, at most ${MAX_CODEBOOK_BITS} bits in all).`,
    }),
    code: codeSpec.optional().meta({ description: "A code spec: the minimum distance of that code (as POST /codes/analyze finds it)." }),
    crcMessageBits: z.number().int().min(1).max(4096).optional().meta({ description: "With a CRC `code`: the message length." }),
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
  .meta({ id: "DistanceRequest" });

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
  method: z.enum(["enumeration", "dual", "mds-formula"]).meta({ description: "How the weight distribution that gives dmin was found." }),
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
    "Cost: 1 unit per started 65,536 bits of a pair; for a codebook, 1 unit per started 10^6 word comparisons (pairs × ⌈n/32⌉).",
  input,
  output,
  examples: {
    pair: { summary: "Two bytes written with group separators", value: { a: "1011 0010", b: "1001_0110" } },
    hex: { summary: "Two 16-bit words in hex", value: { a: { hex: "f00d" }, b: { hex: "beef" } } },
    codebook: { summary: "A four-word codebook of length 5", value: { codebook: ["00000", "01101", "10110", "11011"] } },
    code: { summary: "Minimum distance of the extended Golay code", value: { code: { family: "golay", extended: true } } },
  },
  cost: (_in, out) => {
    if (out.kind === "pair") return Math.max(1, Math.ceil(out.length / 65536));
    if (out.kind === "codebook") return Math.max(1, Math.ceil((out.pairsCompared * Math.ceil(out.length / 32)) / 1e6));
    return analysisUnits({ n: out.n, k: out.k, weightDistribution: { method: out.method } });
  },
  handler: (req) => {
    if (req.code) {
      const a = analyzeSpec({ code: req.code, crcMessageBits: req.crcMessageBits, matrices: false });
      return { kind: "code" as const, name: a.code.name, n: a.n, k: a.k, minimumDistance: a.minimumDistance, correctingRadius: a.correctingRadius, detectionCapability: a.detectionCapability, method: a.weightDistribution.method };
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
