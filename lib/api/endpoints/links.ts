import { z } from "zod";
import { dbToLinear, linearToDb } from "@/lib/core/capacity";
import { MAX_EXACT_PSK_ORDER, MAX_PSK_ORDER, maximumUncodedBer, BER_FORMULAS, QAM_ORDERS, requiredEbN0, uncodedErrorRates, type BerOptions, type Modulation } from "@/lib/core/modulation";
import { at, defineEndpoint } from "../endpoint";
import { atLeastOneOf, caution, documentRules } from "../schemas";

export const MAX_SWEEP_POINTS = 1000;

const PSK_ORDERS = Array.from({ length: Math.log2(MAX_PSK_ORDER) }, (_, i) => 2 ** (i + 1));
/** What a request asks for: at least one of these (checked on the union, stated on it). */
const WANTED = ["ebN0Db", "targetBer", "code"] as const;

const shared = {
  ebN0Db: z
    .union([z.number().min(-50).max(100), z.array(z.number().min(-50).max(100)).min(1).max(MAX_SWEEP_POINTS)])
    .optional()
    .meta({ description: `Eb/N0 in dB, or a sweep of up to ${MAX_SWEEP_POINTS} values.` }),
  targetBer: z
    .number()
    .gt(0)
    .lt(0.5)
    .optional()
    .meta({
      description:
        "Find the Eb/N0 that gives this uncoded BER, on the BER formula the response names: below the BER at Eb/N0 = 0, which is ½ for BPSK, QPSK and exact M-QAM, (M − 1)/(M·log2 M) for M-PSK and (2/log2 M)(1 − 1/√M) for M-QAM's nearest-neighbour formula.",
    }),
  code: z
    .strictObject({
      n: z.number().int().min(1).max(1_000_000),
      k: z.number().int().min(1).max(1_000_000).meta({ description: "At most n." }),
      dmin: z.number().int().min(1).max(1_000_000).meta({ description: "At most n − k + 1 (Singleton bound)." }),
    })
    .refine((c) => c.k <= c.n, { message: "k must be at most n.", path: ["k"] })
    .refine((c) => c.dmin <= c.n - c.k + 1, { message: "dmin cannot exceed n − k + 1 (Singleton bound).", path: ["dmin"] })
    .optional()
    .meta({ description: "A block code (n, k, dmin): adds its asymptotic coding gain." }),
};

/** The `order` of M-PSK or M-QAM: one of `values`, refused in the core's words. */
const orderOf = (scheme: "psk" | "qam", values: readonly number[], rule: string) =>
  z
    .literal(values, { error: (iss) => (iss.input === undefined ? `\`order\` is required for ${scheme}.` : `${scheme} order must be ${rule}; got ${JSON.stringify(iss.input)}`) })
    // zod-to-openapi 9 writes only the first value of a literal with several.
    .meta({ description: `M: ${rule}.`, enum: [...values] });

const NEAREST: BerOptions = { berFormula: "nearest-neighbour" };

/**
 * JSON Schema, per order: targetBer below the BER at Eb/N0 = 0 of the formula in use (½ for the exact ones, so only
 * the nearest-neighbour formulas need a rule), and no exact formula for M-PSK above MAX_EXACT_PSK_ORDER.
 */
const formulaRules = (scheme: "psk" | "qam", orders: readonly number[]) => ({
  allOf: orders.flatMap((order) => {
    const ifOrder = (extra: object = {}) => ({ properties: { order: { const: order }, ...extra }, required: ["order", ...Object.keys(extra)] });
    const below = (max: number) => ({ properties: { targetBer: { exclusiveMaximum: max } } });
    const nearestMax = maximumUncodedBer({ scheme, order }, NEAREST);
    if (scheme === "psk" && order > MAX_EXACT_PSK_ORDER) {
      return [{ if: ifOrder(), then: { properties: { berFormula: { const: "nearest-neighbour" }, ...below(nearestMax).properties } } }];
    }
    return nearestMax < 0.5 ? [{ if: ifOrder({ berFormula: { const: "nearest-neighbour" } }), then: below(nearestMax) }] : [];
  }),
});

const berFormula = (scheme: "psk" | "qam") =>
  z
    .enum(BER_FORMULAS)
    .optional()
    .meta({
      description:
        scheme === "qam"
          ? "The BER formula, for the points and for `targetBer`: `exact` (when left out), Cho & Yoon's closed form for Gray-labelled square M-QAM " +
            "(IEEE Trans. Commun. 50(7), 2002); `nearest-neighbour`, the approximation (4/log2 M)(1 − 1/√M)·Q(√(3·log2 M·Eb/N0/(M − 1))) " +
            "that counts symbol errors to adjacent points only, one wrong bit each (about 0.4 % below the exact value for 64-QAM at 6 dB)."
          : `The BER formula, for the points and for \`targetBer\`: \`exact\` (when left out, up to ${MAX_EXACT_PSK_ORDER}-PSK), the Gray BER as a sum over the ` +
            "decision sectors of the probability of each times the mean Hamming distance of labels that far apart (Lee, IEEE Trans. Commun. 34(5), 1986); " +
            `\`nearest-neighbour\` (when left out above ${MAX_EXACT_PSK_ORDER}-PSK, the only formula there), SER/log2 M: symbol errors to adjacent points only, one wrong bit each.`,
    });

const fixedOrder = (scheme: "bpsk" | "qpsk", order: number) =>
  z
    .literal(order, { error: `${scheme} has order ${order}; leave \`order\` out.` })
    .optional()
    .meta({ description: `${order}, the only order of ${scheme}; may be left out.` });

const input = documentRules(
  z
    .discriminatedUnion("modulation", [
      z.strictObject({ modulation: z.literal("bpsk"), order: fixedOrder("bpsk", 2), ...shared }).meta({ description: "BPSK." }),
      z.strictObject({ modulation: z.literal("qpsk"), order: fixedOrder("qpsk", 4), ...shared }).meta({ description: "QPSK, Gray-mapped." }),
      documentRules(
        z
          .strictObject({ modulation: z.literal("psk"), order: orderOf("psk", PSK_ORDERS, `a power of 2 from 2 to ${MAX_PSK_ORDER}`), berFormula: berFormula("psk"), ...shared })
          .meta({ description: "M-PSK, Gray-mapped." }),
        formulaRules("psk", PSK_ORDERS),
      ),
      documentRules(
        z
          .strictObject({ modulation: z.literal("qam"), order: orderOf("qam", QAM_ORDERS, `a square constellation size, one of ${QAM_ORDERS.join(", ")}`), berFormula: berFormula("qam"), ...shared })
          .meta({ description: "Square M-QAM, Gray-mapped." }),
        formulaRules("qam", QAM_ORDERS),
      ),
    ])
    .superRefine((v, ctx) => {
      if (WANTED.every((f) => v[f] === undefined)) ctx.addIssue({ code: "custom", path: [], message: `Give at least one of ${WANTED.map((f) => `\`${f}\``).join(", ")}.` });
    })
    .meta({ id: "LinkBerRequest", description: "The modulation, and at least one of `ebN0Db`, `targetBer` and `code`." }),
  { allOf: [atLeastOneOf(...WANTED)] },
);

const output = z
  .object({
    modulation: z.string(),
    order: z.number().int(),
    bitsPerSymbol: z.number().int(),
    points: z
      .array(z.object({ ebN0Db: z.number(), ber: z.number(), ser: z.number() }))
      .optional()
      .meta({ description: "Uncoded bit and symbol error probabilities on AWGN at each Eb/N0." }),
    berExact: z.boolean().meta({ description: "true where the BER formula is exact; false for an approximation (M-PSK's SER/log2 M, M-QAM's nearest-neighbour formula)." }),
    serExact: z.boolean(),
    berMethod: z.string().meta({ description: "The BER formula used, with its source." }),
    serMethod: z.string(),
    required: z
      .object({ targetBer: z.number(), ebN0Db: z.number(), ebN0: z.number() })
      .optional()
      .meta({ description: "Eb/N0 at which the uncoded BER (the formula of `berMethod`) equals the target: closed form for BPSK, QPSK and 4-QAM, else bisection to 1e-10 dB." }),
    coding: z
      .object({
        rate: z.number(),
        correctingRadius: z.number().int(),
        asymptoticGainSoftDb: z.number().meta({ description: "10·log10(R·dmin): high-SNR gain of soft-decision ML decoding over uncoded BPSK." }),
        asymptoticGainHardDb: z.number().meta({ description: "10·log10(R·(t + 1)): high-SNR gain of hard-decision decoding." }),
      })
      .optional(),
    caution: z.string(),
  })
  .meta({ id: "LinkBerResult" });

const berOptionsOf = (v: z.output<typeof input>): BerOptions =>
  (v.modulation === "qam" || v.modulation === "psk") && v.berFormula !== undefined ? { berFormula: v.berFormula } : {};

/** Whether the request gets an exact M-PSK or M-QAM BER: asked for, or left out where one is served. */
const exactBer = (v: z.output<typeof input>): boolean => {
  if (v.modulation === "qam") return v.berFormula !== "nearest-neighbour";
  if (v.modulation === "psk") return v.berFormula === "exact" || (v.berFormula === undefined && v.order <= MAX_EXACT_PSK_ORDER);
  return false;
};

const modulationOf = (v: z.output<typeof input>): Modulation =>
  v.modulation === "bpsk" || v.modulation === "qpsk" ? { scheme: v.modulation } : { scheme: v.modulation, order: v.order! };

export const linkBer = defineEndpoint({
  id: "links.ber",
  method: "POST",
  path: "/links/ber",
  scope: "compute",
  tag: "Links",
  summary: "Uncoded BER on AWGN at an Eb/N0, the Eb/N0 for a target BER, and a code's coding gain",
  description:
    "BPSK and QPSK: Pb = Q(√(2Eb/N0)), exact. M-PSK: exact symbol error by Craig's integral; exact Gray BER up to 16-PSK as a sum over decision sectors " +
    "of Craig-type integrals (Lee 1986), else (or with `berFormula: \"nearest-neighbour\"`) BER ≈ SER/log2 M. " +
    "Square M-QAM: exact symbol error; exact Gray BER by Cho & Yoon (IEEE Trans. Commun. 50(7), 2002), or with `berFormula: \"nearest-neighbour\"` " +
    "the approximation (4/log2 M)(1 − 1/√M)·Q(√(3·log2 M·Eb/N0/(M − 1))). " +
    "The inverse is solved on the same formula: closed form for BPSK, QPSK and 4-QAM, else bisection on Eb/N0 in dB to 1e-10 dB.",
  input,
  output,
  examples: {
    bpsk: { summary: "BPSK at 9.6 dB", value: { modulation: "bpsk", ebN0Db: 9.6 } },
    sweep: { summary: "16-QAM sweep", value: { modulation: "qam", order: 16, ebN0Db: [4, 6, 8, 10, 12] } },
    target: { summary: "Eb/N0 for BER 1e-6 with 8-PSK", value: { modulation: "psk", order: 8, targetBer: 1e-6 } },
    nearest: { summary: "64-QAM at 6 dB by the nearest-neighbour approximation", value: { modulation: "qam", order: 64, berFormula: "nearest-neighbour", ebN0Db: 6 } },
    gain: { summary: "Coding gain of a (23,12) code with dmin 7 and BPSK at BER 1e-5", value: { modulation: "bpsk", targetBer: 1e-5, code: { n: 23, k: 12, dmin: 7 } } },
  },
  work: (req) => {
    // M-PSK's symbol error is Craig's integral at each point and its exact BER M/2 of them; exact M-QAM sums √M − 1 erfc terms; the rest are closed forms.
    const exact = exactBer(req);
    const perPoint =
      req.modulation === "psk" ? 2 ** 16 * (exact ? Math.max(1, req.order / 4) : 1) : req.modulation === "qam" && exact ? 2 ** 12 + 2 ** 6 * Math.sqrt(req.order) : 2 ** 12;
    const points = req.ebN0Db === undefined ? 0 : Array.isArray(req.ebN0Db) ? req.ebN0Db.length : 1;
    return 256 + points * perPoint + (req.targetBer !== undefined ? 64 * perPoint : 0);
  },
  workRule:
    "256 + points × 2^12 (2^16 for M-PSK, whose symbol error is an integral at each point, and 2^16·max(1, M/4) for its exact BER, M/2 integrals; " +
    "2^12 + 2^6·√M for M-QAM's exact BER, a sum of √M − 1 erfc terms) + 64 × that per-point figure for a `targetBer` (root finding).",
  handler: (req) => {
    const mod = modulationOf(req);
    const opts = berOptionsOf(req);
    const order = req.modulation === "bpsk" ? 2 : req.modulation === "qpsk" ? 4 : req.order!;
    const sweep = req.ebN0Db === undefined ? [] : Array.isArray(req.ebN0Db) ? req.ebN0Db : [req.ebN0Db];
    // The core names the bad field of the modulation itself (["order"]): no prefix to add.
    const probe = uncodedErrorRates(mod, 1, opts);
    const points = sweep.map((db) => {
      const r = uncodedErrorRates(mod, dbToLinear(db), opts);
      return { ebN0Db: db, ber: r.ber, ser: r.ser };
    });
    const required =
      req.targetBer !== undefined
        ? (() => {
            const e = at(["targetBer"], () => requiredEbN0(mod, req.targetBer!, opts));
            return { targetBer: req.targetBer, ebN0Db: linearToDb(e), ebN0: e };
          })()
        : undefined;
    const coding = req.code
      ? (() => {
          const r = req.code.k / req.code.n;
          const t = Math.floor((req.code.dmin - 1) / 2);
          return { rate: r, correctingRadius: t, asymptoticGainSoftDb: linearToDb(r * req.code.dmin), asymptoticGainHardDb: linearToDb(r * (t + 1)) };
        })()
      : undefined;
    return {
      modulation: req.modulation,
      order,
      bitsPerSymbol: Math.round(Math.log2(order)),
      ...(sweep.length ? { points } : {}),
      berExact: probe.berExact,
      serExact: probe.serExact,
      berMethod: probe.berMethod,
      serMethod: probe.serMethod,
      ...(required ? { required } : {}),
      ...(coding ? { coding } : {}),
      caution,
    };
  },
});
