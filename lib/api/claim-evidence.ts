import { z } from "zod";
import { dbToLinear } from "@/lib/core/capacity";
import { bscBlockError, bscPostDecodingBer } from "@/lib/core/channels";
import { InputError } from "@/lib/core/errors";
import { QAM_ORDERS, qfunc, uncodedErrorRates, type Modulation } from "@/lib/core/modulation";
import { clopperPearsonLower, clopperPearsonUpper } from "@/lib/core/stats/binomial-interval";
import { MAX_ALLOWED_ERRORS, moreErrorFreeBits } from "@/lib/core/stats/test-length";
import { MAX_UNCODED_FRAME_BITS } from "@/lib/core/sim/engine";
import { confidenceSequence, SEQUENTIAL_METHOD, sequentialPlan } from "@/lib/core/stats/sequential";
import { codeWork } from "./code-work";
import { MAX_BITS_PER_POINT, MAX_SECONDS_PER_POINT, simChannel } from "./simulation-spec";
import { codeSpec, type CodeSpec } from "./code-spec";
import { resolveCode } from "./codes";
import { at } from "./endpoint";
import { probability } from "./schemas";
import { refuse, workLimits } from "./work";

/**
 * The evidence a claim can bring and how each kind decides it. Pure: no database, no clock. A verdict
 * compares a rate with the claim's target ("the rate is at most the target"): `supported` when the evidence
 * shows it, `refuted` when it shows the opposite, `inconclusive` when it shows neither.
 */

/** Named targets for common applications (common practice; DESIGN.md): bit error rates a link of that kind is usually held to. */
export const TARGET_PRESETS = {
  voice: { metric: "ber", atMost: 1e-3, means: "digital voice: about 1e-3" },
  data: { metric: "ber", atMost: 1e-5, means: "data links, the relaxed end: 1e-5" },
  "data-strict": { metric: "ber", atMost: 1e-6, means: "data links, the strict end: 1e-6" },
  fibre: { metric: "ber", atMost: 1e-9, means: "optical fibre: 1e-9 (many systems ask for less)" },
} as const;
export type TargetPreset = keyof typeof TARGET_PRESETS;
const PRESET_NAMES = Object.keys(TARGET_PRESETS) as [TargetPreset, ...TargetPreset[]];

export const METRIC_WORDS = { ber: "bit error rate", fer: "frame error rate" } as const;
export type Metric = keyof typeof METRIC_WORDS;

export const targetInput = z
  .union([
    z.strictObject({
      metric: z.enum(["ber", "fer"]).meta({ description: "`ber`: information bits in error per information bit; `fer`: frames the decoder did not return correctly (wrong, or declared a failure) per frame." }),
      atMost: z.number().gt(0).lt(1).meta({ description: "The rate claimed not to be exceeded, above 0 and below 1." }),
    }),
    z.strictObject({
      preset: z.enum(PRESET_NAMES).meta({ description: `A named target (common practice): ${PRESET_NAMES.map((p) => `\`${p}\` = BER ${TARGET_PRESETS[p].atMost}`).join(", ")}.` }),
    }),
  ])
  .meta({ id: "ClaimTarget", description: "The rate claimed: a metric and its bound, or a named preset." });

export interface Target {
  metric: Metric;
  atMost: number;
  preset?: TargetPreset;
}

export function resolveTarget(t: z.output<typeof targetInput>): Target {
  if ("preset" in t) return { metric: TARGET_PRESETS[t.preset].metric, atMost: TARGET_PRESETS[t.preset].atMost, preset: t.preset };
  return { metric: t.metric, atMost: t.atMost };
}

const modulations = ["bpsk", "qpsk", "psk", "qam"] as const;
export const claimChannel = z
  .discriminatedUnion("type", [
    z.strictObject({ type: z.literal("bsc"), p: probability.meta({ description: "Crossover probability of the binary symmetric channel." }) }),
    z.strictObject({
      type: z.literal("awgn"),
      modulation: z.enum(modulations).meta({ description: "`bpsk`, `qpsk` (Gray), or `psk` / `qam` with an `order`; a coded claim takes BPSK or QPSK with hard decisions." }),
      order: z.number().int().min(2).max(4096).optional().meta({ description: "Constellation size for `psk` (a power of 2, 2 to 1024) and `qam` (4 to 4096, square)." }),
      ebN0Db: z.number().min(-20).max(80).meta({ description: "Eb/N0 per information bit, in dB, −20 to 80." }),
    }),
  ])
  .meta({ id: "ClaimChannel" });
type Channel = z.output<typeof claimChannel>;

export const MAX_FRAME_BITS = 1 << 30;
export const analyticEvidence = z
  .strictObject({
    mode: z.literal("analytic"),
    code: codeSpec.optional().meta({ description: "The code, decoded up to its correction radius t = ⌊(dmin − 1)/2⌋ (what every decoder here does); left out for an uncoded link." }),
    channel: claimChannel,
    frameBits: z
      .number()
      .int()
      .min(1)
      .max(MAX_FRAME_BITS)
      .optional()
      .meta({ description: `Uncoded FER only: the bits in a frame (1 to ${MAX_FRAME_BITS}); a coded frame is a codeword.` }),
  })
  .meta({ description: "Decide from a formula: the channel's exact error rate, uncoded or after a code." });

export const measuredEvidence = z
  .strictObject({
    mode: z.literal("measured"),
    trials: z
      .number()
      .int()
      .min(1)
      .max(Number.MAX_SAFE_INTEGER)
      .meta({ description: "Bits tested (a `ber` target) or frames (a `fer` target), at least 1 and at most 2^53 − 1." }),
    errors: z.number().int().min(0).max(Number.MAX_SAFE_INTEGER).meta({ description: "Errors observed among them: bit errors or frame errors." }),
  })
  .refine((e) => e.errors <= e.trials, { path: ["errors"], message: "There cannot be more errors than trials (bits or frames tested)." })
  .meta({ description: "Decide from the caller's own counts, by one-sided Clopper–Pearson bounds at the claim's confidence." });

export const simulatedEvidence = z
  .strictObject({
    mode: z.literal("simulated"),
    code: codeSpec.optional().meta({ description: "The code; left out for an uncoded link." }),
    frameBits: z.number().int().min(1).max(MAX_UNCODED_FRAME_BITS).optional().meta({ description: "Uncoded only: bits per frame (default 1)." }),
    channel: simChannel,
    at: z.number().min(-20).max(80).meta({ description: "The operating point: p on the BSC, ε on the BEC, Eb/N0 in dB on AWGN." }),
    budget: z
      .strictObject({
        maxBits: z.number().int().min(1).max(MAX_BITS_PER_POINT).default(2 ** 36).meta({ description: "Most information bits to simulate before calling the claim inconclusive (default 2^36 ≈ 6.9·10^10, at most 2^40)." }),
        maxSeconds: z.number().gt(0).max(MAX_SECONDS_PER_POINT).default(300).meta({ description: `Most computing time, in seconds (default 300, at most ${MAX_SECONDS_PER_POINT}).` }),
      })
      .default({ maxBits: 2 ** 36, maxSeconds: 300 }),
    seed: z.number().int().min(0).max(0xffffffff).optional().meta({ description: "32-bit seed; drawn and returned when left out." }),
  })
  .meta({ description: "Decide by simulation: a job that stops as soon as the claim is decided at its confidence (a rule valid under this stopping), or when its budget ends (inconclusive)." });

export type AnalyticEvidence = z.output<typeof analyticEvidence>;
export type SimulatedEvidence = z.output<typeof simulatedEvidence>;
export type MeasuredEvidence = z.output<typeof measuredEvidence>;

export type Verdict = "supported" | "refuted" | "inconclusive";

export interface Decision {
  verdict: Verdict;
  /** The rate the evidence gives (analytic), or the observed rate errors/trials (measured). */
  rate: number;
  /** Bounds on the rate: both equal the rate for an exact formula. */
  interval: { lower: number; upper: number; method: string };
  /** Whether `rate` is exact under the stated model (an estimate formula is not). */
  exact: boolean;
  reasoning: string;
  /** How the evidence was read: the code's n, k, t, the channel's bit error probability, … */
  details: Record<string, number | string | boolean>;
  /** Inconclusive measured claims: error-free bits (or frames) more that would decide it, when computable. */
  moreTrialsToDecide?: number;
}

const fmt = (x: number) => (x === 0 ? "0" : x >= 1e-3 && x < 1e6 ? String(Number(x.toPrecision(4))) : x.toExponential(3).replace(/\.?0+e/, "e"));
const pct = (c: number) => `${Number((c * 100).toPrecision(6))} %`;

/** Measured counts against the target: supported when the one-sided upper bound at CL is within it, refuted when the lower bound is beyond it (Clopper & Pearson 1934). */
export function decideMeasured(target: Target, confidence: number, e: MeasuredEvidence): Decision {
  const unit = target.metric === "ber" ? "bits" : "frames";
  const upper = clopperPearsonUpper(e.errors, e.trials, confidence);
  const lower = clopperPearsonLower(e.errors, e.trials, confidence);
  const interval = { lower, upper, method: `Clopper–Pearson one-sided bounds, each at ${pct(confidence)} (Clopper & Pearson, Biometrika 1934)` };
  const seen = `${e.errors} ${e.errors === 1 ? "error" : "errors"} in ${e.trials.toLocaleString("en")} ${unit}`;
  const base = { rate: e.errors / e.trials, interval, exact: false, details: { unit } };
  if (upper <= target.atMost) {
    return { ...base, verdict: "supported", reasoning: `${seen} put the ${METRIC_WORDS[target.metric]} at most ${fmt(upper)} with ${pct(confidence)} confidence, within the target ${fmt(target.atMost)}.` };
  }
  if (lower > target.atMost) {
    return { ...base, verdict: "refuted", reasoning: `${seen} put the ${METRIC_WORDS[target.metric]} at least ${fmt(lower)} with ${pct(confidence)} confidence, above the target ${fmt(target.atMost)}.` };
  }
  const more = e.errors <= MAX_ALLOWED_ERRORS ? moreErrorFreeBits(e.errors, e.trials, target.atMost, confidence) : undefined;
  return {
    ...base,
    verdict: "inconclusive",
    ...(more !== undefined ? { moreTrialsToDecide: more } : {}),
    reasoning:
      `${seen} allow a ${METRIC_WORDS[target.metric]} from ${fmt(lower)} to ${fmt(upper)} at ${pct(confidence)} confidence, which includes the target ${fmt(target.atMost)}` +
      (more !== undefined ? `; ${more.toLocaleString("en")} more ${unit} without an error would support it.` : "."),
  };
}

function modulationOf(c: Extract<Channel, { type: "awgn" }>): Modulation {
  if (c.modulation === "bpsk" || c.modulation === "qpsk") {
    if (c.order !== undefined && c.order !== (c.modulation === "bpsk" ? 2 : 4)) throw new InputError(`${c.modulation} has a fixed order; leave \`order\` out.`, ["channel", "order"]);
    return { scheme: c.modulation };
  }
  if (c.order === undefined) throw new InputError(`${c.modulation} needs an \`order\`.`, ["channel", "order"]);
  if (c.modulation === "qam" && !QAM_ORDERS.includes(c.order)) throw new InputError(`qam takes a square constellation size: one of ${QAM_ORDERS.join(", ")}.`, ["channel", "order"]);
  if (c.modulation === "psk" && (c.order & (c.order - 1)) !== 0) throw new InputError("psk takes a power of 2 as its order.", ["channel", "order"]);
  return { scheme: c.modulation, order: c.order };
}

/** The rate a formula gives, and whether the formula is exact under its model. */
function analyticRate(target: Target, e: AnalyticEvidence): { rate: number; exact: boolean; how: string; details: Decision["details"] } {
  const ch = e.channel;
  if (!e.code) {
    let ber: number;
    let exact: boolean;
    let how: string;
    if (ch.type === "bsc") [ber, exact, how] = [ch.p, true, `an uncoded BSC errs on each bit with probability p = ${fmt(ch.p)}`];
    else {
      const r = at(["evidence"], () => uncodedErrorRates(modulationOf(ch), dbToLinear(ch.ebN0Db)));
      [ber, exact, how] = [r.ber, r.berExact, `uncoded ${ch.modulation}${ch.order ? ` (order ${ch.order})` : ""} at Eb/N0 = ${ch.ebN0Db} dB gives BER ${fmt(r.ber)} by ${r.berMethod}`];
    }
    if (target.metric === "ber") return { rate: ber, exact, how, details: { channelBer: ber } };
    if (e.frameBits === undefined) throw new InputError("An uncoded frame error rate needs the frame's length: give `frameBits`.", ["evidence", "frameBits"]);
    if (ch.type === "awgn" && ch.modulation !== "bpsk" && ch.modulation !== "qpsk") {
      throw new InputError("Bit errors inside a PSK or QAM symbol are not independent, so no exact uncoded FER follows from the BER; give measured or simulated evidence.", ["evidence", "channel", "modulation"]);
    }
    // Independent bit errors: FER = 1 − (1 − BER)^n.
    const fer = -Math.expm1(e.frameBits * Math.log1p(-ber));
    return { rate: fer, exact, how: `${how}, so a frame of ${e.frameBits} bits is hit with probability 1 − (1 − BER)^${e.frameBits}`, details: { channelBer: ber, frameBits: e.frameBits } };
  }
  if (e.frameBits !== undefined) throw new InputError("A coded frame is one codeword: leave `frameBits` out.", ["evidence", "frameBits"]);
  const spec: CodeSpec = e.code;
  if (spec.family === "crc") throw new InputError("A CRC detects errors but corrects none: its claim is on undetected errors, which POST /codes/analyze gives. Claim on a correcting code, or bring measured evidence.", ["evidence", "code", "family"]);
  const cw = at(["evidence"], () => codeWork(spec));
  const work = cw.build + cw.decoderBuild;
  if (work > workLimits.inline) {
    throw refuse("Reading this code's minimum distance", work, workLimits.inline, "work units", "An analytic claim builds its code at once: choose a smaller code, or bring measured or simulated evidence.", "/evidence/code");
  }
  const code = resolveCode(spec, ["evidence", "code"]);
  if (code.dmin === undefined) {
    throw new InputError("This code's minimum distance is not known (too large to enumerate), so its error rate has no formula here; bring measured or simulated evidence.", ["evidence", "code"]);
  }
  const t = Math.floor((code.dmin - 1) / 2);
  const rate = code.k / code.n;
  let p: number;
  if (ch.type === "bsc") p = ch.p;
  else {
    if (ch.modulation !== "bpsk" && ch.modulation !== "qpsk") throw new InputError("A coded analytic claim on AWGN takes BPSK or QPSK with hard decisions.", ["evidence", "channel", "modulation"]);
    // Hard decisions on Gray BPSK/QPSK: each code bit is a BSC use with p = Q(√(2·R·Eb/N0)) (Proakis & Salehi 2008).
    p = qfunc(Math.sqrt(2 * rate * dbToLinear(ch.ebN0Db)));
  }
  const details: Decision["details"] = { n: code.n, k: code.k, dmin: code.dmin, t, codeRate: rate, channelBitErrorProbability: p, ...(code.dminIsDesigned ? { dminIsDesigned: true } : {}) };
  const via = ch.type === "bsc" ? "" : `hard decisions at Eb/N0 = ${ch.ebN0Db} dB give code-bit error probability p = Q(√(2·R·Eb/N0)) = ${fmt(p)}; `;
  if (code.q > 2) {
    if (target.metric === "ber") throw new InputError("A Reed–Solomon claim is decided on its frame error rate here: set the target's metric to `fer`, or bring measured or simulated evidence.", ["target", "metric"]);
    const m = Math.log2(code.q);
    const ps = -Math.expm1(m * Math.log1p(-p));
    const fer = bscBlockError(code.n, t, ps).value;
    return { rate: fer, exact: true, how: `${via}a ${m}-bit symbol is wrong with probability ${fmt(ps)}, and ${code.name} fails when more than t = ${t} of its ${code.n} symbols are wrong`, details: { ...details, symbolErrorProbability: ps } };
  }
  if (target.metric === "fer") {
    return { rate: bscBlockError(code.n, t, p).value, exact: true, how: `${via}${code.name} returns the frame correctly exactly when at most t = ${t} of its ${code.n} bits flip`, details };
  }
  return {
    rate: bscPostDecodingBer(code.n, t, p).value,
    exact: false,
    how: `${via}the post-decoding estimate (1/n)·Σ_{j>t} j·C(n, j)·p^j·(1 − p)^(n−j) for ${code.name} with t = ${t} (Sklar 2001; an estimate, not an exact rate)`,
    details,
  };
}

/** A formula's rate against the target. An exact rate decides either way; an estimate too, but the verdict says it rests on one. */
export function decideAnalytic(target: Target, e: AnalyticEvidence): Decision {
  const { rate, exact, how, details } = analyticRate(target, e);
  const holds = rate <= target.atMost;
  const verdict: Verdict = holds ? "supported" : "refuted";
  const basis = exact ? "exactly" : "by an estimate";
  return {
    verdict,
    rate,
    exact,
    interval: { lower: rate, upper: rate, method: exact ? "exact under the stated channel model" : "a point estimate; no interval" },
    details,
    reasoning: `${how[0]!.toUpperCase()}${how.slice(1)}: the ${METRIC_WORDS[target.metric]} is ${basis} ${fmt(rate)}, ${holds ? "within" : "above"} the target ${fmt(target.atMost)}.`,
  };
}

/** The simulation a simulated claim runs: one point, its budget, and the sequential rule that stops it once decided. */
export function claimSimulation(target: Target, confidence: number, e: SimulatedEvidence, seed: number) {
  if (e.code && target.metric === "ber") {
    throw new InputError(
      "A simulated claim on a coded link is decided on its frame error rate: bit errors come in bursts inside failed frames, so counting bits as independent trials would overstate the confidence. " +
        "Set the target's metric to `fer` (BER ≤ FER, so a supported FER claim at the same bound also supports the BER).",
      ["target", "metric"],
    );
  }
  if (target.atMost > 0.5) throw new InputError("A simulated claim's target is at most 0.5.", ["target"]);
  if (e.channel.type !== "awgn" && (e.at < 0 || e.at > 1)) throw new InputError(`On the ${e.channel.type.toUpperCase()} the operating point is a probability from 0 to 1.`, ["evidence", "at"]);
  if (e.frameBits !== undefined && e.code) throw new InputError("A coded frame is one codeword: leave `frameBits` out.", ["evidence", "frameBits"]);
  return {
    ...(e.code ? { code: e.code } : {}),
    ...(e.frameBits !== undefined ? { frameBits: e.frameBits } : {}),
    channel: e.channel,
    points: [e.at],
    stop: { maxBits: e.budget.maxBits, maxSeconds: e.budget.maxSeconds },
    confidence,
    seed,
    gapSkipping: true,
    decide: { metric: target.metric, target: target.atMost, confidence },
  };
}

/**
 * A finished simulation's verdict: what the sequential rule decided, or inconclusive when the budget ended first
 * (or the job was cancelled or failed); the interval is the confidence sequence at the end (Howard et al. 2021).
 */
export function decideSimulated(
  target: Target,
  confidence: number,
  job: { id: string; status: string; reason: string | null; seed: number; errors: number; trials: number; stoppedBy: string | null },
): Decision {
  const unit = target.metric === "ber" ? "bits" : "frames";
  const cs = job.trials > 0 ? confidenceSequence(sequentialPlan(target.atMost, confidence), job.errors, job.trials) : { lower: 0, upper: 1 };
  const seen = `${job.errors.toLocaleString("en")} ${job.errors === 1 ? "error" : "errors"} in ${job.trials.toLocaleString("en")} simulated ${unit}`;
  const base = {
    rate: job.trials > 0 ? job.errors / job.trials : 0,
    exact: false,
    interval: { lower: cs.lower, upper: cs.upper, method: SEQUENTIAL_METHOD },
    details: { unit, simulation: job.id, seed: job.seed, stoppedBy: job.stoppedBy ?? job.status },
  };
  const words = METRIC_WORDS[target.metric];
  if (job.stoppedBy === "decided:supported") {
    return { ...base, verdict: "supported", reasoning: `${seen} put the ${words} at most ${fmt(cs.upper)} at ${pct(confidence)} confidence (valid however early the run stopped), within the target ${fmt(target.atMost)}.` };
  }
  if (job.stoppedBy === "decided:refuted") {
    return { ...base, verdict: "refuted", reasoning: `${seen} put the ${words} at least ${fmt(cs.lower)} at ${pct(confidence)} confidence (valid however early the run stopped), above the target ${fmt(target.atMost)}.` };
  }
  const why =
    job.status === "cancelled" ? "the simulation was cancelled" : job.status === "failed" ? `the simulation failed (${job.reason ?? "no reason given"})` : "the budget ended";
  return { ...base, verdict: "inconclusive", reasoning: `${seen} leave the ${words} between ${fmt(cs.lower)} and ${fmt(cs.upper)}, which includes the target ${fmt(target.atMost)}; ${why} before the claim was decided.` };
}
