import { z } from "zod";
import { crcPreset } from "@/lib/core/codes/crc";
import { InputError } from "@/lib/core/errors";
import { bitsInput } from "./schemas";

/** Largest codeword length of a code given by a matrix. */
export const MAX_MATRIX_N = 4096;
/** Largest number of rows of a generator or parity-check matrix. */
export const MAX_MATRIX_ROWS = 4096;

const hexOrInt = (what: string) =>
  z
    .union([z.string().regex(/^(0x)?[0-9a-fA-F]{1,16}$/, "Use hex digits, optionally with 0x (at most 16)."), z.number().int().min(0).max(Number.MAX_SAFE_INTEGER)])
    .meta({ description: `${what}: a hex string such as "0x04C11DB7" (needed above 2^53) or an integer.` });

const repetition = z
  .strictObject({ family: z.literal("repetition"), n: z.number().int().min(1).max(65_535).meta({ description: "Length; odd n avoids ties in majority decoding." }) })
  .meta({ id: "RepetitionCode", description: "(n, 1) repetition code, majority decoding; an even n reports a tie as a failure." });

const parity = z
  .strictObject({
    family: z.literal("parity"),
    n: z.number().int().min(2).max(1_048_576),
    parity: z.enum(["even", "odd"]).default("even"),
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

const linear = z
  .strictObject({
    family: z.literal("linear"),
    generator: z.array(bitsInput).min(1).max(MAX_MATRIX_ROWS).optional().meta({ description: "Generator matrix G (k rows of length n)." }),
    parityCheck: z.array(bitsInput).min(1).max(MAX_MATRIX_ROWS).optional().meta({ description: "Parity-check matrix H (n − k rows of length n)." }),
  })
  .superRefine((v, ctx) => {
    if ((v.generator === undefined) === (v.parityCheck === undefined)) ctx.addIssue({ code: "custom", path: ["generator"], message: "Give exactly one of `generator` and `parityCheck`." });
  })
  .meta({ id: "LinearCode", description: `Any binary linear code from a generator or parity-check matrix (n ≤ ${MAX_MATRIX_N}); syndrome decoding.` });

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

const crc = z
  .strictObject({
    family: z.literal("crc"),
    preset: z.string().max(40).optional().meta({ description: "A catalogue name such as CRC-32/ISO-HDLC; explicit parameters override it." }),
    width: z.number().int().min(1).max(64).optional(),
    poly: hexOrInt("Generator polynomial without its top bit").optional(),
    init: hexOrInt("Initial register value").optional(),
    refin: z.boolean().optional().meta({ description: "Reflect each input byte." }),
    refout: z.boolean().optional().meta({ description: "Reflect the final register." }),
    xorout: hexOrInt("Value XORed into the final register").optional(),
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
  .meta({ id: "CrcCode", description: "CRC in the Williams parameter model: width, poly, init, refin, refout, xorout; or a catalogue preset." });

const bch = z
  .strictObject({
    family: z.literal("bch"),
    m: z.number().int().min(3).max(16).meta({ description: "Field GF(2^m): n = 2^m − 1 before shortening." }),
    t: z.number().int().min(1).meta({ description: "Designed error-correcting capability." }),
    shorten: z.number().int().min(0).default(0).meta({ description: "Leading message bits fixed at zero and not sent." }),
    primitivePoly: hexOrInt("Primitive polynomial of GF(2^m), with its top bit").optional(),
  })
  .meta({ id: "BchCode", description: "Binary narrow-sense primitive BCH code; Berlekamp–Massey and Chien search." });

const rs = z
  .strictObject({
    family: z.literal("rs"),
    m: z.number().int().min(2).max(16).meta({ description: "Symbol size in bits: GF(2^m)." }),
    n: z.number().int().min(2).optional().meta({ description: "Length in symbols (default 2^m − 1; less is a shortened code)." }),
    k: z.number().int().min(1).meta({ description: "Message symbols." }),
    firstRoot: z.number().int().min(0).default(1).meta({ description: "b: the generator's roots are α^b … α^(b+n−k−1)." }),
    primitivePoly: hexOrInt("Primitive polynomial of GF(2^m), with its top bit").optional(),
    primitiveElement: z.number().int().min(2).optional().meta({ description: "The primitive element α as a field element (default 2, i.e. x)." }),
  })
  .meta({ id: "ReedSolomonCode", description: "Reed–Solomon over GF(2^m); errors-and-erasures decoding (Forney)." });

export const codeSpec = z
  .discriminatedUnion("family", [repetition, parity, hamming, golay, linear, crc, bch, rs])
  .meta({ id: "CodeSpec", description: "Which code: chosen by `family`." });

export type CodeSpec = z.output<typeof codeSpec>;
