import { z } from "zod";
import { chiSquareTestLength, exactTestLength, passProbability } from "@/lib/core/stats/test-length";
import { defineEndpoint } from "../endpoint";
import { caution } from "../schemas";

export const MAX_PLAN_ERRORS = 100;
export const MIN_TARGET_BER = 1e-13;
export const MAX_CONFIDENCE = 0.999999;

/** A field's rule in our words, given for every way the value can break it (wrong type, out of range, not whole). */
const rule = (field: string, text: string) => ({ error: `\`${field}\` must be ${text}.` });
const TARGET_RULE = rule("targetBer", `a BER from ${MIN_TARGET_BER} to below 0.5`);
const CONFIDENCE_RULE = rule("confidence", `a fraction from 0.5 to ${MAX_CONFIDENCE}, e.g. 0.95 for 95 %`);
const ERRORS_RULE = rule("maxErrors", `a whole number of errors from 0 to ${MAX_PLAN_ERRORS}`);
const RATE_RULE = rule("lineRateBps", "a line rate in bit/s from 1 to 1e13");
const FRACTION_RULE = rule("trueBerFraction", "a multiple of the target above 0 and at most 10");

const input = z
  .strictObject({
    targetBer: z
      .number(TARGET_RULE)
      .min(MIN_TARGET_BER, TARGET_RULE)
      .lt(0.5, TARGET_RULE)
      .meta({ description: `The BER the test is to demonstrate, from ${MIN_TARGET_BER} to below 0.5 (common targets: voice about 1e-3, data 1e-5 to 1e-6, optical fibre 1e-9 or lower).` }),
    confidence: z
      .number(CONFIDENCE_RULE)
      .min(0.5, CONFIDENCE_RULE)
      .max(MAX_CONFIDENCE, CONFIDENCE_RULE)
      .meta({ description: `Confidence level as a fraction, from 0.5 to ${MAX_CONFIDENCE} (0.95 for 95 %).` }),
    maxErrors: z
      .number(ERRORS_RULE)
      .int(ERRORS_RULE)
      .min(0, ERRORS_RULE)
      .max(MAX_PLAN_ERRORS, ERRORS_RULE)
      .default(0)
      .meta({ description: `Plans are given for a test allowing 0, 1, …, maxErrors errors (at most ${MAX_PLAN_ERRORS}); 0 when left out.` }),
    onlyMaxErrors: z
      .boolean(rule("onlyMaxErrors", "true or false"))
      .default(false)
      .meta({ description: "true: give only the plan allowing exactly `maxErrors` errors." }),
    lineRateBps: z
      .number(RATE_RULE)
      .min(1, RATE_RULE)
      .max(1e13, RATE_RULE)
      .optional()
      .meta({ description: "Line rate in bit/s, from 1 to 1e13: adds each plan's test time in seconds and in words." }),
    trueBerFraction: z
      .number(FRACTION_RULE)
      .gt(0, FRACTION_RULE)
      .max(10, FRACTION_RULE)
      .optional()
      .meta({
        description:
          "Adds each plan's pass probability if the true BER is this multiple of the target (above 0, at most 10, and the true BER at most 0.5): below 1 it is the test's power on a link that is better than the target; at 1 and above, the chance that a link not meeting the target passes (at most 1 − confidence at 1).",
      }),
  })
  .refine((v) => v.trueBerFraction === undefined || v.trueBerFraction * v.targetBer <= 0.5, {
    message: "trueBerFraction × targetBer is the true BER the pass probability is computed at; it must be at most 0.5.",
    path: ["trueBerFraction"],
  })
  .meta({ id: "TestPlanRequest" });

const timing = {
  seconds: z.number().optional().meta({ description: "bits / lineRateBps; only with `lineRateBps`." }),
  duration: z.string().optional().meta({ description: "The same time in words (years of 365.25 days); only with `lineRateBps`." }),
};

const output = z
  .object({
    targetBer: z.number(),
    confidence: z.number(),
    lineRateBps: z.number().optional(),
    trueBer: z.number().optional().meta({ description: "trueBerFraction × targetBer: the BER at which `passProbability` is computed." }),
    plans: z.array(
      z.object({
        allowedErrors: z.number().int().meta({ description: "The test passes with at most this many errors." }),
        exact: z
          .object({
            bits: z.number().int().meta({ description: "Smallest whole number of bits n with P(at most allowedErrors errors | n, targetBer) ≤ 1 − confidence." }),
            berTimesBits: z.number().meta({ description: "bits × targetBer." }),
            ...timing,
          })
          .meta({ description: "Exact binomial test length." }),
        chiSquare: z
          .object({
            bits: z.number().int().meta({ description: "χ²(2(k + 1), confidence) / (2·targetBer), rounded up to whole bits." }),
            berTimesBits: z.number().meta({ description: "χ²(2(k + 1), confidence) / 2 before rounding: the figure BER-test tables list (2.996 for 0 errors at 95 %)." }),
            ...timing,
          })
          .meta({ description: "The chi-square (Poisson) form of the test length." }),
        passProbability: z.number().optional().meta({ description: "P(at most allowedErrors errors in the exact plan's bits) at `trueBer`; only with `trueBerFraction`." }),
      }),
    ),
    methods: z.object({
      exact: z.string(),
      chiSquare: z.string(),
      passProbability: z.string().optional(),
    }),
    assumption: z.string().meta({ description: "When the plan holds." }),
    caution: z.string(),
  })
  .meta({ id: "TestPlanResult" });

const METHODS = {
  exact:
    "Smallest n with P(X ≤ k | n, targetBer) ≤ 1 − confidence for X ~ Binomial(n, targetBer): a pass then puts the one-sided Clopper–Pearson bound at or below the target (Clopper & Pearson, Biometrika 1934); found by bisection on whole bits over the binomial log-CDF (Loader 2000 terms).",
  chiSquare: "N = χ²(2(k + 1), confidence) / (2·targetBer), the usual BER-test planning rule (common practice): the Poisson limit of the exact binomial length.",
  passProbability: "P(X ≤ k | n, trueBer), X ~ Binomial(n, trueBer), n the exact plan's bits (binomial CDF, Loader 2000 terms).",
};

const ASSUMPTION =
  "Bit errors are independent with one probability: an uncoded link on a memoryless channel. After decoding, errors come in bursts inside failed frames; plan a coded link's test in frames (a frame error rate target) rather than bits.";

const UNITS: [number, string][] = [
  [86_400, "d"],
  [3_600, "h"],
  [60, "min"],
  [1, "s"],
];

/** A time in words: 3 significant digits below a minute, two units from minutes to days, Julian years (365.25 days) from a year up. */
export function describeDuration(seconds: number): string {
  // Each threshold is where 3 significant digits would round up to the next unit.
  if (seconds < 0.9995e-6) return `${(seconds * 1e9).toPrecision(3)} ns`;
  if (seconds < 0.9995e-3) return `${(seconds * 1e6).toPrecision(3)} µs`;
  if (seconds < 0.9995) return `${(seconds * 1e3).toPrecision(3)} ms`;
  if (seconds < 59.95) return `${seconds.toPrecision(3)} s`;
  const year = 365.25 * 86_400;
  if (seconds >= year) return `${(seconds / year).toPrecision(3)} years`;
  // The largest unit the time reaches once rounded in the unit below it, so 59 min 59.6 s reads "1 h 0 min".
  const i = UNITS.findIndex(([size], j) => Math.round(seconds / UNITS[j + 1]![0]) >= size / UNITS[j + 1]![0]);
  const [big, bigName] = UNITS[i]!;
  const [small, smallName] = UNITS[i + 1]!;
  const total = Math.round(seconds / small);
  const per = big / small;
  return `${Math.floor(total / per)} ${bigName} ${total % per} ${smallName}`;
}

const timed = (bits: number, rate: number | undefined) => (rate === undefined ? {} : { seconds: bits / rate, duration: describeDuration(bits / rate) });

export const testPlan = defineEndpoint({
  id: "tests.plan",
  method: "POST",
  path: "/tests/plan",
  scope: "compute",
  tag: "Tests",
  summary: "Bits and time needed to demonstrate a BER at a confidence, allowing 0 to k errors, and the test's pass probability",
  description:
    "For each allowed error count k, the number of bits a test must run so that passing it (at most k errors) shows BER ≤ target at the confidence: " +
    "the exact binomial length beside the chi-square form χ²(2(k + 1), CL)/(2·BER). With a line rate, the test time; with `trueBerFraction`, " +
    "the probability that the planned test passes on a link whose BER is that multiple of the target. Bit errors are taken as independent (see `assumption`).",
  input,
  output,
  examples: {
    fibre: { summary: "Optical link at 10 Gbit/s: BER 1e-12 at 95 %, up to 2 errors", value: { targetBer: 1e-12, confidence: 0.95, maxErrors: 2, lineRateBps: 10e9 } },
    power: {
      summary: "BER 1e-9 at 95 % with up to 3 errors, and the chance of passing if the true BER is half the target",
      value: { targetBer: 1e-9, confidence: 0.95, maxErrors: 3, trueBerFraction: 0.5, lineRateBps: 1e9 },
    },
    single: { summary: "Only the plan allowing 10 errors: BER 1e-5 at 99 %", value: { targetBer: 1e-5, confidence: 0.99, maxErrors: 10, onlyMaxErrors: true } },
  },
  work: (req) => {
    // Each plan: a chi-square quantile, then about 50 bisection steps on the log-CDF, each summing up to k + 2 binomial terms.
    const ks = req.onlyMaxErrors ? [req.maxErrors] : Array.from({ length: req.maxErrors + 1 }, (_, k) => k);
    return 1024 + ks.reduce((sum, k) => sum + 2 ** 12 + 2 ** 14 * (k + 2), 0);
  },
  workRule: "1024 + for each plan (allowed error count k) 2^12 + 2^14·(k + 2): a chi-square quantile and a bisection on the binomial CDF.",
  handler: (req) => {
    const ks = req.onlyMaxErrors ? [req.maxErrors] : Array.from({ length: req.maxErrors + 1 }, (_, k) => k);
    const trueBer = req.trueBerFraction === undefined ? undefined : req.trueBerFraction * req.targetBer;
    const plans = ks.map((k) => {
      const bits = exactTestLength(req.targetBer, req.confidence, k);
      const chi = chiSquareTestLength(req.targetBer, req.confidence, k);
      const chiBits = Math.ceil(chi.bits);
      return {
        allowedErrors: k,
        exact: { bits, berTimesBits: bits * req.targetBer, ...timed(bits, req.lineRateBps) },
        chiSquare: { bits: chiBits, berTimesBits: chi.chiSquare / 2, ...timed(chiBits, req.lineRateBps) },
        ...(trueBer === undefined ? {} : { passProbability: passProbability(bits, k, trueBer) }),
      };
    });
    return {
      targetBer: req.targetBer,
      confidence: req.confidence,
      ...(req.lineRateBps === undefined ? {} : { lineRateBps: req.lineRateBps }),
      ...(trueBer === undefined ? {} : { trueBer }),
      plans,
      methods: { exact: METHODS.exact, chiSquare: METHODS.chiSquare, ...(trueBer === undefined ? {} : { passProbability: METHODS.passProbability }) },
      assumption: ASSUMPTION,
      caution,
    };
  },
});
