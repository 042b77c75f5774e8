import { z } from "zod";
import { formatBits } from "@/lib/core/bits";
import type { BlockCode, DecodeResult, Word } from "@/lib/core/codes/types";
import { InputError } from "@/lib/core/errors";
import { codeSpec, wordRules } from "../code-spec";
import { crcAppendedValue, crcComputeBits } from "@/lib/core/codes/crc";
import { atWord, codeSummary, crcHex, crcParams, formatCrcWord, formatWord, readWord, summarize, wordInput, wordOutput } from "../codes";
import { batchWork, CODE_WORK_RULE } from "../code-work";
import { at, defineEndpoint } from "../endpoint";
import { documentRules } from "../schemas";
import { WordErrors } from "../word-errors";
import { MAX_BATCH_BITS, MAX_BATCH_WORDS, resolveBatch } from "./encode";

/**
 * The results of two or more words that all belong to `code`, from one decodeBatch call over them back to
 * back, or undefined when the code has no batch path, a word is not n bits, or the batch is refused. The
 * per-word path then runs and reports which word is wrong and how, exactly as it always has.
 */
function decodeTogether(code: BlockCode, words: Word[]): DecodeResult[] | undefined {
  if (!code.decodeBatch || words.length < 2) return undefined;
  const { k, n } = code;
  if (!words.every((w) => w instanceof Uint8Array && w.length === n)) return undefined;
  const batch = new Uint8Array(words.length * n);
  words.forEach((w, i) => batch.set(w, i * n));
  let d;
  try {
    d = code.decodeBatch(batch, words.length);
  } catch (e) {
    if (e instanceof InputError) return undefined;
    throw e;
  }
  const { messages, corrected, syndromes, failures } = d;
  return words.map((w, i) => {
    const reason = d.reason(i);
    const codeword = w.slice();
    if (corrected[i]! >= 0) codeword[corrected[i]!]! ^= 1;
    return {
      message: messages.subarray(i * k, (i + 1) * k),
      codeword,
      correctedPositions: corrected[i]! < 0 ? [] : [corrected[i]!],
      // The syndrome integer's bit n − k − 1 − j is entry j.
      syndrome: Uint8Array.from({ length: n - k }, (_, j) => (syndromes[i]! >>> (n - k - 1 - j)) & 1),
      failure: failures[i] === 1,
      ...(reason !== undefined ? { reason } : {}),
    };
  });
}

const input = documentRules(
  z
    .strictObject({
      code: codeSpec,
      words: z
        .array(wordInput)
        .min(1)
        .max(MAX_BATCH_WORDS)
        .meta({ description: `1 to ${MAX_BATCH_WORDS} received words of n bits (n symbols for Reed–Solomon; for CRC a message followed by its CRC, at least \`width\` bits).` }),
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
        crc: z
          .object({
            received: z.string().meta({ description: "The CRC value the word carries, in hex." }),
            computed: z.string().meta({ description: "The CRC of the word's message, in hex; equal to `received` when the word verifies." }),
          })
          .optional()
          .meta({ description: "CRC families: the two values the check compares (their XOR is the syndrome)." }),
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
    "(more errors than it corrects, a majority tie, a CRC mismatch).",
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
  work: (req) => batchWork(req.code, req.words, "decode"),
  workRule: `the code's construction once, then each word. ${CODE_WORK_RULE}`,
  handler: (req) => {
    const crc = req.code.family === "crc" ? { spec: req.code, params: crcParams(req.code) } : undefined;
    // Every bad word is reported, not only the first: each check below records its word's error (or its erasures') and skips words that failed.
    const errors = new WordErrors("words", req.words.length, ["erasures"]);
    const words = errors.each(req.words, (w, i) => at(["words", i], () => readWord(req.code, w, crc?.params.width)));
    // A CRC word is message + CRC: the message length is the word's minus the width.
    const codes = resolveBatch(req.code, words, errors, (width) => width);
    // Every family but CRC (whose k is each word's length) has one code for the whole batch; erasures go word by word.
    const together = req.code.family === "crc" || errors.any || req.erasures?.some((e) => e.length > 0) ? undefined : decodeTogether(codes[0]!, words as Word[]);
    const checked = errors.each(words, (w, i) => {
      const code = codes[i]!;
      const erasures = req.erasures?.[i];
      if (erasures?.length && !code.supportsErasures) throw new InputError(`${code.name} does not take erasures; send an empty list for this word`, ["erasures", i]);
      const r = together?.[i] ?? atWord("words", i, () => code.decode(w, erasures?.length ? erasures : undefined));
      const common = {
        correctedPositions: r.correctedPositions,
        syndrome: code.q === 2 ? formatBits(r.syndrome as Uint8Array) : Array.from(r.syndrome),
        failure: r.failure,
        ...(r.reason !== undefined ? { reason: r.reason } : {}),
      };
      if (!crc) return { message: formatWord(code, r.message), codeword: formatWord(code, r.codeword), ...common };
      const { width } = crc.params;
      const cw = r.codeword as Uint8Array;
      return {
        message: formatCrcWord(crc.spec, r.message as Uint8Array),
        codeword: formatCrcWord(crc.spec, cw),
        ...common,
        crc: { received: crcHex(crcAppendedValue(crc.params, cw.subarray(code.k)), width), computed: crcHex(crcComputeBits(crc.params, cw.subarray(0, code.k)), width) },
      };
    });
    const results = errors.settle(checked);
    return { code: summarize(codes[0]!, req.code), results, failures: results.filter((r) => r.failure).length };
  },
});
