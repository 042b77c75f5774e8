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

/** A request value for a message: JSON, cut short. */
const shown = (v: unknown) => {
  const s = JSON.stringify(v) ?? String(v);
  return s.length > 40 ? `${s.slice(0, 40)}…` : s;
};

/** Our own words for any problem with a field (missing, wrong type, out of range): what it must be, and what came instead. */
const mustBe =
  (name: string, what: string) =>
  (iss: { input?: unknown }): string =>
    iss.input === undefined ? `\`${name}\` is required: ${what}.` : `\`${name}\` must be ${what}; got ${shown(iss.input)}.`;

/** A whole-number field from min to max whose every problem is reported in our words. */
const intField = (name: string, min: number, max: number, what = `a whole number from ${min} to ${max}`) => {
  const error = mustBe(name, what);
  return z.number({ error }).int({ error }).min(min, { error }).max(max, { error });
};

const boolField = (name: string) => z.boolean({ error: mustBe(name, "true or false") });

const hexOrInt = (what: string, name: string, nonZero = false) => {
  const hex = z.string().regex(HEX_VALUE, "Use hex digits, optionally with 0x (at most 16).");
  const error = mustBe(name, `hex digits such as "0x1021" (at most 16) or a whole number${nonZero ? " other than 0" : ""}`);
  return z
    .union(
      [
        // The core refuses a zero polynomial written in hex ("poly must not be zero").
        nonZero ? documentRules(hex, { not: { pattern: "^(0x)?0+$" } }) : hex,
        z
          .number({ error })
          .int({ error })
          .min(nonZero ? 1 : 0, `${name} must not be zero`)
          .max(Number.MAX_SAFE_INTEGER, { error }),
      ],
      { error },
    )
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
  .strictObject({ family: z.literal("repetition"), n: intField("n", 1, 65_535).meta({ description: "Length; odd n avoids ties in majority decoding." }) })
  .meta({ id: "RepetitionCode", description: "(n, 1) repetition code, majority decoding; an even n reports a tie as a failure." });

const parity = z
  .strictObject({
    family: z.literal("parity"),
    n: intField("n", 2, 1_048_576),
    parity: z
      .enum(["even", "odd"], { error: mustBe("parity", '"even" or "odd"') })
      .default("even").meta({ description: "Odd parity words are a coset, not a linear code: analysis and minimum distance take even parity only." }),
  })
  .meta({ id: "ParityCode", description: "(n, n − 1) single parity check: detects any odd number of errors; fills one erasure." });

/** Largest r of a Hamming code. */
const MAX_HAMMING_R = 16;

/** r and extended of the Hamming code of length n and dimension k: n = 2^r − 1, k = n − r, or extended n = 2^r, k = 2^r − r − 1; undefined otherwise. */
function hammingOf(n: number, k: number): { r: number; extended: boolean } | undefined {
  for (let r = 2; r <= MAX_HAMMING_R; r++) {
    if (n === 2 ** r - 1 && k === n - r) return { r, extended: false };
    if (n === 2 ** r && k === n - r - 1) return { r, extended: true };
  }
  return undefined;
}

/** Why (n, k) is not a Hamming pair, with the k that n would need when n is a Hamming length. */
function notHamming(n: number, k: number): string {
  const plain = Math.log2(n + 1);
  const ext = Math.log2(n);
  const fix = Number.isInteger(plain) && plain >= 2 ? `: for n = ${n}, k is ${n - plain}` : Number.isInteger(ext) && ext >= 2 ? `: for n = ${n} (extended), k is ${n - ext - 1}` : "";
  return (
    `n = ${n}, k = ${k} is not a Hamming code${fix}. Hamming codes have n = 2^r − 1, k = n − r (7 and 4, 15 and 11, 31 and 26, …) ` +
    `or, extended, n = 2^r, k = 2^r − r − 1 (8 and 4, 16 and 11, …), r from 2 to ${MAX_HAMMING_R}; or give \`r\` instead.`
  );
}

const hamming = documentRules(
  z
    .strictObject({
      family: z.literal("hamming"),
      r: intField("r", 2, MAX_HAMMING_R).optional().meta({ description: "Parity bits: n = 2^r − 1, k = n − r. Required unless `n` and `k` are given." }),
      n: intField("n", 3, 2 ** MAX_HAMMING_R)
        .optional()
        .meta({ description: "Length, with `k`, instead of `r`: 2^r − 1, or 2^r for the extended code (n = 7, k = 4 is r = 3; n = 8, k = 4 is its extension)." }),
      k: intField("k", 1, 2 ** MAX_HAMMING_R - MAX_HAMMING_R - 1).optional().meta({ description: "Message bits, with `n`: n − r, or 2^r − r − 1 for the extended code." }),
      extended: boolField("extended")
        .optional()
        .meta({ description: "Add an overall parity bit: (2^r, 2^r − r − 1), corrects one error and detects two. Default false; with `n` and `k`, n already says it." }),
    })
    .superRefine((v, ctx) => {
      if (v.n === undefined && v.k === undefined) {
        if (v.r === undefined) ctx.addIssue({ code: "custom", path: ["r"], message: "Give `r` (the number of parity bits, e.g. 3 for (7,4)), or `n` and `k` (e.g. 7 and 4)." });
        return;
      }
      if (v.n === undefined || v.k === undefined) {
        ctx.addIssue({ code: "custom", path: [v.n === undefined ? "n" : "k"], message: "`n` and `k` go together: give both (e.g. 7 and 4), or `r` alone." });
        return;
      }
      const h = hammingOf(v.n, v.k);
      if (!h) {
        ctx.addIssue({ code: "custom", path: ["k"], message: notHamming(v.n, v.k) });
        return;
      }
      if (v.r !== undefined && v.r !== h.r) ctx.addIssue({ code: "custom", path: ["r"], message: `r = ${v.r} disagrees with n = ${v.n}, k = ${v.k} (r = ${h.r}): give \`r\` or \`n\` and \`k\`.` });
      if (v.extended !== undefined && v.extended !== h.extended)
        ctx.addIssue({ code: "custom", path: ["extended"], message: `n = ${v.n}, k = ${v.k} is the ${h.extended ? "extended" : "plain"} code: drop \`extended\` or set it to ${h.extended}.` });
    })
    // Every consumer (the codec, the work estimate, summaries) reads r and extended only.
    .transform((v) => ({ family: v.family, ...(v.n !== undefined ? hammingOf(v.n, v.k!)! : { r: v.r!, extended: v.extended ?? false }) }))
    .meta({ id: "HammingCode", description: "Hamming code by `r`, or by `n` and `k` (which must be a Hamming pair); single-error correcting, the extended code also detects two." }),
  { allOf: [{ anyOf: [{ required: ["r"] }, { required: ["n", "k"] }] }] },
);

const golay = z
  .strictObject({ family: z.literal("golay"), extended: boolField("extended").default(false).meta({ description: "false: (23,12), perfect, t = 3; true: (24,12)." }) })
  .meta({ id: "GolayCode" });

const matrixRow = bitsOf(MAX_MATRIX_N, "MatrixRow", true);
const rows = "rows of one length n (at most 4096 bits), linearly independent";
const matrix = (name: string) => {
  const error = mustBe(name, `a list of 1 to ${MAX_MATRIX_ROWS} rows, each a word of bits such as "1011"`);
  return z.array(matrixRow, { error }).min(1, { error }).max(MAX_MATRIX_ROWS, { error });
};

const linear = documentRules(
  z
    .strictObject({
      family: z.literal("linear"),
      generator: matrix("generator").optional().meta({ description: `Generator matrix G: k ${rows}.` }),
      parityCheck: matrix("parityCheck").optional().meta({ description: `Parity-check matrix H: n − k ${rows}.` }),
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
        .string({ error: mustBe("preset", 'a catalogue name such as "CRC-32/ISO-HDLC"') })
        .max(40, { error: mustBe("preset", "a catalogue name of at most 40 characters") })
        .optional()
        .meta({
          description: "A catalogue name or alias such as CRC-32/ISO-HDLC (letter case is ignored); explicit parameters override it.",
          enum: CRC_CATALOGUE.flatMap((p) => [p.name, ...p.aliases]),
        }),
      width: intField("width", 1, 64).optional().meta({ description: "Register width in bits; required without a `preset`." }),
      poly: hexOrInt(`Generator polynomial without its top bit, not zero${belowTop}; required without a \`preset\``, "poly", true).optional(),
      init: hexOrInt(`Initial register value${belowTop}`, "init").optional(),
      refin: boolField("refin").optional().meta({
        description:
          "Reflect each input byte: it enters the register least significant bit first. Bits given as 0/1 are bytes written most significant bit first " +
          '(unless `bitsAs` is "stream"), so each whole byte is reversed too.',
      }),
      refout: boolField("refout").optional().meta({ description: "Reflect the final register." }),
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
      m: intField("m", MIN_BCH_M, MAX_M).meta({ description: "Field GF(2^m): n = 2^m − 1 before shortening." }),
      t: intField("t", 1, Number.MAX_SAFE_INTEGER, "a whole number from 1 to 2^(m−1) − 1").meta({ description: "Designed error-correcting capability: 1 to 2^(m−1) − 1, so that k ≥ 1." }),
      shorten: intField("shorten", 0, Number.MAX_SAFE_INTEGER, "a whole number of bits, at least 0 and fewer than k")
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
      m: intField("m", MIN_M, MAX_M).meta({ description: "Symbol size in bits: GF(2^m)." }),
      n: intField("n", 2, Number.MAX_SAFE_INTEGER, "a whole number of symbols from 2 to 2^m − 1")
        .optional()
        .meta({ description: "Length in symbols, at most 2^m − 1 (the default; less is a shortened code)." }),
      k: intField("k", 1, Number.MAX_SAFE_INTEGER, "a whole number of message symbols, at least 1 and fewer than n").meta({ description: "Message symbols: fewer than n." }),
      firstRoot: intField("firstRoot", 0, Number.MAX_SAFE_INTEGER, "a whole number from 0 to 2^m − 2").default(1).meta({ description: "b, below 2^m − 1: the generator's roots are α^b … α^(b+n−k−1)." }),
      primitivePoly: hexOrInt("Primitive polynomial of GF(2^m), with its top bit (degree m)", "primitivePoly").optional(),
      primitiveElement: intField("primitiveElement", 2, Number.MAX_SAFE_INTEGER, "a field element from 2 to 2^m − 1")
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

/** Each family's schema, named by its family. */
const MEMBERS = { repetition, parity, hamming, golay, linear, crc, bch, rs };
const familyList = Object.keys(MEMBERS)
  .map((f) => `"${f}"`)
  .join(", ");
const schemaId = (m: z.ZodType) => (z.globalRegistry.get(m) as { id: string }).id;

// The document generator maps each family to its schema from the literal, which it cannot see through
// HammingCode's transform: the mapping is written out.
export const codeSpec = documentRules(
  z
    .discriminatedUnion("family", [repetition, parity, hamming, golay, linear, crc, bch, rs], {
      error: (iss) => {
        const input: unknown = iss.input;
        if (typeof input === "object" && input !== null && !Array.isArray(input)) {
          const family = (input as { family?: unknown }).family;
          return family === undefined ? `\`family\` is required: one of ${familyList}.` : `\`family\` must be one of ${familyList}; got ${shown(family)}.`;
        }
        return mustBe("code", `an object with a \`family\` (${familyList}) and its parameters, e.g. { "family": "hamming", "r": 3 }`)(iss);
      },
    })
    .meta({ id: "CodeSpec", description: "Which code: chosen by `family`." }),
  { discriminator: { propertyName: "family", mapping: Object.fromEntries(Object.entries(MEMBERS).map(([f, m]) => [f, `#/components/schemas/${schemaId(m)}`])) } },
);

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
