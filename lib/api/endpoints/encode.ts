import { z } from "zod";
import { crcComputeBits } from "@/lib/core/codes/crc";
import type { BlockCode, Word } from "@/lib/core/codes/types";
import { InputError } from "@/lib/core/errors";
import { codeSpec, wordRules } from "../code-spec";
import { atWord, codeSummary, crcHex, crcParams, formatCrcWord, formatWord, readWord, resolveCode, summarize, wordInput, wordOutput } from "../codes";
import { batchWork, CODE_WORK_RULE } from "../code-work";
import { at, defineEndpoint } from "../endpoint";
import { documentRules } from "../schemas";
import { WordErrors } from "../word-errors";

/** Words per call. */
export const MAX_BATCH_WORDS = 1024;
/** Codeword bits per call, all words together (symbols count m bits each). */
export const MAX_BATCH_BITS = 1 << 22;

/**
 * Each word's code (CRC codes take their length from the word) and the batch size check. A word too short
 * for its code is recorded in `errors`; words that already failed are skipped (undefined).
 */
export function resolveBatch(spec: z.output<typeof codeSpec>, words: (Word | undefined)[], errors: WordErrors, crcExtra: (width: number) => number): (BlockCode | undefined)[] {
  const width = spec.family === "crc" ? crcParams(spec).width : 0;
  // Resolved once: hashing a large matrix spec per word would cost more than the words.
  const one = spec.family === "crc" ? undefined : resolveCode(spec, ["code"]);
  const codes = errors.each(words, (w, i) => {
    if (one) return one;
    // The word's length is the word's fault; the CRC's parameters are the spec's (errors at /code/...).
    const k = w.length - crcExtra(width);
    if (k < 0) throw new InputError(`the word has ${w.length} bits, fewer than the ${width}-bit CRC it must end with`, [errors.field, i]);
    return resolveCode(spec, ["code"], k);
  });
  const bits = batchBits(codes);
  if (bits > MAX_BATCH_BITS) throw new InputError(`the batch has ${bits} codeword bits; one call may have at most ${MAX_BATCH_BITS}`, [errors.field]);
  return codes;
}

export const batchBits = (codes: (BlockCode | undefined)[]) => codes.reduce((s, c) => s + (c ? c.n * Math.log2(c.q) : 0), 0);

/**
 * The codewords of messages that all belong to `code`, from one encodeBatch call over them back to back, or
 * undefined when the code has no batch path or the batch is refused. The per-message path then runs and
 * reports which message is wrong and how, exactly as it always has.
 */
function encodeTogether(code: BlockCode, messages: Word[]): Word[] | undefined {
  if (!code.encodeBatch) return undefined;
  const { k, n } = code;
  // The buffer must hold every value unchanged: bits in bytes, symbols in 16 bits; anything else goes word by word.
  const binary = code.q === 2;
  if (!messages.every((m) => m.length === k && (m instanceof Uint8Array || (!binary && m instanceof Uint16Array)))) return undefined;
  const batch = binary ? new Uint8Array(messages.length * k) : new Uint16Array(messages.length * k);
  messages.forEach((m, i) => batch.set(m, i * k));
  let codewords: Word;
  try {
    codewords = code.encodeBatch(batch, messages.length);
  } catch (e) {
    if (e instanceof InputError) return undefined;
    throw e;
  }
  return messages.map((_, i) => codewords.subarray(i * n, (i + 1) * n));
}

const input = documentRules(
  z
    .strictObject({
      code: codeSpec,
      messages: z.array(wordInput).min(1).max(MAX_BATCH_WORDS).meta({ description: `1 to ${MAX_BATCH_WORDS} messages of k bits (k symbols for Reed–Solomon; any length for CRC).` }),
    })
    .meta({ id: "EncodeRequest" }),
  { allOf: wordRules("messages") },
);

const output = z
  .object({
    code: codeSummary,
    codewords: z.array(
      z.object({
        codeword: wordOutput,
        crc: z.string().optional().meta({ description: "CRC families: the CRC value in hex." }),
      }),
    ),
  })
  .meta({ id: "EncodeResult" });

export const encode = defineEndpoint({
  id: "encode",
  method: "POST",
  path: "/encode",
  scope: "compute",
  tag: "Block codes",
  summary: "Encode messages with any supported block code, bit-exact",
  description:
    `A batch of up to ${MAX_BATCH_WORDS} messages (at most ${MAX_BATCH_BITS} codeword bits in all). Systematic encoders put the message first; ` +
    "`code.bitOrder` in the response states each family's order exactly.",
  input,
  output,
  examples: {
    hamming: { summary: "Hamming (7,4), two nibbles", value: { code: { family: "hamming", r: 3 }, messages: ["1011", "0110"] } },
    crc32: { summary: "CRC-32/ISO-HDLC of the text 123456789 (check value 0xcbf43926)", value: { code: { family: "crc", preset: "CRC-32/ISO-HDLC" }, messages: [{ text: "123456789" }] } },
    crc32Bits: {
      summary: "CRC-32/ISO-HDLC of the same bytes written as bits, most significant bit first (the same 0xcbf43926)",
      value: {
        code: { family: "crc", preset: "CRC-32/ISO-HDLC" },
        messages: ["00110001 00110010 00110011 00110100 00110101 00110110 00110111 00111000 00111001"],
      },
    },
    bch: { summary: "BCH (15,7), t = 2", value: { code: { family: "bch", m: 4, t: 2 }, messages: ["1010011"] } },
    rs: {
      summary: "Reed–Solomon over GF(256) as in the QR-code standard (field 0x11D, roots α^0…α^9), 16 data symbols",
      value: { code: { family: "rs", m: 8, n: 26, k: 16, firstRoot: 0 }, messages: [[32, 91, 11, 120, 209, 114, 220, 77, 67, 64, 236, 17, 236, 17, 236, 17]] },
    },
    golay: { summary: "Extended Golay (24,12)", value: { code: { family: "golay", extended: true }, messages: ["1100 1010 0101"] } },
  },
  work: (req) => batchWork(req.code, req.messages, "encode"),
  workRule: `the code's construction once, then each message. ${CODE_WORK_RULE}`,
  handler: (req) => {
    // Every bad message is reported, not only the first: each check below records its word's error and skips words that failed.
    const errors = new WordErrors("messages", req.messages.length);
    const messages = errors.each(req.messages, (m, i) => at(["messages", i], () => readWord(req.code, m)));
    const codes = resolveBatch(req.code, messages, errors, () => 0);
    // Every family but CRC (whose k is each message's length) has one code for the whole batch.
    const together = req.code.family === "crc" || errors.any ? undefined : encodeTogether(codes[0]!, messages as Word[]);
    const results = errors.each(messages, (m, i) => {
      const code = codes[i]!;
      const cw = together?.[i] ?? atWord("messages", i, () => code.encode(m));
      if (req.code.family !== "crc") return { codeword: formatWord(code, cw) };
      return { codeword: formatCrcWord(req.code, cw as Uint8Array), crc: crcHex(crcComputeBits(crcParams(req.code), m as Uint8Array), code.n - code.k) };
    });
    const codewords = errors.settle(results);
    return { code: summarize(codes[0]!, req.code), codewords };
  },
});
