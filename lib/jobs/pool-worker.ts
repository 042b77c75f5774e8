import { ApiError } from "@/lib/api/errors";
import { computeEndpoints } from "@/lib/api/compute-endpoints";
import { simulatorFor, type SimulationRequest } from "@/lib/api/simulation-spec";
import { InputError } from "@/lib/core/errors";
import type { PoolReply, PoolTask } from "./pool";

/** The pool's worker entry: runs one task and returns its result as JSON text, or its error as data. */
const byId = new Map(computeEndpoints.map((e) => [e.id, e]));

export default function run(task: PoolTask): PoolReply {
  try {
    if (task.kind === "sim-check") {
      const sim = simulatorFor(task.request as SimulationRequest & { seed: number });
      return { ok: true, json: JSON.stringify({ framesPerChunk: sim.framesPerChunk }) };
    }
    if (task.kind === "sim-chunk") {
      const sim = simulatorFor(task.request as SimulationRequest & { seed: number });
      return { ok: true, json: JSON.stringify(sim.runChunk(task.point, task.chunk, task.frames)) };
    }
    const endpoint = byId.get(task.id);
    if (!endpoint) throw new Error(`the pool has no endpoint ${task.id}`);
    return { ok: true, json: JSON.stringify(endpoint.handler(task.input)) };
  } catch (e) {
    if (e instanceof InputError) return { ok: false, error: { kind: "input", message: e.message, path: e.path } };
    if (e instanceof ApiError) return { ok: false, error: { kind: "api", code: e.code, detail: e.detail, extra: e.extra } };
    throw e;
  }
}
