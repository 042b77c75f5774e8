import { z } from "zod";
import { CRC_CATALOGUE, crcPreset } from "@/lib/core/codes/crc";
import { InputError } from "@/lib/core/errors";
import { MAX_M, MIN_M } from "@/lib/core/gfpm";
import { bitsOf, documentRules, exactlyOneOf, type JsonSchema } from "./schemas";

/** Largest codeword length of a code given by a matrix. */
export const MAX_MATRIX_N = 4096;
/** Largest number of rows of a generator or parity-check matrix. */
export const MAX_MATRIX_ROWS = 4096;
/** Smallest field of a BCH code: GF(2^3). */
const MIN_BCH_M = 3;

const fieldSizes = (from: number) => Array.from({ length: MAX_M - from + 1 }, (_, i) => from + i);

/**
 * JSON Schema, per field size: `then(m)` applies when the object's `m` is m. Limits such as n ≤ 2^m − 1
 * depend on m, and JSON Schema compares a field with constants only, so each m gets its own limits.
 */
const perFieldSize = (from: number, then: (m: number) => JsonSchema): JsonSchema[] =>
  fieldSizes(from).map((m) => ({ if: { properties: { m: { const: m } }, required: ["m"] }, then: then(m) }));

const HEX_VALUE = /^(0x)?[0-9a-fA-F]{1,16}$/;

const hexOrInt = (what: string, name: string, nonZero = false) => {
  const hex = z.string().regex(HEX_VALUE, "Use hex digits, optionally with 0x (at most 16).");
  return z
    .union([
      // The core refuses a zero polynomial written in hex ("poly must not be zero").
      nonZero ? documentRules(hex, { not: { pattern: "^(0x)?0+$" } }) : hex,
      z
        .number()
        .int()
        .min(nonZero ? 1 : 0, `${name} must not be zero`)
        .max(Number.MAX_SAFE_INTEGER),
    ])
    .meta({ description: `${what}: a hex string such as "0x04C11DB7" (needed above 2^53) or an integer.` });
};

/** A field polynomial of degree m: from 2^m to 2^(m+1) − 1, as an integer or hex (leading digit by m mod 4). */
const degree = (m: number): JsonSchema => ({
  anyOf: [
    { type: "string", pattern: `^(0x)?0*${["1", "[23]", "[4-7]", "[89a-fA-F]"][m % 4]}${m >= 4 ? `[0-9a-fA-F]{${Math.floor(m / 4)}}` : ""}$` },
    { type: "integer", minimum: 2 ** m, maximum: 2 ** (m + 1) - 1 },
  ],
});

const repetition = z
  .strictObject({ family: z.literal("repetition"), n: z.number().int().min(1).max(65_535).meta({ description: "Length; odd n avoids ties in majority decoding." }) })
  .meta({ id: "RepetitionCode", description: "(n, 1) repetition code, majority decoding; an even n reports a tie as a failure." });

const parity = z
  .strictObject({
    family: z.literal("parity"),
    n: z.number().int().min(2).max(1_048_576),
    parity: z.enum(["even", "odd"]).default("even").meta({ description: "Odd parity words are a coset, not a linear code: analysis and minimum distance take even parity only." }),
  })
  .meta({ id: "ParityCode", description: "(n, n − 1) single parity check: detects any odd number of errors; fills one erasure." });

const hamming = z
  .strictObject({
    family: z.literal("hamming"),
    r: z.number().int().min(2).max(16).meta({ description: "Parity bits: n = 2^r − 1, k = n − r." }),
    extended: z.boolean().default(false).meta({ description: "Add an overall parity bit: (2^r, 2^r − r − 1), corrects one error and detects two." }),
  })
  .meta({ id: "HammingCode" });

const golay = z
  .strictObject({ family: z.literal("golay"), extended: z.boolean().default(false).meta({ description: "false: (23,12), perfect, t = 3; true: (24,12)." }) })
  .meta({ id: "GolayCode" });

const matrixRow = bitsOf(MAX_MATRIX_N, "MatrixRow", true);
const rows = "rows of one length n (at most 4096 bits), linearly independent";

const linear = documentRules(
  z
    .strictObject({
      family: z.literal("linear"),
      generator: z.array(matrixRow).min(1).max(MAX_MATRIX_ROWS).optional().meta({ description: `Generator matrix G: k ${rows}.` }),
      parityCheck: z.array(matrixRow).min(1).max(MAX_MATRIX_ROWS).optional().meta({ description: `Parity-check matrix H: n − k ${rows}.` }),
    })
    .superRefine((v, ctx) => {
      if ((v.generator === undefined) === (v.parityCheck === undefined)) ctx.addIssue({ code: "custom", path: ["generator"], message: "Give exactly one of `generator` and `parityCheck`." });
    })
    .meta({
      id: "LinearCode",
      description:
        `Any binary linear code from a generator or parity-check matrix (exactly one of them; n ≤ ${MAX_MATRIX_N}); syndrome decoding: ` +
        "a coset-leader table up to n − k = 20, then bounded-distance search up to 2^22 error patterns per word, else the decoder is refused (422).",
    }),
  exactlyOneOf("generator", "parityCheck"),
);

/** Why a CRC preset name is not in the catalogue, or undefined when it is. */
function presetProblem(name: string): string | undefined {
  try {
    crcPreset(name);
    return undefined;
  } catch (e) {
    if (e instanceof InputError) return e.message;
    throw e;
  }
}

const belowTop = "; below 2^width";

const crc = documentRules(
  z
    .strictObject({
      family: z.literal("crc"),
      preset: z
        .string()
        .max(40)
        .optional()
        .meta({
          description: "A catalogue name or alias such as CRC-32/ISO-HDLC (letter case is ignored); explicit parameters override it.",
          enum: CRC_CATALOGUE.flatMap((p) => [p.name, ...p.aliases]),
        }),
      width: z.number().int().min(1).max(64).optional().meta({ description: "Register width in bits; required without a `preset`." }),
      poly: hexOrInt(`Generator polynomial without its top bit, not zero${belowTop}; required without a \`preset\``, "poly", true).optional(),
      init: hexOrInt(`Initial register value${belowTop}`, "init").optional(),
      refin: z.boolean().optional().meta({
        description:
          "Reflect each input byte: it enters the register least significant bit first. Bits given as 0/1 are bytes written most significant bit first " +
          '(unless `bitsAs` is "stream"), so each whole byte is reversed too.',
      }),
      refout: z.boolean().optional().meta({ description: "Reflect the final register." }),
      xorout: hexOrInt(`Value XORed into the final register${belowTop}`, "xorout").optional(),
      bitsAs: z
        .enum(["bytes", "stream"], { error: 'bitsAs is "bytes" (bits are bytes written most significant bit first) or "stream" (bits enter the register as written).' })
        .optional()
        .meta({
          description:
            'How words written as bits meet the byte-wise model. "bytes" (default): bits are bytes written most significant bit first, as in a hex dump; ' +
            "with refin each whole byte enters the register reversed, and a message must be a whole number of bytes. " +
            '"stream": the bits enter the register in the order written and refin reorders nothing (for messages that are not whole bytes). ' +
            "Responses write words the same way. Without refin both read the same.",
        }),
    })
    .superRefine((v, ctx) => {
      if (v.preset !== undefined) {
        const unknown = presetProblem(v.preset);
        if (unknown) ctx.addIssue({ code: "custom", path: ["preset"], message: unknown });
      }
      if (v.preset === undefined) {
        for (const f of ["width", "poly"] as const) if (v[f] === undefined) ctx.addIssue({ code: "custom", path: [f], message: `\`${f}\` is required without a \`preset\`.` });
      }
    })
    .meta({
      id: "CrcCode",
      description:
        "CRC in the Williams parameter model: width, poly, init, refin, refout, xorout; or a catalogue preset. " +
        'Worked example: the bits of ASCII "123456789" written most significant bit first, ' +
        '"00110001 00110010 00110011 00110100 00110101 00110110 00110111 00111000 00111001", with preset CRC-32/ISO-HDLC (refin) give crc 0xcbf43926, ' +
        'the catalogue check value, exactly as { text: "123456789" } or { hex: "313233343536373839" } do.',
    }),
  { allOf: [{ anyOf: [{ required: ["preset"] }, { required: ["width", "poly"] }] }] },
);

const bch = documentRules(
  z
    .strictObject({
      family: z.literal("bch"),
      m: z.number().int().min(MIN_BCH_M).max(MAX_M).meta({ description: "Field GF(2^m): n = 2^m − 1 before shortening." }),
      t: z.number().int().min(1).meta({ description: "Designed error-correcting capability: 1 to 2^(m−1) − 1, so that k ≥ 1." }),
      shorten: z
        .number()
        .int()
        .min(0)
        .default(0)
        .meta({ description: "Leading message bits fixed at zero and not sent: fewer than k of the full-length code (at most 2^m − m − 2 whatever t is)." }),
      primitivePoly: hexOrInt("Primitive polynomial of GF(2^m), with its top bit (degree m)", "primitivePoly").optional(),
    })
    .meta({ id: "BchCode", description: "Binary narrow-sense primitive BCH code; Berlekamp–Massey and Chien search." }),
  {
    allOf: perFieldSize(MIN_BCH_M, (m) => ({
      properties: { t: { maximum: 2 ** (m - 1) - 1 }, shorten: { maximum: 2 ** m - m - 2 }, primitivePoly: degree(m) },
    })),
  },
);

const rs = documentRules(
  z
    .strictObject({
      family: z.literal("rs"),
      m: z.number().int().min(MIN_M).max(MAX_M).meta({ description: "Symbol size in bits: GF(2^m)." }),
      n: z.number().int().min(2).optional().meta({ description: "Length in symbols, at most 2^m − 1 (the default; less is a shortened code)." }),
      k: z.number().int().min(1).meta({ description: "Message symbols: fewer than n." }),
      firstRoot: z.number().int().min(0).default(1).meta({ description: "b, below 2^m − 1: the generator's roots are α^b … α^(b+n−k−1)." }),
      primitivePoly: hexOrInt("Primitive polynomial of GF(2^m), with its top bit (degree m)", "primitivePoly").optional(),
      primitiveElement: z
        .number()
        .int()
        .min(2)
        .optional()
        .meta({ description: "The primitive element α as a field element below 2^m whose powers give every non-zero element (default 2, i.e. x)." }),
    })
    .meta({ id: "ReedSolomonCode", description: "Reed–Solomon over GF(2^m); errors-and-erasures decoding (Forney)." }),
  {
    allOf: perFieldSize(MIN_M, (m) => ({
      properties: {
        n: { maximum: 2 ** m - 1 },
        k: { maximum: 2 ** m - 2 },
        firstRoot: { maximum: 2 ** m - 2 },
        primitiveElement: { maximum: 2 ** m - 1 },
        primitivePoly: degree(m),
      },
    })),
  },
);

export const codeSpec = z
  .discriminatedUnion("family", [repetition, parity, hamming, golay, linear, crc, bch, rs])
  .meta({ id: "CodeSpec", description: "Which code: chosen by `family`." });

export type CodeSpec = z.output<typeof codeSpec>;
type Family = CodeSpec["family"];

/** JSON Schema condition on a request: its `code` is of one of these families (and, with `also`, has these fields). */
export const codeIs = (families: Family[], also: Record<string, JsonSchema> = {}): JsonSchema => ({
  properties: { code: { properties: { family: { enum: families }, ...also }, required: ["family", ...Object.keys(also)] } },
  required: ["code"],
});

/** JSON Schema for a request with `code` and optional `crcMessageBits`: what POST /codes/analyze refuses of a code whatever its size. */
export const analysisRules: JsonSchema[] = [
  { if: codeIs(["crc"]), then: { required: ["crcMessageBits"] } },
  { if: codeIs(["parity"]), then: { properties: { code: { properties: { parity: { const: "even" } } } } } },
];

const BINARY: Family[] = ["repetition", "parity", "hamming", "golay", "linear", "bch"];
const zeroOne = { type: "array", items: { maximum: 1 } };
const hexWord = { type: "object", required: ["hex"] };
// CRC reads { hex } without a length as bytes: whole pairs of digits.
const EVEN_HEX = "^(0[xX])?[ _]*([0-9a-fA-F][ _]*[0-9a-fA-F][ _]*)*$";

/** Families whose decoders take erasures (BlockCode.supportsErasures). */
const WITH_ERASURES: Family[] = ["parity", "rs"];

/**
 * JSON Schema for the word list `field` of a request with `code`: the forms each family reads
 * (lib/api/codes.ts readWord), Reed–Solomon symbols below 2^m; with `erasures`, also a decode request's
 * erasures: empty lists for families without them, Reed–Solomon positions below 2^m − 1.
 */
export function wordRules(field: string, erasures = false): JsonSchema[] {
  const items = (...forms: JsonSchema[]) => ({ [field]: { items: { anyOf: forms } } });
  const noErasures = BINARY.concat("crc").filter((f) => !WITH_ERASURES.includes(f));
  return [
    { if: codeIs(BINARY), then: { properties: items({ type: "string" }, hexWord, zeroOne) } },
    {
      if: codeIs(["crc"]),
      then: {
        properties: items({ type: "string" }, { ...hexWord, properties: { hex: { pattern: EVEN_HEX } } }, { type: "object", required: ["hex", "length"] }, { type: "object", required: ["text"] }, zeroOne),
      },
    },
    ...fieldSizes(MIN_M).map((m) => ({
      if: codeIs(["rs"], { m: { const: m } }),
      then: {
        properties: {
          ...items({ type: "string" }, hexWord, { type: "array", items: { maximum: 2 ** m - 1 } }),
          ...(erasures ? { erasures: { items: { items: { maximum: 2 ** m - 2 } } } } : {}),
        },
      },
    })),
    ...(erasures ? [{ if: codeIs(noErasures), then: { properties: { erasures: { items: { maxItems: 0 } } } } }] : []),
  ];
}
