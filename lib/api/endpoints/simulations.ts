import { randomInt } from "node:crypto";
import { z } from "zod";
import { countUnfinishedJobs, findJob, listJobs, requestCancel } from "@/db/queries/jobs";
import type { Job } from "@/db/schema";
import { InputError } from "@/lib/core/errors";
import { zeroCounts, type SimCounts } from "@/lib/core/sim/engine";
import { clopperPearson, wilson } from "@/lib/core/stats/binomial-interval";
import { JOB_ID_PATTERN, newJobId } from "@/lib/jobs/ids";
import { poolLimits, runTask } from "@/lib/jobs/pool";
import { databaseQueue } from "@/lib/jobs/queue";
import type { SimulationJobInput, SimulationProgress } from "@/lib/jobs/simulation-kind";
import { unitsForBits } from "@/lib/jobs/simulation-kind";
import { defineDataEndpoint, Reply, StreamReply } from "../endpoint";
import { ApiError } from "../errors";
import { replyJson } from "../pool-reply";
import { cursorParam, decodeCursor, limitParam, newestFirstCursor, newestFirstPage } from "../pagination";
import { caution } from "../schemas";
import { inTransaction, type Db } from "@/db";
import { PLANS, planOf, PLAN_IDS } from "@/lib/billing/plans";
import { reserveQuota, type Payer } from "../quota";
import { BITS_PER_UNIT, jobBitBound, MAX_POINTS, MAX_SECONDS_PER_POINT, simulationRequest, type SimulationRequest } from "../simulation-spec";

/**
 * Simulations: a sweep run as a job by the job runner (`npm run worker`), read while it runs, streamed as
 * Server-Sent Events, cancelled on request. Counts are exact integers; intervals are computed when read.
 */

export const SIMULATION_KIND = "simulation";

/** Throw the job-limit problem when the organisation already has as many jobs queued or running as its plan allows. */
async function checkActiveJobs(db: Db, payer: Payer): Promise<void> {
  const plan = planOf(payer.plan);
  const active = await countUnfinishedJobs(db, payer.orgId);
  if (active >= plan.maxActiveJobs) {
    throw new ApiError("job-limit", `The organisation has ${active} simulations or simulated claims queued or running; its ${plan.name} plan allows ${plan.maxActiveJobs} at once. Wait for one to end or cancel one (DELETE /simulations/{id}).`, {
      headers: { "retry-after": "10" },
      limit: { quantity: "jobs queued or running", requested: active + 1, allowed: plan.maxActiveJobs, unit: "jobs" },
    });
  }
}

const pow2 = (n: number) => `2^${Math.log2(n)}`;

/** Throw the work-limit problem when the request could simulate more bits than the plan allows one job. */
function checkBitBudget(payer: Payer, bits: number): void {
  const plan = planOf(payer.plan);
  if (bits <= plan.maxBitsPerJob) return;
  const bigger = PLAN_IDS.map((id) => PLANS[id]).find((p) => p.maxBitsPerJob >= bits);
  throw new ApiError(
    "work-limit",
    `The stopping rules allow up to ${bits.toExponential(3)} information bits over all points (maxBits or maxFrames × k per point); the ${plan.name} plan allows ${pow2(plan.maxBitsPerJob)} ≈ ${plan.maxBitsPerJob.toExponential(3)} per job. Lower stop.maxBits or stop.maxFrames, use fewer points${bigger ? `, or move to ${bigger.name} (${pow2(bigger.maxBitsPerJob)} bits per job)` : ""}.`,
    { limit: { quantity: "information bits per job", requested: bits, allowed: plan.maxBitsPerJob, unit: "bits" } },
  );
}

const budgetsInWords = PLAN_IDS.map((id) => `${PLANS[id].name} ${pow2(PLANS[id].maxBitsPerJob)} bits and ${PLANS[id].maxActiveJobs} job${PLANS[id].maxActiveJobs === 1 ? "" : "s"}`).join(", ");

/** Build the request's simulator on the request lane of the pool (it can take thousands of decodes): its errors are the request's. */
async function checkSimulation(r: SimulationJobInput): Promise<void> {
  replyJson(await runTask("request", { kind: "sim-check", request: r }, poolLimits.deadlineMs));
}

const rate = z
  .object({
    estimate: z.number().meta({ description: "Errors ÷ trials." }),
    clopperPearson: z.object({ lower: z.number(), upper: z.number() }).meta({ description: "Two-sided Clopper–Pearson interval at the request's confidence (Clopper & Pearson 1934)." }),
    wilson: z.object({ lower: z.number(), upper: z.number() }).meta({ description: "Wilson score interval at the request's confidence (Wilson 1927)." }),
  })
  .nullable();

const counts = z.object({ frames: z.number(), infoBits: z.number(), bitErrors: z.number(), frameErrors: z.number(), failures: z.number(), undetected: z.number() });

const pointView = z.object({
  x: z.number().meta({ description: "The operating point: p, ε, or Eb/N0 in dB." }),
  status: z.enum(["waiting", "running", "done"]),
  stoppedBy: z.string().nullable().meta({ description: "The rule that ended the point: minBitErrors, minFrameErrors, maxBits, maxFrames, maxMillis, or decided:<verdict> for a claim." }),
  fraction: z.number().meta({ description: "How far the point is towards its nearest stopping rule, 0 to 1." }),
  chunks: z.number(),
  counts,
  ber: rate.meta({ description: "Information-bit error rate; null before any bit. After decoding, bit errors come in bursts inside failed frames: read the FER's interval for a coded link." }),
  fer: rate.meta({ description: "Frame error rate (a frame decoded wrong or declared a failure); null before any frame." }),
});

const view = z
  .object({
    id: z.string().meta({ description: "`sim-` and 16 characters." }),
    status: z.enum(["queued", "running", "done", "cancelled", "failed"]),
    reason: z.string().nullable().meta({ description: "Why it failed or was cancelled." }),
    seed: z.number().int(),
    request: z.record(z.string(), z.unknown()).meta({ description: "The request as validated, defaults filled in." }),
    progress: z.number().meta({ description: "The mean over points of how far each is, 0 to 1." }),
    points: z.array(pointView),
    units: z.number().int().meta({ description: `Compute units charged: one per started 2^26 simulated information bits, when the job ends (a cancelled job pays for the chunks it ran).` }),
    createdAt: z.string(),
    startedAt: z.string().nullable(),
    finishedAt: z.string().nullable(),
    links: z.object({ self: z.string(), events: z.string() }),
    caution: z.string(),
  })
  .meta({ id: "Simulation" });
type View = z.output<typeof view>;

function rateOf(errors: number, trials: number, confidence: number) {
  if (trials === 0) return null;
  return { estimate: errors / trials, clopperPearson: clopperPearson(errors, trials, confidence), wilson: wilson(errors, trials, confidence) };
}

/** How far a point is towards the nearest of its rules (error counts and maxima; time is not known from outside). */
function fractionOf(c: SimCounts, stop: SimulationRequest["stop"]): number {
  const parts = [
    stop.minBitErrors ? c.bitErrors / stop.minBitErrors : 0,
    stop.minFrameErrors ? c.frameErrors / stop.minFrameErrors : 0,
    stop.maxBits ? c.infoBits / stop.maxBits : 0,
    stop.maxFrames ? c.frames / stop.maxFrames : 0,
  ];
  return Math.min(0.99, Math.max(...parts));
}

export function presentSimulation(row: Job): View {
  const req = JSON.parse(row.input) as SimulationJobInput;
  const prog = JSON.parse(row.result ?? row.progress ?? "null") as SimulationProgress | null;
  const points = req.points.map((x, i) => {
    const p = prog?.points[i];
    const c = p?.counts ?? zeroCounts();
    const done = p?.stoppedBy != null;
    return {
      x,
      status: done ? ("done" as const) : row.status === "running" && (p?.chunks ?? 0) > 0 ? ("running" as const) : ("waiting" as const),
      stoppedBy: p?.stoppedBy ?? null,
      fraction: done ? 1 : fractionOf(c, req.stop),
      chunks: p?.chunks ?? 0,
      counts: c,
      ber: rateOf(c.bitErrors, c.infoBits, req.confidence),
      fer: rateOf(c.frameErrors, c.frames, req.confidence),
    };
  });
  // A claim's decision rule is the claim's business, not part of the simulation it asked for.
  const request: Record<string, unknown> = { ...req };
  delete request.decide;
  return {
    id: row.id,
    status: row.status,
    reason: row.reason,
    seed: req.seed,
    request,
    progress: row.status === "done" ? 1 : points.reduce((s, p) => s + p.fraction, 0) / points.length,
    points,
    units: row.units,
    createdAt: row.created_at,
    startedAt: row.started_at,
    finishedAt: row.finished_at,
    links: { self: `/simulations/${row.id}`, events: `/simulations/${row.id}/events` },
    caution,
  };
}

const simId = z.object({ id: z.string().regex(JOB_ID_PATTERN).meta({ description: "The simulation's id (`sim-` and 16 characters)." }) });

/** The org's simulation `id`, or the not-found problem (another org's, a claim's job or a malformed id alike). */
export async function simulationJob(db: Parameters<typeof findJob>[0], orgId: number, id: string): Promise<Job> {
  const row = JOB_ID_PATTERN.test(id) ? await findJob(db, orgId, id) : undefined;
  if (!row || row.kind !== SIMULATION_KIND) throw new ApiError("not-found", `There is no simulation ${id} in this organisation.`);
  return row;
}

const ILLUSTRATIVE = "Illustrative only: a made-up id, times and counts of a finished (7,4) Hamming sweep";
const illustration: View = {
  id: "sim-3q8x1m5v0c7h2k9n",
  status: "done",
  reason: null,
  seed: 20261203,
  request: { code: { family: "hamming", r: 3 }, channel: { type: "bsc" }, points: [0.01], stop: { minBitErrors: 100, maxBits: 1e9 }, confidence: 0.95, gapSkipping: true },
  progress: 1,
  points: [
    {
      x: 0.01,
      status: "done",
      stoppedBy: "minBitErrors",
      fraction: 1,
      chunks: 1,
      counts: { frames: 149796, infoBits: 599184, bitErrors: 1264, frameErrors: 304, failures: 0, undetected: 304 },
      ber: { estimate: 1264 / 599184, clopperPearson: clopperPearson(1264, 599184, 0.95), wilson: wilson(1264, 599184, 0.95) },
      fer: { estimate: 304 / 149796, clopperPearson: clopperPearson(304, 149796, 0.95), wilson: wilson(304, 149796, 0.95) },
    },
  ],
  units: 1,
  createdAt: "2026-11-24T09:12:44.318Z",
  startedAt: "2026-11-24T09:12:44.402Z",
  finishedAt: "2026-11-24T09:12:44.655Z",
  links: { self: "/simulations/sim-3q8x1m5v0c7h2k9n", events: "/simulations/sim-3q8x1m5v0c7h2k9n/events" },
  caution,
};

/**
 * Check a validated request against the budgets, draw its seed when it has none, build its simulator once (so its
 * errors are the request's), and queue it for the runner. The API and the console both start simulations here;
 * `apiKeyId` is null for one started from the console; a simulated claim's request carries its seed and decision rule.
 */
export async function enqueueSimulation(db: Db, payer: Payer & { apiKeyId: number | null }, req: SimulationRequest & Partial<SimulationJobInput>): Promise<Job> {
  const bits = jobBitBound(req);
  checkBitBudget(payer, bits);
  await checkActiveJobs(db, payer);
  const input: SimulationJobInput = { ...req, seed: req.seed ?? randomInt(0, 2 ** 32 - 1) };
  await checkSimulation(input);
  const id = newJobId("sim");
  // The most the job can cost is held from the allowance with the job, and settled with what it ran when it ends.
  const reservedUnits = unitsForBits(bits);
  await inTransaction(db, async (tx) => {
    await reserveQuota(tx, payer, reservedUnits);
    await databaseQueue(tx).enqueue({ id, orgId: payer.orgId, apiKeyId: payer.apiKeyId, kind: SIMULATION_KIND, input, reservedUnits });
  });
  return (await findJob(db, payer.orgId, id))!;
}

export const createSimulation = defineDataEndpoint({
  id: "simulations.create",
  method: "POST",
  path: "/simulations",
  scope: "claims",
  tag: "Simulations",
  summary: "Start a seeded Monte Carlo simulation of bit and frame error rates",
  description:
    `A sweep of up to ${MAX_POINTS} operating points of a code (or none) on a BSC, BEC or AWGN channel (BPSK or Gray QPSK, hard or soft decisions), each run in chunks until one of its stopping rules holds. ` +
    "It runs as a job: the answer is 202 with Location; read it with GET /simulations/{id}, follow it with GET /simulations/{id}/events, cancel it with DELETE. " +
    `The same request and seed give the same counts. Limits: ${MAX_POINTS} points, 2^40 information bits and ${MAX_SECONDS_PER_POINT} s per point; per plan, the information bits one job may ask for (summed over points) and the jobs queued or running at once: ${budgetsInWords} (422 work-limit, 429 job-limit). ` +
    `Cost: 1 unit to start, and when the job ends 1 unit per started 2^26 (${BITS_PER_UNIT.toLocaleString("en")}) simulated information bits, charged for the chunks run (a cancelled job too). ` +
    "The units the job could cost at most are held from the monthly allowance while it runs (402 quota-exhausted when they do not fit), and what it did not use is given back when it ends.",
  input: simulationRequest,
  output: view,
  statuses: { 202: "Queued; Location is where to read it." },
  problems: ["job-limit", "work-limit", "server-busy", "quota-exhausted"],
  examples: {
    hamming: { summary: "(7,4) Hamming on a BSC, three crossover probabilities, 100 bit errors or 10⁸ bits each", value: { code: { family: "hamming", r: 3 }, channel: { type: "bsc" }, points: [0.02, 0.01, 0.005], stop: { minBitErrors: 100, maxBits: 1e8 }, seed: 7 } },
    soft: { summary: "Golay (24,12) soft decisions on AWGN, 2 to 4 dB", value: { code: { family: "golay", extended: true }, channel: { type: "awgn", modulation: "bpsk", decisions: "soft" }, points: [2, 3, 4], stop: { minFrameErrors: 50, maxFrames: 200000 } } },
  },
  illustration: { summary: ILLUSTRATIVE, value: illustration },
  cost: 1,
  handler: async (req, { db, principal }) => {
    const row = await enqueueSimulation(db, { orgId: principal.orgId, plan: principal.plan, mode: principal.mode, apiKeyId: principal.keyId }, req);
    return new Reply(202, presentSimulation(row), `/simulations/${row.id}`);
  },
});

export const getSimulation = defineDataEndpoint({
  id: "simulations.get",
  method: "GET",
  path: "/simulations/{id}",
  params: simId,
  scope: "claims",
  tag: "Simulations",
  summary: "A simulation: its status, progress and counts with intervals",
  description: "Status (queued, running, done, cancelled, failed with a reason), each point's counts, stopping rule and progress, and the error rates with Clopper–Pearson and Wilson intervals. Cost: 0 units.",
  input: z.strictObject({}),
  output: view,
  examples: {},
  illustration: { summary: ILLUSTRATIVE, value: illustration },
  cost: 0,
  handler: async (_q, { db, principal, params }) => presentSimulation(await simulationJob(db, principal.orgId, params.id!)),
});

export const listSimulations = defineDataEndpoint({
  id: "simulations.list",
  method: "GET",
  path: "/simulations",
  scope: "claims",
  tag: "Simulations",
  summary: "Simulations, newest first",
  description: "The organisation's simulations, newest first, with cursor pagination. Cost: 0 units.",
  input: z.strictObject({ limit: limitParam(100, 20), cursor: cursorParam }).meta({ id: "SimulationQuery" }),
  output: z.object({ data: z.array(view), nextCursor: z.string().nullable() }).meta({ id: "SimulationPage" }),
  examples: { recent: { summary: "The latest 20", value: {} } },
  illustration: { summary: ILLUSTRATIVE, value: { data: [illustration], nextCursor: null } },
  cost: 0,
  handler: async (q, { db, principal }) => {
    const before = q.cursor === undefined ? undefined : decodeCursor(q.cursor, newestFirstCursor);
    if (q.cursor !== undefined && !before) throw new InputError("The cursor is not one this endpoint returned.", ["cursor"]);
    const rows = await listJobs(db, principal.orgId, SIMULATION_KIND, q.limit + 1, before);
    const { page, nextCursor } = newestFirstPage(rows, q.limit);
    return { data: page.map(presentSimulation), nextCursor };
  },
});

export const cancelSimulation = defineDataEndpoint({
  id: "simulations.cancel",
  method: "DELETE",
  path: "/simulations/{id}",
  params: simId,
  scope: "claims",
  tag: "Simulations",
  summary: "Cancel a simulation",
  description:
    "A queued simulation ends at once (200); a running one is ended by its runner within about a second (202: read it again for the final state), keeping the counts of the chunks it finished; a finished one is left as it is (200). Cost: 0 units.",
  input: z.strictObject({}),
  output: view,
  statuses: { 200: "Ended, or already over.", 202: "Running: its runner ends it within about a second." },
  examples: {},
  illustration: { summary: ILLUSTRATIVE, value: { ...illustration, status: "cancelled", reason: "Cancelled on request; the result holds the chunks finished before." } },
  cost: 0,
  handler: async (_q, { db, principal, params }) => {
    await simulationJob(db, principal.orgId, params.id!);
    const row = (await requestCancel(db, principal.orgId, params.id!, new Date().toISOString()))!;
    const out = presentSimulation(row);
    return row.status === "running" ? new Reply(202, out, `/simulations/${row.id}`) : out;
  },
});

/** How often the event stream looks at the job, and the longest a stream stays open. */
export const EVENTS_POLL_MS = 250;
export const EVENTS_MAX_MS = 30 * 60_000;

/** The event stream of the org's job `id` (it must exist): `progress` when the job changes, `end` once, then closed. The API and the console both stream with it. */
export function simulationEventStream(db: Parameters<typeof findJob>[0], orgId: number, id: string): ReadableStream<Uint8Array> {
  const enc = new TextEncoder();
  let timer: ReturnType<typeof setTimeout> | undefined;
  return new ReadableStream<Uint8Array>({
    start(controller) {
      const opened = Date.now();
      let last = "";
      const tick = async () => {
        try {
          const row = (await findJob(db, orgId, id))!;
          const over = row.status === "done" || row.status === "cancelled" || row.status === "failed";
          if (row.updated_at !== last || over) {
            last = row.updated_at;
            controller.enqueue(enc.encode(`event: ${over ? "end" : "progress"}\ndata: ${JSON.stringify(presentSimulation(row))}\n\n`));
          }
          if (over || Date.now() - opened > EVENTS_MAX_MS) return controller.close();
          timer = setTimeout(() => void tick(), EVENTS_POLL_MS);
        } catch (e) {
          controller.error(e);
        }
      };
      void tick();
    },
    cancel() {
      clearTimeout(timer);
    },
  });
}

export const simulationEvents = defineDataEndpoint({
  id: "simulations.events",
  method: "GET",
  path: "/simulations/{id}/events",
  params: simId,
  scope: "claims",
  tag: "Simulations",
  summary: "Follow a simulation as Server-Sent Events",
  description:
    "A `text/event-stream`: a `progress` event with the simulation (as GET /simulations/{id}) whenever it changes, at most four a second, then one `end` event with its final state, and the stream closes. " +
    `A stream stays open at most ${EVENTS_MAX_MS / 60_000} minutes; reconnect to go on. Cost: 0 units.`,
  input: z.strictObject({}),
  output: z.string().meta({ description: "Events: `event: progress` or `event: end`, then `data:` with the Simulation as JSON." }),
  produces: "text/event-stream",
  examples: {},
  illustration: { summary: "Illustrative only: the stream of a short simulation", value: `event: progress\ndata: {"id":"sim-3q8x1m5v0c7h2k9n","status":"running",…}\n\nevent: end\ndata: {"id":"sim-3q8x1m5v0c7h2k9n","status":"done",…}\n\n` },
  cost: 0,
  handler: async (_q, { db, principal, params }) => {
    await simulationJob(db, principal.orgId, params.id!);
    return new StreamReply(simulationEventStream(db, principal.orgId, params.id!), "text/event-stream");
  },
});

export { unitsForBits };
