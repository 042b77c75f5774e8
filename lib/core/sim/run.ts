import { InputError } from "../errors";
import { zeroCounts, type SimCounts, type Simulator } from "./engine";

/**
 * Stopping rules of one point: whichever comes first of a minimum error count (bit or frame errors), a
 * maximum of information bits or frames, and a wall-time budget. Rules are checked between chunks: the
 * error counts and the time may overshoot by up to one chunk, the maxima never do (the last chunk is cut
 * to the frames left, ⌈bits left / k⌉ for maxBits). The engine reads no clock: the caller passes one.
 */
export interface StopRules {
  minBitErrors?: number;
  minFrameErrors?: number;
  maxBits?: number;
  maxFrames?: number;
  /** Wall-time budget in milliseconds, measured with the clock passed to runPoint. */
  maxMillis?: number;
}

export type StopReason = "minBitErrors" | "minFrameErrors" | "maxBits" | "maxFrames" | "maxMillis";

/** Add chunk counts into a running total (integers, so the sum is exact in any order below 2^53). */
export function addCounts(total: SimCounts, c: SimCounts): void {
  total.frames += c.frames;
  total.infoBits += c.infoBits;
  total.bitErrors += c.bitErrors;
  total.frameErrors += c.frameErrors;
  total.failures += c.failures;
  total.undetected += c.undetected;
}

/** Check rules once: every bound a positive number, and a bit or frame maximum so that p = 0 still ends. */
export function checkStopRules(rules: StopRules): void {
  for (const key of ["minBitErrors", "minFrameErrors", "maxBits", "maxFrames", "maxMillis"] as const) {
    const v = rules[key];
    if (v !== undefined && !(v > 0 && (key === "maxMillis" || Number.isSafeInteger(v)))) throw new InputError(`${key} must be a positive ${key === "maxMillis" ? "number" : "integer"}; got ${v}`, [key]);
  }
  if (rules.maxBits === undefined && rules.maxFrames === undefined) throw new InputError("give maxBits or maxFrames, so that a point without errors still ends", ["maxBits"]);
}

/** The first rule that holds for `counts` after `elapsedMillis`, in the order errors, bits, frames, time; null to go on. */
export function stopReason(counts: SimCounts, rules: StopRules, elapsedMillis = 0): StopReason | null {
  if (rules.minBitErrors !== undefined && counts.bitErrors >= rules.minBitErrors) return "minBitErrors";
  if (rules.minFrameErrors !== undefined && counts.frameErrors >= rules.minFrameErrors) return "minFrameErrors";
  if (rules.maxBits !== undefined && counts.infoBits >= rules.maxBits) return "maxBits";
  if (rules.maxFrames !== undefined && counts.frames >= rules.maxFrames) return "maxFrames";
  if (rules.maxMillis !== undefined && elapsedMillis >= rules.maxMillis) return "maxMillis";
  return null;
}

/** Frames chunk `chunk` may run under the maxima (framesPerChunk, or fewer for the last one; 0 past the end). */
export function chunkFrames(sim: Simulator, rules: StopRules, chunk: number): number {
  const perBits = rules.maxBits === undefined ? Infinity : Math.ceil(rules.maxBits / sim.infoBitsPerFrame);
  const cap = Math.min(perBits, rules.maxFrames ?? Infinity);
  return Math.max(0, Math.min(sim.framesPerChunk, cap - chunk * sim.framesPerChunk));
}

export interface PointResult {
  counts: SimCounts;
  chunks: number;
  stoppedBy: StopReason;
}

/** Run point `point` chunk after chunk (0, 1, 2, …) until a rule holds; `clock` (milliseconds) is required with maxMillis. */
export function runPoint(sim: Simulator, point: number, rules: StopRules, clock?: () => number): PointResult {
  checkStopRules(rules);
  if (rules.maxMillis !== undefined && !clock) throw new InputError("maxMillis needs a clock", ["maxMillis"]);
  const start = clock ? clock() : 0;
  const counts = zeroCounts();
  for (let chunk = 0; ; chunk++) {
    const frames = chunkFrames(sim, rules, chunk);
    if (frames > 0) addCounts(counts, sim.runChunk(point, chunk, frames));
    const reason = stopReason(counts, rules, clock ? clock() - start : 0);
    if (reason) return { counts, chunks: chunk + 1, stoppedBy: reason };
  }
}
