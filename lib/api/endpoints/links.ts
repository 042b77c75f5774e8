import { z } from "zod";
import { dbToLinear, linearToDb } from "@/lib/core/capacity";
import { requiredEbN0, uncodedErrorRates, type Modulation } from "@/lib/core/modulation";
import { at, defineEndpoint } from "../endpoint";
import { caution } from "../schemas";

export const MAX_SWEEP_POINTS = 1000;

const input = z
  .strictObject({
    modulation: z.enum(["bpsk", "qpsk", "psk", "qam"]).meta({ description: "bpsk and qpsk, or psk / qam with `order`." }),
    order: z.number().int().min(2).max(4096).optional().meta({ description: "M for psk (a power of two ≥ 2) and qam (square: 4, 16, 64, 256, 1024, 4096)." }),
    ebN0Db: z
      .union([z.number().min(-50).max(100), z.array(z.number().min(-50).max(100)).min(1).max(MAX_SWEEP_POINTS)])
      .optional()
      .meta({ description: `Eb/N0 in dB, or a sweep of up to ${MAX_SWEEP_POINTS} values.` }),
    targetBer: z.number().gt(0).lt(0.5).optional().meta({ description: "Find the Eb/N0 that gives this uncoded BER." }),
    code: z
      .strictObject({
        n: z.number().int().min(1).max(1_000_000),
        k: z.number().int().min(1),
        dmin: z.number().int().min(1),
      })
      .refine((c) => c.k <= c.n, { message: "k must be at most n.", path: ["k"] })
      .refine((c) => c.dmin <= c.n - c.k + 1, { message: "dmin cannot exceed n − k + 1 (Singleton bound).", path: ["dmin"] })
      .optional()
      .meta({ description: "A block code (n, k, dmin): adds its asymptotic coding gain." }),
  })
  .superRefine((v, ctx) => {
    if ((v.modulation === "psk" || v.modulation === "qam") && v.order === undefined) ctx.addIssue({ code: "custom", path: ["order"], message: `\`order\` is required for ${v.modulation}.` });
    if ((v.modulation === "bpsk" || v.modulation === "qpsk") && v.order !== undefined && v.order !== (v.modulation === "bpsk" ? 2 : 4))
      ctx.addIssue({ code: "custom", path: ["order"], message: `${v.modulation} has order ${v.modulation === "bpsk" ? 2 : 4}; leave \`order\` out.` });
    if (v.ebN0Db === undefined && v.targetBer === undefined && v.code === undefined) ctx.addIssue({ code: "custom", path: [], message: "Give `ebN0Db`, `targetBer` or `code`." });
  })
  .meta({ id: "LinkBerRequest" });

const output = z
  .object({
    modulation: z.string(),
    order: z.number().int(),
    bitsPerSymbol: z.number().int(),
    points: z
      .array(z.object({ ebN0Db: z.number(), ber: z.number(), ser: z.number() }))
      .optional()
      .meta({ description: "Uncoded bit and symbol error probabilities on AWGN at each Eb/N0." }),
    berExact: z.boolean().meta({ description: "true where the BER formula is exact; false for the Gray-mapping approximation." }),
    serExact: z.boolean(),
    berMethod: z.string(),
    serMethod: z.string(),
    required: z
      .object({ targetBer: z.number(), ebN0Db: z.number(), ebN0: z.number() })
      .optional()
      .meta({ description: "Eb/N0 at which the uncoded BER equals the target." }),
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
    "BPSK and QPSK: Pb = Q(√(2Eb/N0)), exact. M-PSK: exact symbol error by Craig's integral, BER ≈ SER/log2 M (Gray). Square M-QAM: exact symbol error, BER ≈ (4/log2 M)(1 − 1/√M)·Q(√(3·log2 M·Eb/N0/(M − 1))) (Gray, nearest-neighbour errors). " +
    "The inverse is found by root finding (exact inverse for BPSK/QPSK). Cost: 1 unit per 100 sweep points (at least 1).",
  input,
  output,
  examples: {
    bpsk: { summary: "BPSK at 9.6 dB", value: { modulation: "bpsk", ebN0Db: 9.6 } },
    sweep: { summary: "16-QAM sweep", value: { modulation: "qam", order: 16, ebN0Db: [4, 6, 8, 10, 12] } },
    target: { summary: "Eb/N0 for BER 1e-6 with 8-PSK", value: { modulation: "psk", order: 8, targetBer: 1e-6 } },
    gain: { summary: "Coding gain of a (23,12) code with dmin 7 and BPSK at BER 1e-5", value: { modulation: "bpsk", targetBer: 1e-5, code: { n: 23, k: 12, dmin: 7 } } },
  },
  cost: (req) => Math.max(1, Math.ceil((Array.isArray(req.ebN0Db) ? req.ebN0Db.length : 1) / 100)),
  handler: (req) => {
    const mod = modulationOf(req);
    const order = req.modulation === "bpsk" ? 2 : req.modulation === "qpsk" ? 4 : req.order!;
    const sweep = req.ebN0Db === undefined ? [] : Array.isArray(req.ebN0Db) ? req.ebN0Db : [req.ebN0Db];
    // The core names the bad field of the modulation itself (["order"]): no prefix to add.
    const probe = uncodedErrorRates(mod, 1);
    const points = sweep.map((db) => {
      const r = uncodedErrorRates(mod, dbToLinear(db));
      return { ebN0Db: db, ber: r.ber, ser: r.ser };
    });
    const required =
      req.targetBer !== undefined
        ? (() => {
            const e = at(["targetBer"], () => requiredEbN0(mod, req.targetBer!));
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
