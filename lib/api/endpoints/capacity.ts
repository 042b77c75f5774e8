import { z } from "zod";
import { awgnCapacityReal, becCapacity, bpskAwgnCapacity, bpskShannonLimitEbN0, bscCapacity, dbToLinear, linearToDb, shannonHartley, shannonLimitEbN0 } from "@/lib/core/capacity";
import { defineEndpoint } from "../endpoint";
import { caution, documentRules, exactlyOneOf, probability } from "../schemas";

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
const rate = z.number().gt(0).max(16).meta({ description: "Code rate R in information bits per real channel use (for a binary code with BPSK, k/n)." });

const bsc = z.strictObject({
  channel: z.literal("bsc"),
  p: probability.meta({ description: "Crossover probability." }),
  rate: z.number().gt(0).max(1).optional(),
});
const bec = z.strictObject({
  channel: z.literal("bec"),
  erasure: probability.meta({ description: "Erasure probability ε." }),
  rate: z.number().gt(0).max(1).optional(),
});
/** The ways of giving the operating point, exactly one each: checked on the union below, stated on each channel's object. */
const operatingPoint = { awgn: ["snrDb", "snr", "ebN0Db"], "bpsk-awgn": ["esN0Db", "ebN0Db"] };
const pointRules = (names: string[]) => ({ ...exactlyOneOf(...names), dependentRequired: { ebN0Db: ["rate"] } });

const awgn = documentRules(
  z.strictObject({
    channel: z.literal("awgn"),
    snrDb: db.optional().meta({ description: "Signal-to-noise ratio S/N in dB." }),
    snr: snrLinear.optional().meta({ description: "S/N as a linear ratio: 0, or from 1e-10 to 1e10 (−100 to 100 dB, as `snrDb`)." }),
    ebN0Db: db.optional().meta({ description: "Eb/N0 in dB; needs `rate`, which sets S/N = 2R·Eb/N0 per real dimension." }),
    rate: rate.optional(),
    bandwidthHz: z.number().gt(0).max(1e15).optional().meta({ description: "Bandwidth B in Hz: adds the Shannon–Hartley capacity B·log2(1 + S/N) in bits/s." }),
  }).meta({ description: "Real AWGN: exactly one of `snrDb`, `snr` and `ebN0Db` (with `rate`)." }),
  pointRules(operatingPoint.awgn),
);
const bpskAwgn = documentRules(
  z.strictObject({
    channel: z.literal("bpsk-awgn"),
    esN0Db: db.optional().meta({ description: "Es/N0 per BPSK symbol in dB." }),
    ebN0Db: db.optional().meta({ description: "Eb/N0 in dB; needs `rate` (Es/N0 = R·Eb/N0)." }),
    rate: z.number().gt(0).lt(1).optional(),
  }).meta({ description: "BPSK input on AWGN: exactly one of `esN0Db` and `ebN0Db` (with `rate`)." }),
  pointRules(operatingPoint["bpsk-awgn"]),
);

const exactlyOne = (v: Record<string, unknown>, names: string[], ctx: z.RefinementCtx) => {
  const given = names.filter((n) => v[n] !== undefined);
  if (given.length !== 1) ctx.addIssue({ code: "custom", path: given.length ? [given[1]!] : [], message: `Give exactly one of ${names.map((n) => `\`${n}\``).join(", ")}.` });
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

const output = z
  .object({
    channel: z.enum(["bsc", "bec", "awgn", "bpsk-awgn"]),
    capacity: quantity("bits per channel use").extend({ absError: z.number().optional().meta({ description: "Bound on the numerical integration error (BPSK input only)." }) }),
    capacityBitsPerSecond: quantity("bits/s").optional(),
    snr: z.object({ db: z.number().nullable().meta({ description: "null for S/N = 0 (−∞ dB)." }), linear: z.number() }).optional().meta({ description: "S/N per real dimension used (AWGN), or Es/N0 (BPSK input)." }),
    rate: z.number().optional(),
    rateMargin: quantity("bits per channel use").optional().meta({ description: "C − R: positive when reliable communication at rate R is possible." }),
    shannonLimit: z
      .object({ ebN0Db: z.number(), ebN0: z.number(), formula: z.string() })
      .optional()
      .meta({ description: "Smallest Eb/N0 at which rate R can be reliable on this channel." }),
    operatingEbN0Db: z.number().optional(),
    gapDb: z.number().optional().meta({ description: "Operating Eb/N0 minus the Shannon limit, in dB." }),
    caution: z.string(),
  })
  .meta({ id: "CapacityResult" });

type Out = z.output<typeof output>;

function limitFields(r: number, limit: number, formula: string, operatingDb?: number): Partial<Out> {
  const limitDb = linearToDb(limit);
  return {
    shannonLimit: { ebN0Db: limitDb, ebN0: limit, formula },
    ...(operatingDb !== undefined ? { operatingEbN0Db: operatingDb, gapDb: operatingDb - limitDb } : {}),
  };
}

const margin = (c: number, r?: number) => (r === undefined ? {} : { rate: r, rateMargin: { value: c - r, unit: "bits per channel use" as const } });

export const capacity = defineEndpoint({
  id: "capacity",
  method: "POST",
  path: "/capacity",
  scope: "compute",
  tag: "Channels",
  summary: "Channel capacity, the Shannon limit on Eb/N0 for a rate, and the gap to it",
  description:
    "BSC 1 − H2(p); BEC 1 − ε; real AWGN ½·log2(1 + S/N) per real dimension and B·log2(1 + S/N) bits/s with a bandwidth (Shannon–Hartley), limit (2^(2R) − 1)/(2R); " +
    "BPSK-input AWGN by numerical integration (error below 1e-9 bits), limit by root finding.",
  input,
  output,
  examples: {
    bsc: { summary: "BSC with p = 0.11 (capacity ≈ 0.5)", value: { channel: "bsc", p: 0.11 } },
    telemetry: { summary: "A 25 kHz channel at 12 dB S/N", value: { channel: "awgn", snrDb: 12, bandwidthHz: 25000 } },
    gap: { summary: "Gap of a rate-1/2 code operating at 2.5 dB, BPSK input", value: { channel: "bpsk-awgn", ebN0Db: 2.5, rate: 0.5 } },
    bec: { summary: "Erasure channel losing 20 % of symbols, rate 3/4", value: { channel: "bec", erasure: 0.2, rate: 0.75 } },
  },
  // Closed forms are immediate; BPSK input integrates numerically (about 2^23), and its Shannon limit finds a root of that integral.
  work: (req) => (req.channel !== "bpsk-awgn" ? 256 : 2 ** 23 + (req.rate !== undefined ? 2 ** 24 : 0)),
  workRule: "256 for BSC, BEC and AWGN (closed forms); 2^23 for BPSK-input AWGN (numerical integration), plus 2^24 when a `rate` asks for its Shannon limit (root finding over the integral).",
  handler: (req): Out => {
    switch (req.channel) {
      case "bsc": {
        const c = bscCapacity(req.p);
        return { channel: "bsc", capacity: { value: c, unit: "bits per channel use" }, ...margin(c, req.rate), caution };
      }
      case "bec": {
        const c = becCapacity(req.erasure);
        return { channel: "bec", capacity: { value: c, unit: "bits per channel use" }, ...margin(c, req.rate), caution };
      }
      case "awgn": {
        const snr = req.snr ?? (req.snrDb !== undefined ? dbToLinear(req.snrDb) : 2 * req.rate! * dbToLinear(req.ebN0Db!));
        const c = awgnCapacityReal(snr);
        const operating = req.ebN0Db ?? (req.rate !== undefined && snr > 0 ? linearToDb(snr / (2 * req.rate)) : undefined);
        return {
          channel: "awgn",
          capacity: { value: c, unit: "bits per channel use" },
          ...(req.bandwidthHz !== undefined ? { capacityBitsPerSecond: { value: shannonHartley(req.bandwidthHz, snr), unit: "bits/s" as const } } : {}),
          snr: { db: snr > 0 ? linearToDb(snr) : null, linear: snr },
          ...margin(c, req.rate),
          ...(req.rate !== undefined ? limitFields(req.rate, shannonLimitEbN0(req.rate), "(2^(2R) − 1)/(2R) (Shannon 1948)", operating) : {}),
          caution,
        };
      }
      case "bpsk-awgn": {
        const esN0 = req.esN0Db !== undefined ? dbToLinear(req.esN0Db) : req.rate! * dbToLinear(req.ebN0Db!);
        const c = bpskAwgnCapacity(esN0);
        const operating = req.ebN0Db ?? (req.rate !== undefined ? linearToDb(esN0 / req.rate) : undefined);
        return {
          channel: "bpsk-awgn",
          capacity: { value: c.capacity, unit: "bits per channel use", absError: c.absError },
          snr: { db: linearToDb(esN0), linear: esN0 },
          ...margin(c.capacity, req.rate),
          ...(req.rate !== undefined ? limitFields(req.rate, bpskShannonLimitEbN0(req.rate), "C_BPSK(R·Eb/N0) = R, solved numerically", operating) : {}),
          caution,
        };
      }
    }
  },
});
