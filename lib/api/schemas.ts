import { zodToOpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import { z } from "zod";

/** Longest word accepted anywhere: 1,048,576 bits. */
export const MAX_WORD_BITS = 1_048_576;

/** A JSON Schema 2020-12 fragment. */
export type JsonSchema = { [keyword: string]: unknown } | boolean;

/**
 * Adds JSON Schema keywords to `schema` in the OpenAPI document only: the cross-field rules (oneOf,
 * if/then, dependentRequired, `not`) that a zod refinement, the handler or the core checks with its own
 * message. They stay out of zod's own metadata, which the console's form reads back through
 * z.fromJSONSchema, and that refuses conditionals, `not` and dependentRequired. Call it on the finished
 * schema: .meta() returns a copy that does not carry them.
 */
export function documentRules<T extends z.ZodType>(schema: T, keywords: { [keyword: string]: JsonSchema | JsonSchema[] | Record<string, unknown> }): T {
  zodToOpenAPIRegistry.add(schema, keywords as never);
  return schema;
}

/** JSON Schema: exactly one of these fields is present. */
export const exactlyOneOf = (...names: string[]) => ({ oneOf: names.map((n) => ({ required: [n] })) });

/** JSON Schema: at least one of these fields is present (put inside allOf: beside `properties`, client generators read a bare anyOf as an alternative to them). */
export const atLeastOneOf = (...names: string[]) => ({ anyOf: names.map((n) => ({ required: [n] })) });

// What parseBits accepts; it names the first bad character itself, so the patterns are stated, not checked twice.
const BIT_STRING = "^[01 _]*$";
const HEX_STRING = "^(0[xX])?[0-9a-fA-F _]*$";
// The same with at least one bit (one digit).
const SOME_BITS = "^[ _]*[01][01 _]*$";
const SOME_HEX = "^(0[xX])?[ _]*[0-9a-fA-F][0-9a-fA-F _]*$";

/** A binary word of at most `maxBits` bits (and, with `nonEmpty`, at least one), named `id` in the document. */
export function bitsOf(maxBits: number, id: string, nonEmpty = false) {
  return z
    .union([
      z
        .string()
        .max(2 * maxBits)
        .meta({ description: "0/1 characters; spaces and underscores separate groups.", pattern: nonEmpty ? SOME_BITS : BIT_STRING, example: "1011 0010" }),
      z
        .array(z.number().int().min(0).max(1))
        .max(maxBits)
        .meta({ description: "One number per bit.", example: [1, 0, 1, 1], ...(nonEmpty ? { minItems: 1 } : {}) }),
      z
        .strictObject({
          hex: z
            .string()
            .max(maxBits / 4 + 2)
            .meta({
              description: "Hex digits, first digit's most significant bit first; optional 0x; spaces and underscores separate groups.",
              pattern: nonEmpty ? SOME_HEX : HEX_STRING,
              example: "b2",
            }),
          length: z
            .number()
            .int()
            .min(0)
            .max(maxBits)
            .optional()
            .meta({
              description: "Take only the first `length` bits: from 4·digits − 3 to 4·digits, so that no whole digit is ignored (default: 4 per digit).",
              ...(nonEmpty ? { minimum: 1 } : {}),
            }),
        })
        .meta({ description: "Hex with an optional bit length." }),
    ])
    .meta({ id, description: `A binary word, ${nonEmpty ? "1 to" : "at most"} ${maxBits} bits: a 0/1 string, an array of 0/1, or hex.` });
}

export const bitsInput = bitsOf(MAX_WORD_BITS, "Bits");

export const probability = z.number().min(0).max(1);

/** A probability with its base-10 logarithm, which stays finite where the value underflows. */
export const tail = z
  .object({
    value: z.number().meta({ description: "The probability (0 only when it is below the smallest double, about 1e-308, or impossible)." }),
    log10: z.number().nullable().meta({ description: "log10 of the probability; null only when the event is impossible." }),
  })
  .meta({ id: "Probability" });

export const toTail = (t: { value: number; log10: number }) => ({ value: t.value, log10: Number.isFinite(t.log10) ? t.log10 : null });

export const caution =
  "Engineering estimates, not certification: for safety-critical links (medical, aviation, automotive, public safety) defer to the applicable standards and to licensed practice.";
