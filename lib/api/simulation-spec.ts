import { z } from "zod";
import { createSimulator, MAX_UNCODED_FRAME_BITS, type SimChannel, type Simulator } from "@/lib/core/sim/engine";
import { checkStopRules, type StopRules } from "@/lib/core/sim/run";
import { codeWork } from "./code-work";
import { codeSpec } from "./code-spec";
import { resolveCode } from "./codes";
import { at } from "./endpoint";
import { refuse, workLimits } from "./work";

/**
 * A Monte Carlo simulation as the API takes it: a code (or none), a channel, a sweep of operating points,
 * stopping rules per point and a seed. The same request and seed give the same counts on any machine and
 * with any number of workers (lib/core/sim). Shared by POST /simulations, simulated claims and the runner.
 */

/** Points in one sweep. */
export const MAX_POINTS = 16;
/** Information bits one point may simulate (2^40 ≈ 1.1·10^12). */
export const MAX_BITS_PER_POINT = 2 ** 40;
/** Wall-time budget of one point, seconds. */
export const MAX_SECONDS_PER_POINT = 3600;
/** Simulations and simulated claims of one organisation queued or running at once. */
/** Simulated information bits per compute unit. */
export const BITS_PER_UNIT = 2 ** 26;

export const simChannel = z
  .discriminatedUnion("type", [
    z.strictObject({ type: z.literal("bsc") }).meta({ description: "Binary symmetric channel: the points are crossover probabilities p." }),
    z.strictObject({ type: z.literal("bec") }).meta({ description: "Binary erasure channel: the points are erasure probabilities ε." }),
    z
      .strictObject({
        type: z.literal("awgn"),
        modulation: z.enum(["bpsk", "qpsk"]).meta({ description: "BPSK, or Gray-mapped QPSK (two BPSK channels: the same bit error rate per Eb/N0)." }),
        decisions: z
          .enum(["hard", "soft"])
          .default("hard")
          .meta({ description: "`hard`: each bit decided on its own, then the code's decoder; `soft`: maximum-likelihood decoding by correlation with every codeword (binary codes with k ≤ 12)." }),
      })
      .meta({ description: "AWGN: the points are Eb/N0 per information bit in dB (the code rate is accounted for)." }),
  ])
  .meta({ id: "SimulationChannel" });

export const stopRules = z
  .strictObject({
    minBitErrors: z.number().int().min(1).max(1e9).optional().meta({ description: "Stop a point once it has seen this many bit errors." }),
    minFrameErrors: z.number().int().min(1).max(1e9).optional().meta({ description: "Stop a point once it has seen this many frame errors." }),
    maxBits: z.number().int().min(1).max(MAX_BITS_PER_POINT).optional().meta({ description: `Stop a point after this many information bits (at most 2^40).` }),
    maxFrames: z.number().int().min(1).max(MAX_BITS_PER_POINT).optional().meta({ description: "Stop a point after this many frames." }),
    maxSeconds: z.number().gt(0).max(MAX_SECONDS_PER_POINT).optional().meta({ description: `Stop a point after this much computing time, in seconds (at most ${MAX_SECONDS_PER_POINT}).` }),
  })
  .meta({ id: "StopRules", description: "Whichever comes first ends a point; the result says which. One of `maxBits` and `maxFrames` is needed (default maxBits 10^9), so that a point without errors ends." });

export const simulationRequest = z
  .strictObject({
    code: codeSpec.optional().meta({ description: "The code; left out for uncoded transmission." }),
    frameBits: z.number().int().min(1).max(MAX_UNCODED_FRAME_BITS).optional().meta({ description: `Uncoded only: bits per frame, 1 to ${MAX_UNCODED_FRAME_BITS} (default 1, so frames are bits).` }),
    channel: simChannel,
    points: z
      .array(z.number().min(-20).max(80))
      .min(1)
      .max(MAX_POINTS)
      .meta({ description: `The sweep, 1 to ${MAX_POINTS} points: probabilities in [0, 1] on the BSC and BEC, Eb/N0 in dB (−20 to 80) on AWGN.` }),
    stop: stopRules.default({ minBitErrors: 100, maxBits: 1e9 }),
    confidence: z.number().min(0.5).max(0.999999).default(0.95).meta({ description: "Confidence of the intervals in the result (default 0.95)." }),
    seed: z.number().int().min(0).max(0xffffffff).optional().meta({ description: "32-bit seed; drawn and returned when left out. The same request and seed give the same counts." }),
    gapSkipping: z.boolean().default(true).meta({ description: "BSC and BEC: draw the gap to the next flip and skip error-free frames (exact; much faster at small p)." }),
  })
  .superRefine((v, ctx) => {
    if (v.frameBits !== undefined && v.code) ctx.addIssue({ code: "custom", path: ["frameBits"], message: "A coded frame is one codeword: leave `frameBits` out." });
    if (v.channel.type !== "awgn") {
      v.points.forEach((x, i) => {
        if (x < 0 || x > 1) ctx.addIssue({ code: "custom", path: ["points", i], message: `On the ${v.channel.type.toUpperCase()} a point is a probability from 0 to 1; got ${x}.` });
      });
    }
    if (v.stop.maxBits === undefined && v.stop.maxFrames === undefined) ctx.addIssue({ code: "custom", path: ["stop", "maxBits"], message: "Give `maxBits` or `maxFrames`, so that a point without errors still ends." });
  })
  .meta({ id: "SimulationRequest" });

export type SimulationRequest = z.output<typeof simulationRequest>;

/**
 * The most information bits a request can simulate, summed over its points: each point runs whole frames of k bits,
 * at most ⌈maxBits / k⌉ of them and at most maxFrames. Plans bound this per job, and a job reserves its units from it.
 */
export function jobBitBound(r: SimulationRequest): number {
  const k = r.code ? codeWork(r.code).k : (r.frameBits ?? 1);
  const frames = Math.min(r.stop.maxBits === undefined ? Infinity : Math.ceil(r.stop.maxBits / k), r.stop.maxFrames ?? Infinity);
  return r.points.length * frames * k;
}

/** The engine's rules for a request (seconds → milliseconds). */
export const engineRules = (r: SimulationRequest): StopRules => ({
  minBitErrors: r.stop.minBitErrors,
  minFrameErrors: r.stop.minFrameErrors,
  maxBits: r.stop.maxBits,
  maxFrames: r.stop.maxFrames,
  maxMillis: r.stop.maxSeconds === undefined ? undefined : r.stop.maxSeconds * 1000,
});

const engineChannel = (c: SimulationRequest["channel"]): SimChannel => (c.type === "awgn" ? { kind: "awgn", modulation: c.modulation, decisions: c.decisions } : { kind: c.type });

const cache = new Map<string, Simulator>();

/**
 * The simulator of a request with its seed, built once per process and kept (a few): building one can cost
 * 2^16 decodes. Refuses a code whose construction is beyond the per-call work limit before building it.
 */
export function simulatorFor(r: SimulationRequest & { seed: number }): Simulator {
  const key = JSON.stringify([r.code ?? null, r.frameBits ?? null, r.channel, r.points, r.seed, r.gapSkipping]);
  const hit = cache.get(key);
  if (hit) return hit;
  const code = r.code
    ? at(["code"], () => {
        const cw = codeWork(r.code!);
        if (cw.build + cw.decoderBuild > workLimits.max) throw refuse("Building this code", cw.build + cw.decoderBuild, workLimits.max, "work units", "Choose a smaller code.", "/code");
        return resolveCode(r.code!, []);
      })
    : null;
  checkStopRules(engineRules(r));
  const sim = createSimulator({ code, uncodedFrameBits: r.frameBits, channel: engineChannel(r.channel), points: r.points, seed: r.seed, gapSkipping: r.gapSkipping });
  if (cache.size >= 8) cache.delete(cache.keys().next().value!);
  cache.set(key, sim);
  return sim;
}
