import { z } from "zod";
import { randomInt } from "node:crypto";
import type { Db } from "@/db";
import { findClaim, insertClaim, listClaims, settleClaim } from "@/db/queries/claims";
import { findJob } from "@/db/queries/jobs";
import type { Claim } from "@/db/schema";
import { InputError } from "@/lib/core/errors";
import { newJobId, JOB_ID_PATTERN } from "@/lib/jobs/ids";
import { analyticEvidence, claimSimulation, decideAnalytic, decideMeasured, decideSimulated, measuredEvidence, resolveTarget, simulatedEvidence, targetInput, type Decision, type Target } from "../claim-evidence";
import { trialsOf, type SimulationJobInput, type SimulationProgress } from "@/lib/jobs/simulation-kind";
import { at, defineDataEndpoint, Reply } from "../endpoint";
import { enqueueSimulation } from "./simulations";
import { ApiError } from "../errors";
import { cursorParam, decodeCursor, limitParam, newestFirstCursor, newestFirstPage } from "../pagination";
import { caution } from "../schemas";

/**
 * Error-rate claims: "this build's link keeps its BER at most X", with the evidence that decides it. Each
 * claim is kept under its label (a firmware version, a branch, a build), so a label's claims are its history.
 */

const LABEL_PATTERN = /^[\x21-\x7e](?:[\x20-\x7e]*[\x21-\x7e])?$/;
const label = z
  .string()
  .min(1)
  .max(120)
  .regex(LABEL_PATTERN, "A label is 1 to 120 printable ASCII characters, not starting or ending with a space (e.g. fw-2.4.1+build.318).")
  .meta({ description: "What the claim is about: a firmware version, branch or build id; 1 to 120 printable ASCII characters. A label's claims form its history." });

const confidence = z
  .number()
  .min(0.5)
  .max(0.999999)
  .default(0.95)
  .meta({ description: "Confidence of a statistical verdict, 0.5 to 0.999999 (default 0.95): the chance of a wrong supported or refuted verdict is at most 1 − confidence." });

const input = z
  .strictObject({
    label,
    statement: z.string().max(300).optional().meta({ description: "The claim in the team's own words, up to 300 characters (kept with it, shown in the history)." }),
    target: targetInput,
    confidence,
    evidence: z.discriminatedUnion("mode", [analyticEvidence, measuredEvidence, simulatedEvidence]).meta({ id: "ClaimEvidence" }),
  })
  .meta({ id: "ClaimRequest" });

type Input = z.output<typeof input>;

const claimId = z.string().regex(JOB_ID_PATTERN).meta({ description: "The claim's id, as returned when it was made (`clm-` and 16 characters)." });

const output = z
  .object({
    id: z.string().meta({ description: "`clm-` and 16 characters." }),
    label: z.string(),
    statement: z.string().optional(),
    createdAt: z.string(),
    decidedAt: z.string().nullable(),
    target: z.object({ metric: z.enum(["ber", "fer"]), atMost: z.number(), preset: z.string().optional() }),
    confidence: z.number(),
    mode: z.enum(["analytic", "measured", "simulated"]),
    verdict: z.enum(["pending", "supported", "refuted", "inconclusive"]).meta({ description: "`pending` while a simulated claim's simulation runs." }),
    rate: z.number().nullable().meta({ description: "The rate the evidence gives: a formula's value, or errors ÷ trials, measured or simulated; null while pending." }),
    exact: z.boolean().meta({ description: "Whether `rate` is exact under the stated model; false for measured counts and for an estimate formula." }),
    interval: z
      .object({ lower: z.number(), upper: z.number(), method: z.string() })
      .nullable()
      .meta({
        description:
          "Bounds on the rate behind the verdict: the one-sided bounds at the claim's confidence for measured counts; the confidence sequence for a simulation; the rate itself for a formula; null while pending.",
      }),
    reasoning: z.string().meta({ description: "The verdict in one sentence." }),
    details: z.record(z.string(), z.union([z.number(), z.string(), z.boolean()])).meta({ description: "How the evidence was read (the code's n, k, t; the channel's bit error probability; …)." }),
    moreTrialsToDecide: z.number().optional().meta({ description: "Inconclusive measured claims: error-free bits (or frames) beyond those tested that would support the claim." }),
    evidence: z.record(z.string(), z.unknown()).meta({ description: "The evidence as submitted." }),
    simulation: z.string().optional().meta({ description: "A simulated claim's simulation: GET it (or its /events) to watch it." }),
    caution: z.string(),
  })
  .meta({ id: "Claim" });
type Out = z.output<typeof output>;

const EXAMPLES = {
  rig: {
    summary: "A bench rig saw 2 errors in 5·10⁹ bits; does that show BER ≤ 1e-9?",
    value: { label: "rig-7/fw-3.1.0", target: { metric: "ber", atMost: 1e-9 }, confidence: 0.95, evidence: { mode: "measured", trials: 5e9, errors: 2 } },
  },
  soak: {
    summary: "A soak test with no errors in 3.2·10¹⁰ bits against the fibre preset",
    value: { label: "tide-gauge/fw-2.4.1", target: { preset: "fibre" }, evidence: { mode: "measured", trials: 3.2e10, errors: 0 } },
  },
  hamming: {
    summary: "A (7,4) Hamming decoder on a BSC with p = 1e-3: is the frame error rate at most 1e-4?",
    value: { label: "buoy-modem/2.0.0-rc1", target: { metric: "fer", atMost: 1e-4 }, evidence: { mode: "analytic", code: { family: "hamming", r: 3 }, channel: { type: "bsc", p: 1e-3 } } },
  },
  qpsk: {
    summary: "Uncoded QPSK reaches BER 1e-6 at 10.6 dB",
    value: { label: "uplink/main", target: { preset: "data-strict" }, evidence: { mode: "analytic", channel: { type: "awgn", modulation: "qpsk", ebN0Db: 10.6 } } },
  },
  simulated: {
    summary: "By simulation: does a BSC with p = 1e-10 keep BER ≤ 1e-9? (202, decided in seconds)",
    value: { label: "backhaul/fw-5.0.2", target: { metric: "ber", atMost: 1e-9 }, evidence: { mode: "simulated", channel: { type: "bsc" }, at: 1e-10 } },
  },
} satisfies Record<string, { summary: string; value: z.input<typeof input> }>;

interface Stored {
  request: Input;
  target: Target;
  decision: Decision;
}

export function present(row: Claim): Out {
  const request = JSON.parse(row.request) as Input;
  const common = {
    id: row.id,
    label: row.label,
    ...(request.statement !== undefined ? { statement: request.statement } : {}),
    createdAt: row.created_at,
    decidedAt: row.decided_at,
    confidence: request.confidence,
    mode: request.evidence.mode,
    evidence: request.evidence as Record<string, unknown>,
    ...(row.job_id ? { simulation: `/simulations/${row.job_id}` } : {}),
    caution,
  };
  if (row.verdict === "pending" || !row.outcome) {
    return {
      ...common,
      target: resolveTarget(request.target),
      verdict: "pending",
      rate: null,
      exact: false,
      interval: null,
      reasoning: "The simulation is running; read this claim again, or follow the simulation, for the verdict.",
      details: {},
    };
  }
  const { target, decision } = JSON.parse(row.outcome) as Omit<Stored, "request">;
  return {
    ...common,
    target,
    verdict: decision.verdict,
    rate: decision.rate,
    exact: decision.exact,
    interval: decision.interval,
    reasoning: decision.reasoning,
    details: decision.details,
    ...(decision.moreTrialsToDecide !== undefined ? { moreTrialsToDecide: decision.moreTrialsToDecide } : {}),
  };
}

/** A pending claim whose simulation has ended gets its verdict now, once (the first read after the end writes it). */
export async function settle(db: Db, row: Claim): Promise<Claim> {
  if (row.verdict !== "pending" || !row.job_id) return row;
  const job = await findJob(db, row.org_id, row.job_id);
  if (!job || job.status === "queued" || job.status === "running") return row;
  const request = JSON.parse(row.request) as Input;
  const target = resolveTarget(request.target);
  const input = JSON.parse(job.input) as SimulationJobInput;
  const point = (JSON.parse(job.result ?? job.progress ?? "null") as SimulationProgress | null)?.points[0];
  const { errors, trials } = point ? trialsOf(input.decide!, point.counts) : { errors: 0, trials: 0 };
  const decision = decideSimulated(target, request.confidence, { id: job.id, status: job.status, reason: job.reason, seed: input.seed, errors, trials, stoppedBy: point?.stoppedBy ?? null });
  const decidedAt = job.finished_at ?? new Date().toISOString();
  const outcome = JSON.stringify({ target, decision });
  await settleClaim(db, row.id, decision.verdict, outcome, decidedAt);
  return { ...row, verdict: decision.verdict, outcome, decided_at: decidedAt };
}

/** The reference's example answer: the "rig" request example, decided as a call would decide it, under a made-up id and time. */
function illustrate(): Out {
  const req = input.parse(EXAMPLES.rig.value);
  const target = resolveTarget(req.target);
  const at0 = "2026-11-24T09:12:44.318Z";
  const decision = decideMeasured(target, req.confidence, req.evidence as Extract<Input["evidence"], { mode: "measured" }>);
  return present({ id: "clm-7rk2d9wq4mfz0s1x", org_id: 0, api_key_id: null, label: req.label, mode: "measured", verdict: decision.verdict, request: JSON.stringify(req), outcome: JSON.stringify({ target, decision }), job_id: null, created_at: at0, decided_at: at0 });
}
const ILLUSTRATIVE = "Illustrative only: a made-up id and time; the verdict is what the rig example gets";

export const createClaim = defineDataEndpoint({
  id: "claims.create",
  method: "POST",
  path: "/claims",
  scope: "claims",
  tag: "Claims",
  summary: "State an error-rate claim and get its verdict",
  description:
    "A claim: under a label (firmware version, branch, build), the rate a link keeps at most (`target`: a BER or FER bound, or a named preset), and the evidence that decides it. " +
    "`analytic` evidence decides at once from a formula: an uncoded BSC or AWGN link (BPSK, QPSK, M-PSK, square M-QAM), or a code on a BSC or on AWGN with BPSK/QPSK hard decisions, " +
    "its FER exact under bounded-distance decoding up to t = ⌊(dmin − 1)/2⌋ and its BER by an estimate (the verdict then says `exact: false`). " +
    "`measured` evidence is your own counts (trials and errors): supported when the one-sided Clopper–Pearson upper bound at the claim's confidence is within the target, " +
    "refuted when the lower bound is above it, else inconclusive with the error-free trials that would decide it. " +
    "`simulated` evidence starts a seeded simulation at one operating point (a job, as POST /simulations) that stops as soon as the claim is decided at its confidence — " +
    "by an anytime-valid confidence sequence, so stopping early keeps the chance of a wrong verdict within 1 − confidence — or when its budget ends (inconclusive); " +
    "a coded link is decided on its FER. Answers 201 with the decided claim and Location, or 202 with a pending simulated claim and Location: read it again for the verdict. " +
    "Cost: 1 unit, and a simulated claim's simulation as a simulation's.",
  input,
  output,
  statuses: { 201: "The claim, decided; Location is where it is kept.", 202: "A simulated claim: pending while its simulation runs; Location is where its verdict will be." },
  problems: ["job-limit", "work-limit", "server-busy"],
  examples: EXAMPLES,
  illustration: { summary: ILLUSTRATIVE, value: illustrate() },
  cost: 1,
  handler: async (req, { db, principal }) => {
    const target = resolveTarget(req.target);
    const now = new Date().toISOString();
    if (req.evidence.mode === "simulated") {
      const evidence = req.evidence;
      const job = at([], () => claimSimulation(target, req.confidence, evidence, evidence.seed ?? randomInt(0, 2 ** 32 - 1))) as SimulationJobInput;
      const jobId = (await at(["evidence"], () => enqueueSimulation(db, { orgId: principal.orgId, plan: principal.plan, mode: principal.mode, apiKeyId: principal.keyId }, job))).id;
      const row: Claim = { id: newJobId("clm"), org_id: principal.orgId, api_key_id: principal.keyId, label: req.label, mode: "simulated", verdict: "pending", request: JSON.stringify({ ...req, evidence: { ...evidence, seed: job.seed } }), outcome: null, job_id: jobId, created_at: now, decided_at: null };
      await insertClaim(db, row);
      return new Reply(202, present(row), `/claims/${row.id}`);
    }
    // Past the simulated branch: a const keeps the narrowing inside the closure.
    const evidence = req.evidence;
    const decision = at([], () => (evidence.mode === "analytic" ? decideAnalytic(target, evidence) : decideMeasured(target, req.confidence, evidence)));
    const row: Claim = {
      id: newJobId("clm"),
      org_id: principal.orgId,
      api_key_id: principal.keyId,
      label: req.label,
      mode: req.evidence.mode,
      verdict: decision.verdict,
      request: JSON.stringify(req),
      outcome: JSON.stringify({ target, decision }),
      job_id: null,
      created_at: now,
      decided_at: now,
    };
    await insertClaim(db, row);
    return new Reply(201, present(row), `/claims/${row.id}`);
  },
});

export const getClaim = defineDataEndpoint({
  id: "claims.get",
  method: "GET",
  path: "/claims/{id}",
  params: z.object({ id: claimId }),
  scope: "claims",
  tag: "Claims",
  summary: "One claim and its verdict",
  description: "The claim as decided: verdict, rate, interval, reasoning and the evidence. Cost: 0 units.",
  input: z.strictObject({}),
  output,
  examples: {},
  illustration: { summary: ILLUSTRATIVE, value: illustrate() },
  cost: 0,
  handler: async (_q, { db, principal, params }) => {
    const row = await findClaim(db, principal.orgId, params.id!);
    if (!row) throw new ApiError("not-found", `There is no claim ${params.id} in this organisation.`);
    return present(await settle(db, row));
  },
});

export const listClaimsEndpoint = defineDataEndpoint({
  id: "claims.list",
  method: "GET",
  path: "/claims",
  scope: "claims",
  tag: "Claims",
  summary: "Claims, newest first: a label's history",
  description: "The organisation's claims, newest first, optionally one label's (its history) or one verdict's, with cursor pagination. Cost: 0 units.",
  input: z
    .strictObject({
      label: label.optional().meta({ description: "Only this label's claims." }),
      verdict: z.enum(["supported", "refuted", "inconclusive"]).optional().meta({ description: "Only claims with this verdict." }),
      limit: limitParam(200, 50),
      cursor: cursorParam,
    })
    .meta({ id: "ClaimQuery" }),
  output: z.object({ data: z.array(output), nextCursor: z.string().nullable() }).meta({ id: "ClaimPage" }),
  examples: {
    history: { summary: "One label's history", value: { label: "tide-gauge/fw-2.4.1" } },
    refuted: { summary: "The latest refuted claims", value: { verdict: "refuted", limit: 20 } },
  },
  illustration: { summary: ILLUSTRATIVE, value: { data: [illustrate()], nextCursor: null } },
  cost: 0,
  handler: async (q, { db, principal }) => {
    const before = q.cursor === undefined ? undefined : decodeCursor(q.cursor, newestFirstCursor);
    if (q.cursor !== undefined && !before) throw new InputError("The cursor is not one this endpoint returned.", ["cursor"]);
    const rows = await listClaims(db, principal.orgId, { label: q.label, verdict: q.verdict, limit: q.limit + 1, before });
    const { page, nextCursor } = newestFirstPage(rows, q.limit);
    const settled = await Promise.all(page.map((r) => settle(db, r)));
    return { data: settled.map(present), nextCursor };
  },
});
