import { z } from "zod";
import { bscCapacity } from "@/lib/core/capacity";
import { bscBlockError, bscFlipStatistics, bscFlips, bscPostDecodingBer } from "@/lib/core/channels";
import { defineEndpoint } from "../endpoint";
import { caution, probability, tail, toTail } from "../schemas";

export const MAX_BLOCK_LENGTH = 1_000_000;

const input = z
  .strictObject({
    n: z.number().int().min(1).max(MAX_BLOCK_LENGTH).meta({ description: `Block length in bits (1 to ${MAX_BLOCK_LENGTH}).`, example: 7 }),
    p: probability.meta({ description: "Crossover probability of the BSC, 0 ≤ p ≤ 1.", example: 0.001 }),
    flips: z.number().int().min(0).max(MAX_BLOCK_LENGTH).optional().meta({ description: "i, at most n: report P(exactly / at most / more than i flips in n)." }),
    t: z.number().int().min(0).max(MAX_BLOCK_LENGTH).optional().meta({ description: "Errors corrected per block by a bounded-distance decoder, at most n." }),
  })
  .superRefine((v, ctx) => {
    if (v.flips !== undefined && v.flips > v.n) ctx.addIssue({ code: "custom", path: ["flips"], message: `flips must be at most n = ${v.n}.` });
    if (v.t !== undefined && v.t > v.n) ctx.addIssue({ code: "custom", path: ["t"], message: `t must be at most n = ${v.n}.` });
  })
  .meta({ id: "BscRequest" });

const output = z
  .object({
    n: z.number().int(),
    p: z.number(),
    capacity: z.object({ value: z.number(), unit: z.literal("bits per channel use") }).meta({ description: "1 − H2(p) (Shannon 1948)." }),
    flipCount: z
      .object({
        mean: z.number().meta({ description: "n·p." }),
        standardDeviation: z.number().meta({ description: "√(n·p·(1 − p))." }),
        mostLikely: z.number().int().meta({ description: "⌊(n + 1)p⌋ (at most n): the number of flips with the highest probability." }),
        mostLikelyProbability: tail.meta({ description: "P(exactly `mostLikely` flips)." }),
        tiedWith: z.number().int().optional().meta({ description: "When (n + 1)p is a whole number, (n + 1)p − 1 flips are exactly as likely." }),
      })
      .meta({ description: "The number of flipped bits in n, Bin(n, p): always given." }),
    flips: z
      .object({ i: z.number().int(), exactly: tail, atMost: tail, moreThan: tail })
      .optional()
      .meta({ description: "Binomial(n, p) probabilities of the number of flipped bits." }),
    decoding: z
      .object({
        t: z.number().int(),
        blockError: tail.meta({ description: "P(more than t flips): the block error probability of bounded-distance decoding." }),
        postDecodingBer: tail.meta({
          description: "Estimate of the bit error rate after decoding, (1/n)·Σ_{j>t} j·C(n,j)p^j(1−p)^(n−j): assumes a failed block keeps its j channel errors.",
        }),
      })
      .optional(),
    more: z.string().optional().meta({ description: "Which optional request fields would add what; absent when all were given." }),
    caution: z.string(),
  })
  .meta({ id: "BscResult" });

/** What each optional field adds, for the `more` note of a response that lacks it. */
const MORE = {
  flips: "`flips: i` adds P(exactly / at most / more than i flips)",
  t: "`t` (errors a decoder corrects) adds the block error probability and the post-decoding BER",
} as const;

function moreNote(req: { flips?: number; t?: number }): string | undefined {
  const missing = (Object.keys(MORE) as (keyof typeof MORE)[]).filter((f) => req[f] === undefined);
  return missing.length ? `${missing.map((f) => MORE[f]).join("; ")}.` : undefined;
}

export const bsc = defineEndpoint({
  id: "channels.bsc",
  method: "POST",
  path: "/channels/bsc",
  scope: "compute",
  tag: "Channels",
  summary: "Flip counts, block error and post-decoding BER on a binary symmetric channel",
  description:
    "Exact binomial probabilities computed in log space, accurate for n up to 10^6 and p down to 1e-15; `log10` stays finite when a probability is below the double range. " +
    "With n and p alone: the flip count's mean, standard deviation and most likely value, and a `more` note naming what the optional fields add. " +
    "With `flips`: the probabilities of exactly, at most and more than that many flips. " +
    "With `t`: the block error probability of a t-error-correcting length-n code under bounded-distance decoding, and the usual post-decoding BER estimate.",
  input,
  output,
  examples: {
    hamming74: { summary: "A single-error-correcting length-7 code at p = 1e-3", value: { n: 7, p: 0.001, t: 1 } },
    flips: { summary: "Chance of more than 3 flips in a 1,000-bit frame", value: { n: 1000, p: 0.0005, flips: 3 } },
    nAndP: { summary: "n and p alone: how many flips to expect in a 1,000-bit frame", value: { n: 1000, p: 0.002 } },
    deepTail: { summary: "A tail far below double precision", value: { n: 1000000, p: 1e-9, t: 60 } },
  },
  // The binomial tails sum at most n terms in log space.
  work: (req) => 64 + req.n,
  workRule: "n + 64: the binomial sums run over at most n terms (always on the event loop; 1 unit).",
  handler: (req) => {
    const { mostLikelyProbability, ...stats } = bscFlipStatistics(req.n, req.p);
    const more = moreNote(req);
    return {
      n: req.n,
      p: req.p,
      capacity: { value: bscCapacity(req.p), unit: "bits per channel use" as const },
      flipCount: { ...stats, mostLikelyProbability: toTail(mostLikelyProbability) },
      ...(req.flips !== undefined
        ? (() => {
            const f = bscFlips(req.n, req.flips, req.p);
            return { flips: { i: req.flips, exactly: toTail(f.exactly), atMost: toTail(f.atMost), moreThan: toTail(f.moreThan) } };
          })()
        : {}),
      ...(req.t !== undefined
        ? { decoding: { t: req.t, blockError: toTail(bscBlockError(req.n, req.t, req.p)), postDecodingBer: toTail(bscPostDecodingBer(req.n, req.t, req.p)) } }
        : {}),
      ...(more ? { more } : {}),
      caution,
    };
  },
});
