import { z } from "zod";
import { awgnCapacityReal, becCapacity, bpskAwgnCapacity, bpskShannonLimitEbN0, bscCapacity, dbToLinear, linearToDb, shannonHartley, shannonLimitEbN0 } from "@/lib/core/capacity";
import { defineEndpoint } from "../endpoint";
import { atLeastOneOf, caution, documentRules, probability } from "../schemas";

const db = z.number().min(-100).max(100);
// Linear S/N over the same ±100 dB as `snrDb` (or exactly 0): a subnormal S/N divided by 2R underflows to an Eb/N0 of 0, −∞ dB.
const snrLinear = documentRules(
  z
    .number()
    .min(0)
    .max(1e10)
    .refine((x) => x === 0 || x >= 1e-10, "S/N must be 0 or from 1e-10 to 1e10 (−100 to 100 dB)."),
  { not: { exclusiveMinimum: 0, exclusiveMaximum: 1e-10 } },
);
/** What a rate counts: on the binary channels a channel use is one binary symbol (BPSK: one real dimension); a complex symbol (QPSK, QAM) is two real dimensions. */
const RATE_UNITS = ["bits per channel use", "bits per real dimension", "bits per complex symbol"] as const;
type RateUnit = (typeof RATE_UNITS)[number];
const perUse = z.literal("bits per channel use").optional().meta({ description: "The rate's unit: information bits per channel use (the only one here)." });
const awgnUnit = z
  .enum(["bits per real dimension", "bits per complex symbol"])
  .default("bits per real dimension")
  .meta({ description: "The unit of `rate`, and of the capacity and margin in the response: per real dimension (the default), or per complex symbol, which is 2 real dimensions (QPSK at rate 1/2 carries 1 bit per complex symbol)." });
const rate = z
  .number()
  .min(0)
  .max(16)
  .meta({ description: "Code rate R in information bits per `rateUnit` (with BPSK or QPSK, k/n per real dimension). 0 asks for the R → 0 limit, Eb/N0 = ln 2 (−1.59 dB)." });

const bsc = z.strictObject({
  channel: z.literal("bsc"),
  p: probability.meta({ description: "Crossover probability." }),
  rate: z.number().gt(0).max(1).optional(),
  rateUnit: perUse,
});
const bec = z.strictObject({
  channel: z.literal("bec"),
  erasure: probability.meta({ description: "Erasure probability ε." }),
  rate: z.number().gt(0).max(1).optional(),
  rateUnit: perUse,
});
/**
 * The ways of giving the operating point: exactly one, or none with a `rate` to ask for its Shannon limit alone.
 * Checked on the union below, stated on each channel's object.
 */
const operatingPoint = { awgn: ["snrDb", "snr", "ebN0Db"], "bpsk-awgn": ["esN0Db", "ebN0Db"] };
const pointRules = (names: string[]) => ({
  // One branch per way of giving the point, and one for none of them with a rate: two points match two branches and fail.
  oneOf: [...names.map((n) => ({ required: [n] })), { not: atLeastOneOf(...names), required: ["rate"] }],
  dependentRequired: { ebN0Db: ["rate"] },
});

const awgn = documentRules(
  z.strictObject({
    channel: z.literal("awgn"),
    snrDb: db.optional().meta({ description: "Signal-to-noise ratio S/N in dB." }),
    snr: snrLinear.optional().meta({ description: "S/N as a linear ratio: 0, or from 1e-10 to 1e10 (−100 to 100 dB, as `snrDb`)." }),
    ebN0Db: db.optional().meta({ description: "Eb/N0 in dB; needs `rate`, which sets S/N = 2R·Eb/N0 for R per real dimension (R·Eb/N0 per complex symbol)." }),
    rate: rate.optional(),
    rateUnit: awgnUnit,
    bandwidthHz: z.number().gt(0).max(1e15).optional().meta({ description: "Bandwidth B in Hz: adds the Shannon–Hartley capacity B·log2(1 + S/N) in bits/s." }),
  }).meta({
    description:
      "AWGN: exactly one of `snrDb`, `snr` and `ebN0Db` (with `rate`), or none of them with a `rate` for its Shannon limit alone. " +
      "S/N per real dimension equals Es/N0 per complex symbol, so either unit takes the same S/N.",
  }),
  pointRules(operatingPoint.awgn),
);
const bpskAwgn = documentRules(
  z.strictObject({
    channel: z.literal("bpsk-awgn"),
    esN0Db: db.optional().meta({ description: "Es/N0 per BPSK symbol in dB." }),
    ebN0Db: db.optional().meta({ description: "Eb/N0 in dB; needs `rate` (Es/N0 = R·Eb/N0)." }),
    rate: z.number().gt(0).lt(1).optional(),
    rateUnit: perUse,
  }).meta({ description: "BPSK input on AWGN: exactly one of `esN0Db` and `ebN0Db` (with `rate`), or neither with a `rate` for its Shannon limit alone." }),
  pointRules(operatingPoint["bpsk-awgn"]),
);

const exactlyOne = (v: Record<string, unknown>, names: string[], ctx: z.RefinementCtx) => {
  const given = names.filter((n) => v[n] !== undefined);
  if (given.length > 1 || (given.length === 0 && v.rate === undefined)) {
    const listed = names.map((n) => `\`${n}\``).join(", ");
    ctx.addIssue({ code: "custom", path: given.length ? [given[1]!] : [], message: `Give exactly one of ${listed}, or none of them with a \`rate\` for its Shannon limit alone.` });
  }
  if (v.ebN0Db !== undefined && v.rate === undefined) ctx.addIssue({ code: "custom", path: ["rate"], message: "`rate` is required with `ebN0Db`." });
};

const input = z
  .discriminatedUnion("channel", [bsc, bec, awgn, bpskAwgn])
  .superRefine((v, ctx) => {
    if (v.channel === "awgn") exactlyOne(v, operatingPoint.awgn, ctx);
    if (v.channel === "bpsk-awgn") exactlyOne(v, operatingPoint["bpsk-awgn"], ctx);
  })
  .meta({ id: "CapacityRequest" });

const quantity = (unit: string) => z.object({ value: z.number(), unit: z.literal(unit) });
const inRateUnit = z.object({ value: z.number(), unit: z.enum(RATE_UNITS) });

const output = z
  .object({
    channel: z.enum(["bsc", "bec", "awgn", "bpsk-awgn"]),
    capacity: inRateUnit
      .extend({ absError: z.number().optional().meta({ description: "Bound on the numerical integration error (BPSK input only)." }) })
      .optional()
      .meta({ description: "In `rateUnit`. Left out when the request gives no operating point (a Shannon limit alone)." }),
    capacityBitsPerSecond: quantity("bits/s").optional(),
    snr: z.object({ db: z.number().nullable().meta({ description: "null for S/N = 0 (−∞ dB)." }), linear: z.number() }).optional().meta({ description: "S/N per real dimension used (AWGN), or Es/N0 (BPSK input)." }),
    rate: z.number().optional().meta({ description: "The request's rate, in `rateUnit`." }),
    rateUnit: z.enum(RATE_UNITS).meta({ description: "The unit of `rate`, `capacity` and `rateMargin`: as the request stated it, or the channel's default." }),
    rateMargin: inRateUnit.optional().meta({ description: "C − R: positive when reliable communication at rate R is possible." }),
    shannonLimit: z
      .object({ ebN0Db: z.number(), ebN0: z.number(), formula: z.string() })
      .optional()
      .meta({ description: "Smallest Eb/N0 (per information bit) at which rate R can be reliable on this channel; the same whichever unit R is given in." }),
    operatingEbN0Db: z.number().optional(),
    gapDb: z.number().optional().meta({ description: "Operating Eb/N0 minus the Shannon limit, in dB." }),
    caution: z.string(),
  })
  .meta({ id: "CapacityResult" });

type Out = z.output<typeof output>;

function limitFields(limit: number, formula: string, operatingDb?: number): Partial<Out> {
  const limitDb = linearToDb(limit);
  return {
    shannonLimit: { ebN0Db: limitDb, ebN0: limit, formula },
    ...(operatingDb !== undefined ? { operatingEbN0Db: operatingDb, gapDb: operatingDb - limitDb } : {}),
  };
}

/** Capacity, rate and C − R in one unit: `perUnit` real dimensions (or channel uses) per unit of the rate. */
function inUnit(unit: RateUnit, perUnit: number, c: number | undefined, r: number | undefined): Partial<Out> {
  return {
    ...(c !== undefined ? { capacity: { value: c * perUnit, unit } } : {}),
    rateUnit: unit,
    ...(r !== undefined ? { rate: r } : {}),
    ...(c !== undefined && r !== undefined ? { rateMargin: { value: c * perUnit - r, unit } } : {}),
  };
}

const LIMIT_FORMULA = "(2^(2R) − 1)/(2R) for R per real dimension, (2^R − 1)/R per complex symbol (Shannon 1948)";
const LIMIT_AT_ZERO = "ln 2, the R → 0 limit of (2^(2R) − 1)/(2R) (Shannon 1948)";

export const capacity = defineEndpoint({
  id: "capacity",
  method: "POST",
  path: "/capacity",
  scope: "compute",
  tag: "Channels",
  summary: "Channel capacity, the Shannon limit on Eb/N0 for a rate, and the gap to it",
  description:
    "BSC 1 − H2(p); BEC 1 − ε; real AWGN ½·log2(1 + S/N) per real dimension and B·log2(1 + S/N) bits/s with a bandwidth (Shannon–Hartley), limit (2^(2R) − 1)/(2R); " +
    "BPSK-input AWGN by numerical integration (error below 1e-9 bits), limit by root finding. " +
    "Give a `rate` without an operating point for its Shannon limit alone (`rate: 0` on AWGN for the R → 0 limit, ln 2 = −1.59 dB). " +
    "Every response names the rate's unit in `rateUnit`: per channel use on BSC, BEC and BPSK input; on AWGN per real dimension unless the request says per complex symbol (QPSK, QAM).",
  input,
  output,
  examples: {
    bsc: { summary: "BSC with p = 0.11 (capacity ≈ 0.5)", value: { channel: "bsc", p: 0.11 } },
    telemetry: { summary: "A 25 kHz channel at 12 dB S/N", value: { channel: "awgn", snrDb: 12, bandwidthHz: 25000 } },
    gap: { summary: "Gap of a rate-1/2 code operating at 2.5 dB, BPSK input", value: { channel: "bpsk-awgn", ebN0Db: 2.5, rate: 0.5 } },
    bec: { summary: "Erasure channel losing 20 % of symbols, rate 3/4", value: { channel: "bec", erasure: 0.2, rate: 0.75 } },
    limit: { summary: "The Shannon limit of a QPSK link carrying 1.5 bits per complex symbol, no operating point", value: { channel: "awgn", rate: 1.5, rateUnit: "bits per complex symbol" } },
  },
  // Closed forms are immediate; BPSK input integrates numerically (about 2^23), and its Shannon limit finds a root of that integral.
  work: (req) => (req.channel !== "bpsk-awgn" ? 256 : (req.esN0Db ?? req.ebN0Db) !== undefined ? 2 ** 23 + (req.rate !== undefined ? 2 ** 24 : 0) : 2 ** 24),
  workRule:
    "256 for BSC, BEC and AWGN (closed forms); 2^23 for BPSK-input AWGN at an operating point (numerical integration), plus 2^24 when a `rate` asks for its Shannon limit (root finding over the integral).",
  handler: (req): Out => {
    switch (req.channel) {
      case "bsc":
        return { channel: "bsc", ...inUnit("bits per channel use", 1, bscCapacity(req.p), req.rate), caution } as Out;
      case "bec":
        return { channel: "bec", ...inUnit("bits per channel use", 1, becCapacity(req.erasure), req.rate), caution } as Out;
      case "awgn": {
        const perUnit = req.rateUnit === "bits per complex symbol" ? 2 : 1;
        // Everything below counts per real dimension.
        const r = req.rate !== undefined ? req.rate / perUnit : undefined;
        const snr =
          req.snr ?? (req.snrDb !== undefined ? dbToLinear(req.snrDb) : req.ebN0Db !== undefined ? 2 * r! * dbToLinear(req.ebN0Db) : undefined);
        const snrDb = req.snrDb ?? (snr !== undefined && snr > 0 ? linearToDb(snr) : undefined);
        // Eb/N0 = S/N / (2R), taken in dB so that a tiny R does not overflow the quotient.
        const operating = req.ebN0Db ?? (r !== undefined && r > 0 && snrDb !== undefined ? snrDb - 10 * Math.log10(2 * r) : undefined);
        return {
          channel: "awgn",
          ...inUnit(req.rateUnit, perUnit, snr !== undefined ? awgnCapacityReal(snr) : undefined, req.rate),
          ...(req.bandwidthHz !== undefined && snr !== undefined ? { capacityBitsPerSecond: { value: shannonHartley(req.bandwidthHz, snr), unit: "bits/s" as const } } : {}),
          ...(snr !== undefined ? { snr: { db: snr > 0 ? (snrDb ?? null) : null, linear: snr } } : {}),
          ...(r !== undefined ? limitFields(shannonLimitEbN0(r), r === 0 ? LIMIT_AT_ZERO : LIMIT_FORMULA, operating) : {}),
          caution,
        } as Out;
      }
      case "bpsk-awgn": {
        const esN0 = req.esN0Db !== undefined ? dbToLinear(req.esN0Db) : req.ebN0Db !== undefined ? req.rate! * dbToLinear(req.ebN0Db) : undefined;
        const c = esN0 !== undefined ? bpskAwgnCapacity(esN0) : undefined;
        const operating = req.ebN0Db ?? (req.rate !== undefined && req.esN0Db !== undefined ? req.esN0Db - 10 * Math.log10(req.rate) : undefined);
        const out = { channel: "bpsk-awgn", ...inUnit("bits per channel use", 1, c?.capacity, req.rate) } as Out;
        if (c && out.capacity) out.capacity.absError = c.absError;
        return {
          ...out,
          ...(esN0 !== undefined ? { snr: { db: linearToDb(esN0), linear: esN0 } } : {}),
          ...(req.rate !== undefined ? limitFields(bpskShannonLimitEbN0(req.rate), "C_BPSK(R·Eb/N0) = R, solved numerically", operating) : {}),
          caution,
        };
      }
    }
  },
});
