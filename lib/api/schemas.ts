import { z } from "zod";

/** Longest word accepted anywhere: 1,048,576 bits. */
export const MAX_WORD_BITS = 1_048_576;

export const bitsInput = z
  .union([
    z.string().max(2 * MAX_WORD_BITS).meta({ description: "0/1 characters; spaces and underscores separate groups.", example: "1011 0010" }),
    z.array(z.number().int().min(0).max(1)).max(MAX_WORD_BITS).meta({ description: "One number per bit.", example: [1, 0, 1, 1] }),
    z
      .strictObject({
        hex: z.string().max(MAX_WORD_BITS / 4 + 2).meta({ description: "Hex digits, first digit's most significant bit first; optional 0x.", example: "b2" }),
        length: z.number().int().min(0).max(MAX_WORD_BITS).optional().meta({ description: "Take only the first `length` bits (default: 4 per digit)." }),
      })
      .meta({ description: "Hex with an optional bit length." }),
  ])
  .meta({ id: "Bits", description: `A binary word, at most ${MAX_WORD_BITS} bits: a 0/1 string, an array of 0/1, or hex.` });

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
