import { replyJson } from "@/lib/api/pool-reply";
import { BITS_PER_UNIT, engineRules, simulatorFor, type SimulationRequest } from "@/lib/api/simulation-spec";
import { zeroCounts, type SimCounts } from "@/lib/core/sim/engine";
import { addCounts, chunkFrames, stopReason } from "@/lib/core/sim/run";
import { decide, sequentialPlan } from "@/lib/core/stats/sequential";
import { runTask } from "./pool";
import { erasePlan, type JobKind } from "./runner";

/**
 * Simulations as jobs: each point of the sweep runs chunk after chunk on the pool's batch lane until one
 * of its stopping rules holds. A simulated claim adds `decide`: the point also stops as soon as the
 * sequential rule (lib/core/stats/sequential.ts) decides the claim, which stays valid under this stopping.
 */

export interface SequentialDecision {
  metric: "ber" | "fer";
  target: number;
  confidence: number;
}

/** What the jobs table holds for a simulation: the validated request, its seed, and a claim's decision rule. */
export type SimulationJobInput = SimulationRequest & { seed: number; decide?: SequentialDecision };

export interface PointState {
  counts: SimCounts;
  chunks: number;
}

/** The progress and the result of a simulation job: per point, its counts so far, chunks and why it stopped. */
export interface SimulationProgress {
  points: { counts: SimCounts; chunks: number; stoppedBy: string | null }[];
}

/** Errors and trials a claim's metric counts: bit errors in information bits, or frame errors in frames. */
export const trialsOf = (d: SequentialDecision, c: SimCounts) => (d.metric === "ber" ? { errors: c.bitErrors, trials: c.infoBits } : { errors: c.frameErrors, trials: c.frames });

/** Compute units for simulated information bits: one per started 2^26 bits. */
export const unitsForBits = (bits: number) => Math.ceil(bits / BITS_PER_UNIT);

export const simulationKind: JobKind = {
  kind: "simulation",
  plan(input) {
    const r = input as SimulationJobInput;
    const sim = simulatorFor(r);
    const rules = engineRules(r);
    const seq = r.decide ? sequentialPlan(r.decide.target, r.decide.confidence) : undefined;
    const progress = (states: (PointState | undefined)[], stops: (string | null)[]): SimulationProgress => ({
      points: r.points.map((_, i) => ({ counts: states[i]?.counts ?? zeroCounts(), chunks: states[i]?.chunks ?? 0, stoppedBy: stops[i] ?? null })),
    });
    return erasePlan<PointState, SimCounts>({
      points: r.points.length,
      async run(point, chunk) {
        return JSON.parse(replyJson(await runTask("batch", { kind: "sim-chunk", request: r, point, chunk, frames: chunkFrames(sim, rules, chunk) }))) as SimCounts;
      },
      fold(_point, state, counts) {
        const total = state ? { ...state.counts } : zeroCounts();
        addCounts(total, counts);
        return { counts: total, chunks: (state?.chunks ?? 0) + 1 };
      },
      stop(_point, state, elapsedMs) {
        if (seq && r.decide) {
          const { errors, trials } = trialsOf(r.decide, state.counts);
          const v = decide(seq, errors, trials);
          if (v !== "continue") return `decided:${v}`;
        }
        return stopReason(state.counts, rules, elapsedMs);
      },
      progress,
      result: progress,
      units: (states) => unitsForBits(states.reduce((s, x) => s + (x?.counts.infoBits ?? 0), 0)),
    });
  },
};

export const jobKinds: JobKind[] = [simulationKind];
