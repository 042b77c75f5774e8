import { z } from "zod";
import { formatBits } from "@/lib/core/bits";
import { InputError } from "@/lib/core/errors";
import { codeSpec, wordRules } from "../code-spec";
import { atWord, codeSummary, formatWord, readWord, summarize, wordInput, wordOutput } from "../codes";
import { at, defineEndpoint } from "../endpoint";
import { documentRules } from "../schemas";
import { MAX_BATCH_BITS, MAX_BATCH_WORDS, resolveBatch } from "./encode";

const input = documentRules(
  z
    .strictObject({
      code: codeSpec,
      words: z.array(wordInput).min(1).max(MAX_BATCH_WORDS).meta({ description: `1 to ${MAX_BATCH_WORDS} received words of n bits (n symbols for Reed–Solomon).` }),
      erasures: z
        .array(z.array(z.number().int().min(0)).max(65535).meta({ uniqueItems: true }))
        .max(MAX_BATCH_WORDS)
        .optional()
        .meta({
          description:
            "Per word, distinct 0-based positions below n whose value is unknown: parity and Reed–Solomon codes only (other families take empty lists). Same length as `words`.",
        }),
    })
    .superRefine((v, ctx) => {
      if (v.erasures && v.erasures.length !== v.words.length)
        ctx.addIssue({ code: "custom", path: ["erasures"], message: `erasures has ${v.erasures.length} entries; words has ${v.words.length}.` });
    })
    .meta({ id: "DecodeRequest" }),
  { allOf: wordRules("words", true) },
);

const output = z
  .object({
    code: codeSummary,
    results: z.array(
      z.object({
        message: wordOutput.meta({ description: "The decoded message; on failure the decoder's best estimate." }),
        codeword: wordOutput.meta({ description: "The corrected codeword." }),
        correctedPositions: z.array(z.number().int()).meta({ description: "0-based positions changed (bits, or symbols for Reed–Solomon), erasures included." }),
        syndrome: wordOutput.meta({ description: "Syndrome of the received word; all zero for a codeword." }),
        failure: z.boolean().meta({ description: "The decoder detected that it could not decode: do not trust `message`." }),
        reason: z.string().optional(),
      }),
    ),
    failures: z.number().int(),
  })
  .meta({ id: "DecodeResult" });

export const decode = defineEndpoint({
  id: "decode",
  method: "POST",
  path: "/decode",
  scope: "compute",
  tag: "Block codes",
  summary: "Decode received words: message, corrections, syndrome and a failure flag",
  description:
    `Hard-decision decoding of up to ${MAX_BATCH_WORDS} words (at most ${MAX_BATCH_BITS} bits in all), with erasures where the family supports them. ` +
    "Each result reports the message, the corrected codeword, the corrected positions, the syndrome and `failure` whenever the decoder can tell it did not decode " +
    "(more errors than it corrects, a majority tie, a CRC mismatch). Cost: 1 unit per started 16,384 codeword bits.",
  input,
  output,
  examples: {
    hamming: { summary: "Hamming (7,4): one flipped bit is corrected", value: { code: { family: "hamming", r: 3 }, words: ["1011 110", "1001 010"] } },
    extended: { summary: "Extended Hamming (8,4): a double error is detected, not miscorrected", value: { code: { family: "hamming", r: 3, extended: true }, words: ["1010 0110"] } },
    rsErasures: {
      summary: "Reed–Solomon (15,9) over GF(16) with two erasures and one error",
      value: { code: { family: "rs", m: 4, k: 9 }, words: [[0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0].map((s, i) => (i === 4 ? 7 : s))], erasures: [[0, 1]] },
    },
    crc: {
      summary: "CRC-16/KERMIT: verify a frame, the bytes of 123456789 followed by their CRC 0x2189 low byte first",
      value: { code: { family: "crc", preset: "CRC-16/KERMIT" }, words: [{ hex: "313233343536373839 8921" }] },
    },
    repetition: { summary: "Repetition (4,1): a tie is reported, not guessed", value: { code: { family: "repetition", n: 4 }, words: ["0011", "0111"] } },
  },
  cost: (_in, out) =>
    Math.max(1, Math.ceil(out.results.reduce((s, r) => s + (typeof r.codeword === "string" ? r.codeword.length : r.codeword.length * Math.log2(out.code.q)), 0) / 16384)),
  handler: (req) => {
    const words = req.words.map((w, i) => at(["words", i], () => readWord(req.code, w)));
    // A CRC word is message + CRC: the message length is the word's minus the width.
    const codes = resolveBatch(req.code, words, "words", (width) => width);
    const results = words.map((w, i) => {
      const code = codes[i]!;
      const erasures = req.erasures?.[i];
      if (erasures?.length && !code.supportsErasures) throw new InputError(`${code.name} does not take erasures`, ["erasures", i]);
      const r = atWord("words", i, () => code.decode(w, erasures?.length ? erasures : undefined));
      return {
        message: formatWord(code, r.message),
        codeword: formatWord(code, r.codeword),
        correctedPositions: r.correctedPositions,
        syndrome: code.q === 2 ? formatBits(r.syndrome as Uint8Array) : Array.from(r.syndrome),
        failure: r.failure,
        ...(r.reason !== undefined ? { reason: r.reason } : {}),
      };
    });
    return { code: summarize(codes[0]!, req.code), results, failures: results.filter((r) => r.failure).length };
  },
});
