import { z } from "zod";
import type { Db } from "@/db";
import { insertAudit } from "@/db/queries/audit";
import { listJobs, requestCancel } from "@/db/queries/jobs";
import { recordUsage } from "@/lib/api/metering";
import { reserveQuota, settleQuota } from "@/lib/api/quota";
import type { Org } from "@/db/schema";
import { createSimulation, enqueueSimulation, presentSimulation, SIMULATION_KIND, simulationJob } from "@/lib/api/endpoints/simulations";
import { resolveCode } from "@/lib/api/codes";
import { cursorParam, decodeCursor, limitParam, newestFirstCursor, newestFirstPage } from "@/lib/api/pagination";
import type { SimulationRequest } from "@/lib/api/simulation-spec";
import { actorOf, invalidField, type Caller } from "./common";

/**
 * The Simulations pages' data: the same jobs, checks and presentation as /api/v1/simulations, for a signed-in
 * member instead of a key. A simulation started here belongs to no key; it is metered as one started through the API.
 */

export const simulationsQuery = z.strictObject({ limit: limitParam(50, 20), cursor: cursorParam });

export async function listOrgSimulations(db: Db, org: Pick<Org, "id">, q: z.output<typeof simulationsQuery>) {
  const before = q.cursor === undefined ? undefined : decodeCursor(q.cursor, newestFirstCursor);
  if (q.cursor !== undefined && !before) throw invalidField("/cursor", "The cursor is not one this list returned.");
  const rows = await listJobs(db, org.id, SIMULATION_KIND, q.limit + 1, before);
  const { page, nextCursor } = newestFirstPage(rows, q.limit);
  return { simulations: page.map(presentSimulation), nextCursor };
}

/**
 * One simulation, with the code's name, length and dimension (its rate places the Shannon limit on the result
 * page); null for uncoded. The code was built when the simulation was accepted, so it builds again here.
 */
export async function orgSimulation(db: Db, org: Pick<Org, "id">, id: string) {
  const sim = presentSimulation(await simulationJob(db, org.id, id));
  const spec = (sim.request as Partial<SimulationRequest>).code;
  const built = spec ? resolveCode(spec, []) : null;
  return { ...sim, code: built ? { name: built.name, n: built.n, k: built.k } : null };
}

/**
 * Start a simulation: the API's checks, quota and queue, its starting unit metered (no key; it draws on the live
 * allowance, as the console's work is the organisation's own), and an audit row naming who started it.
 */
export async function startOrgSimulation(db: Db, org: Pick<Org, "id" | "plan">, caller: Caller, req: SimulationRequest, requestId: string) {
  const payer = { orgId: org.id, plan: org.plan, mode: "live" as const };
  const at = new Date();
  const start = await reserveQuota(db, payer, createSimulation.cost, at);
  let row;
  try {
    row = await enqueueSimulation(db, { ...payer, apiKeyId: null }, req);
  } catch (e) {
    await settleQuota(db, start, 0, at);
    throw e;
  }
  await recordUsage(db, { payer, keyId: null, endpoint: createSimulation.id, method: "POST", status: 202, units: createSimulation.cost, durationMs: 0, requestId, at }, start);
  await insertAudit(db, { orgId: org.id, actor: actorOf(caller), action: "simulation.started", targetType: "job", targetId: row.id, details: { points: JSON.parse(row.input).points?.length ?? 0 } });
  return presentSimulation(row);
}

/** Cancel as DELETE /simulations/{id} does; only a cancel that ended or marked a job is audited. */
export async function cancelOrgSimulation(db: Db, org: Pick<Org, "id">, caller: Caller, id: string) {
  const before = await simulationJob(db, org.id, id);
  const row = (await requestCancel(db, org.id, id, new Date().toISOString()))!;
  if (before.status === "queued" || (before.status === "running" && before.cancel_requested_at === null)) {
    await insertAudit(db, { orgId: org.id, actor: actorOf(caller), action: "simulation.cancelled", targetType: "job", targetId: id, details: { was: before.status } });
  }
  return { simulation: presentSimulation(row), ending: row.status === "running" };
}
