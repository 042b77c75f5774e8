import { createHash, randomBytes } from "node:crypto";
import type { Db } from "@/db";
import type { KeyMode, NewUsageEvent, Role } from "@/db/schema";
import { insertApiKey } from "@/db/queries/api-keys";
import { insertAudit, type AuditInput } from "@/db/queries/audit";
import { findOrgBySlug } from "@/db/queries/orgs";
import { analyticEvidence, decideAnalytic, decideMeasured, measuredEvidence, resolveTarget, targetInput } from "@/lib/api/claim-evidence";
import { generateKey } from "@/lib/api/keys";
import { allScopes } from "@/lib/api/scopes";
import { engineRules, simulationRequest, simulatorFor } from "@/lib/api/simulation-spec";
import { hashPassword } from "@/lib/auth/passwords";
import { runPoint } from "@/lib/core/sim/run";
import { newJobId } from "@/lib/jobs/ids";
import { unitsForBits, type SimulationJobInput, type SimulationProgress } from "@/lib/jobs/simulation-kind";

/**
 * The demo scenario: Brinewatch Buoys builds moored ocean-sensor buoys that report over a
 * narrowband telemetry link; its firmware team checks the link's coding from CI.
 */
export const DEMO_ORG = { slug: "brinewatch", name: "Brinewatch Buoys" };
export const DEMO_USERS = [
  { email: "noor.halvorsen@brinewatch.example", name: "Noor Halvorsen", role: "owner" as const },
  { email: "teo.quillan@brinewatch.example", name: "Teo Quillan", role: "developer" as const },
  { email: "amara.lindqvist@brinewatch.example", name: "Amara Lindqvist", role: "billing" as const },
];
/** All three demo people sign in to the console with this password (or with an e-mail link). */
export const DEMO_PASSWORD = "tide-pool-2026";

const DAY = 86_400_000;
const ENDPOINTS: [string, string, number][] = [
  ["distance", "POST", 1],
  ["channels.bsc", "POST", 1],
  ["capacity", "POST", 1],
  ["links.ber", "POST", 1],
  ["usage", "GET", 0],
];

/** A small deterministic generator so the demo looks the same on every machine (mulberry32). */
function rng(seed: number) {
  return () => {
    seed = (seed + 0x6d2b79f5) | 0;
    let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** The demo's history, in days before the seed runs (fractions spread the changes over the working day); every row and ledger entry below takes its time from here. */
const HISTORY = {
  orgCreated: 120.3,
  teoInvited: 119.1,
  teoJoined: 118.85,
  amaraInvited: 111.2,
  amaraJoined: 110.9,
  amaraToBilling: 95.15,
  relayCreated: 90.05,
  modemCreated: 60.25,
  internCreated: 60.1,
  ciCreated: 45.2,
  benchCreated: 32.3,
  modemRevoked: 12.15,
  internExpired: 5,
  relayRotated: 2.1,
} as const;
/**
 * One finished simulation, started by the CI key days ago: the telemetry link's (7,4) Hamming code on a BSC over four
 * crossover probabilities, its counts computed by the engine with this seed (so the Simulations page has a curve at once).
 */
export const DEMO_SIMULATION = {
  days: 3.2,
  seconds: 4,
  request: { code: { family: "hamming", r: 3 }, channel: { type: "bsc" }, points: [0.02, 0.01, 0.005, 0.002], stop: { minBitErrors: 400, maxBits: 1e9 }, seed: 20261120 },
} as const;

/**
 * The firmware team's claims about the telemetry link, sent from CI with its key: days before the seed runs,
 * label, what they said, target and evidence (the bench rig's counts travel through CI too). Release 2.4.0
 * moved the buoys to a farther mooring, a noisier link (p from 1e-3 to 5e-3): its Hamming (7,4) claim is
 * refuted, the switch to Golay (23,12) holds, and the rig's first long run was too short to decide BER ≤ 1e-9.
 */
const CLAIMS = [
  {
    days: 27.3,
    label: "telemetry-fw/2.3.0",
    statement: "Hamming (7,4) keeps frame errors under 1e-4 at the harbour mooring",
    target: { metric: "fer", atMost: 1e-4 },
    evidence: { mode: "analytic", code: { family: "hamming", r: 3 }, channel: { type: "bsc", p: 1e-3 } },
  },
  { days: 26.2, label: "telemetry-fw/2.3.0", statement: "Bench rig soak, one night", target: { preset: "data" }, evidence: { mode: "measured", trials: 1e9, errors: 0 } },
  {
    days: 14.4,
    label: "telemetry-fw/2.4.0",
    statement: "Hamming (7,4) still keeps frame errors under 1e-4 at the far mooring",
    target: { metric: "fer", atMost: 1e-4 },
    evidence: { mode: "analytic", code: { family: "hamming", r: 3 }, channel: { type: "bsc", p: 5e-3 } },
  },
  {
    days: 13.1,
    label: "telemetry-fw/2.4.0",
    statement: "Golay (23,12) keeps frame errors under 1e-4 at the far mooring",
    target: { metric: "fer", atMost: 1e-4 },
    evidence: { mode: "analytic", code: { family: "golay" }, channel: { type: "bsc", p: 5e-3 } },
  },
  { days: 6.3, label: "telemetry-fw/2.4.0", statement: "Bench rig, five days at line rate", target: { metric: "ber", atMost: 1e-9 }, evidence: { mode: "measured", trials: 5e9, errors: 2 } },
  { days: 1.2, label: "telemetry-fw/2.4.1", statement: "Bench rig, after the clock-recovery fix", target: { metric: "ber", atMost: 1e-9 }, evidence: { mode: "measured", trials: 3.2e9, errors: 0 } },
] as const;

/** The shore station's relay overlap: the old key works for a week after the rotation. */
const RELAY_OVERLAP_HOURS = 7 * 24;

/**
 * Seed the demo org once; later runs leave it as it is, except to give the demo people passwords they lack. Returns the org id.
 *
 * The seed writes one history: each ledger entry at the time of the change it records, and in that
 * order; people join before they make keys; a key's last use is its latest metered call.
 */
export async function seedDemo(db: Db, now = new Date()): Promise<number> {
  const existing = await findOrgBySlug(db, DEMO_ORG.slug);
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  if (existing) {
    // Demo databases seeded before the console had passwords get them now.
    await db
      .updateTable("users")
      .set({ password_hash: passwordHash, email_verified: now.toISOString() })
      .where("email", "in", DEMO_USERS.map((u) => u.email))
      .where("password_hash", "is", null)
      .execute();
    return existing.id;
  }
  const ago = (days: number) => new Date(now.getTime() - days * DAY).toISOString();
  return db.transaction().execute(async (tx) => {
    const org = await tx
      .insertInto("orgs")
      .values({ ...DEMO_ORG, plan: "beacon", created_at: ago(HISTORY.orgCreated) })
      .returningAll()
      .executeTakeFirstOrThrow();
    const audit = (days: number, actorId: number, a: Omit<AuditInput, "orgId" | "actor" | "at">) => insertAudit(tx, { ...a, orgId: org.id, actor: `user:${actorId}`, at: ago(days) });
    const join = async (u: (typeof DEMO_USERS)[number], role: Role, days: number) => {
      const user = await tx
        .insertInto("users")
        .values({ email: u.email, name: u.name, created_at: ago(days), password_hash: passwordHash, email_verified: ago(days) })
        .returningAll()
        .executeTakeFirstOrThrow();
      await tx.insertInto("memberships").values({ org_id: org.id, user_id: user.id, role, created_at: ago(days) }).execute();
      return user;
    };
    // The owner founds the org and invites the other two by e-mail; each accepts within hours.
    const invite = async (email: string, role: Role, invitedDays: number, joinedDays: number) => {
      const inv = await tx
        .insertInto("invitations")
        .values({
          org_id: org.id,
          email,
          role,
          token_hash: createHash("sha256").update(randomBytes(32)).digest("hex"),
          invited_by_user_id: noor.id,
          created_at: ago(invitedDays),
          expires_at: ago(invitedDays - 7),
          accepted_at: ago(joinedDays),
          revoked_at: null,
        })
        .returningAll()
        .executeTakeFirstOrThrow();
      await audit(invitedDays, noor.id, { action: "member.invited", targetType: "invitation", targetId: inv.id, details: { email, role, replaced: [] } });
      return inv;
    };
    const [noorInfo, teoInfo, amaraInfo] = DEMO_USERS;
    const noor = await join(noorInfo!, "owner", HISTORY.orgCreated);
    await audit(HISTORY.orgCreated, noor.id, { action: "org.created", targetType: "org", targetId: org.id, details: { name: org.name, plan: org.plan } });
    const members = [];
    for (const [info, role, invited, joined] of [
      [teoInfo!, "developer", HISTORY.teoInvited, HISTORY.teoJoined],
      [amaraInfo!, "developer", HISTORY.amaraInvited, HISTORY.amaraJoined],
    ] as const) {
      const inv = await invite(info.email, role, invited, joined);
      const user = await join(info, role, joined);
      await audit(joined, user.id, { action: "member.joined", targetType: "user", targetId: user.id, details: { email: info.email, role, invitationId: inv.id } });
      members.push(user);
    }
    const [teo, amara] = members as [(typeof members)[number], (typeof members)[number]];
    // Amara joined to look at the API and took over the invoices a fortnight later.
    await tx.updateTable("memberships").set({ role: "billing" }).where("org_id", "=", org.id).where("user_id", "=", amara.id).execute();
    await audit(HISTORY.amaraToBilling, noor.id, { action: "member.role_changed", targetType: "user", targetId: amara.id, details: { email: amara.email, from: "developer", to: "billing" } });

    /** A key with a fresh secret nobody is shown, created at its time in the history with the ledger entry createKey would write. */
    const key = async (days: number, by: number, k: { name: string; mode: KeyMode; scopes: readonly string[]; expiresAt?: string }) => {
      const { prefix, hash } = generateKey(k.mode);
      const row = await insertApiKey(tx, {
        org_id: org.id,
        name: k.name,
        mode: k.mode,
        prefix,
        key_hash: hash,
        scopes: k.scopes.join(" "),
        created_by_user_id: by,
        created_at: ago(days),
        expires_at: k.expiresAt ?? null,
      });
      await audit(days, by, { action: "key.created", targetType: "api_key", targetId: row.id, details: { name: row.name, mode: row.mode, prefix, scopes: k.scopes, expiresAt: row.expires_at } });
      return row;
    };
    const oldRelay = await key(HISTORY.relayCreated, noor.id, { name: "shore station relay", mode: "live", scopes: ["compute"] });
    // Keys in the other states: one revoked after a leak drill, one that expired.
    const modem = await key(HISTORY.modemCreated, noor.id, { name: "modem v1 (retired)", mode: "test", scopes: allScopes });
    await key(HISTORY.internCreated, noor.id, { name: "summer intern trial", mode: "test", scopes: allScopes, expiresAt: ago(HISTORY.internExpired) });
    const ci = await key(HISTORY.ciCreated, teo.id, { name: "buoy firmware CI", mode: "live", scopes: allScopes });
    const bench = await key(HISTORY.benchCreated, teo.id, { name: "bench rig", mode: "test", scopes: ["compute"] });
    await tx.updateTable("api_keys").set({ revoked_at: ago(HISTORY.modemRevoked) }).where("id", "=", modem.id).execute();
    await audit(HISTORY.modemRevoked, noor.id, { action: "key.revoked", targetType: "api_key", targetId: modem.id, details: { prefix: modem.prefix } });
    // A live key in a rotation overlap: the shore station's relay key was replaced two days ago and
    // the old one keeps working for about five more days while the station picks up the new one.
    const oldEndsAt = new Date(Date.parse(ago(HISTORY.relayRotated)) + RELAY_OVERLAP_HOURS * 3600_000).toISOString();
    await tx.updateTable("api_keys").set({ expires_at: oldEndsAt }).where("id", "=", oldRelay.id).execute();
    const { prefix: newPrefix, hash: newHash } = generateKey("live");
    const newRelay = await insertApiKey(tx, {
      org_id: org.id,
      name: oldRelay.name,
      mode: "live",
      prefix: newPrefix,
      key_hash: newHash,
      scopes: oldRelay.scopes,
      created_by_user_id: noor.id,
      created_at: ago(HISTORY.relayRotated),
      expires_at: null,
      rotated_from_key_id: oldRelay.id,
    });
    await audit(HISTORY.relayRotated, noor.id, {
      action: "key.rotated",
      targetType: "api_key",
      targetId: oldRelay.id,
      details: { prefix: oldRelay.prefix, newKeyId: newRelay.id, newPrefix: newRelay.prefix, overlapHours: RELAY_OVERLAP_HOURS, oldKeyEndsAt: oldEndsAt },
    });

    // 30 days of CI traffic: heavier on weekdays, a few refused calls. The shore station still
    // calls with its old relay key a few times a day; the new one has not been used yet.
    const rand = rng(20261201);
    const rows: NewUsageEvent[] = [];
    for (let d = 29; d >= 0; d--) {
      const day = new Date(now.getTime() - d * DAY);
      const weekday = day.getUTCDay() % 6 !== 0;
      for (const [endpoint, method, cost] of ENDPOINTS) {
        const calls = Math.round((weekday ? 18 : 4) * (0.5 + rand()) * (endpoint === "usage" ? 0.2 : 1));
        const relayCalls = endpoint === "channels.bsc" ? 3 : 0;
        for (let c = 0; c < calls + relayCalls; c++) {
          const status = rand() < 0.04 ? 422 : 200;
          const at = new Date(day.getTime() - Math.floor(rand() * 8 * 3600_000));
          rows.push({
            org_id: org.id,
            api_key_id: c >= calls ? oldRelay.id : rand() < 0.8 ? ci.id : bench.id,
            endpoint,
            method,
            status,
            units: status === 200 ? cost : 0,
            duration_ms: Math.round((1 + rand() * 6) * 1000) / 1000,
            request_id: `req_seed${d}x${c}${endpoint.replace(/\W/g, "")}`,
            created_at: at.toISOString(),
            reported_at: null,
          });
        }
      }
    }
    // The claims, decided as POST /claims decides them (the same parsing and decision functions), each a metered call of the CI key.
    for (const [i, c] of CLAIMS.entries()) {
      const request = { label: c.label, statement: c.statement, target: targetInput.parse(c.target), confidence: 0.95, evidence: c.evidence.mode === "analytic" ? analyticEvidence.parse(c.evidence) : measuredEvidence.parse(c.evidence) };
      const target = resolveTarget(request.target);
      const decision = request.evidence.mode === "analytic" ? decideAnalytic(target, request.evidence) : decideMeasured(target, request.confidence, request.evidence);
      const at = ago(c.days);
      await tx
        .insertInto("claims")
        .values({ id: newJobId("clm"), org_id: org.id, api_key_id: ci.id, label: c.label, mode: request.evidence.mode, verdict: decision.verdict, request: JSON.stringify(request), outcome: JSON.stringify({ target, decision }), job_id: null, created_at: at, decided_at: at })
        .execute();
      rows.push({ org_id: org.id, api_key_id: ci.id, endpoint: "claims.create", method: "POST", status: 201, units: 1, duration_ms: 2.5, request_id: `req_seedclaim${i}`, created_at: at, reported_at: null });
    }
    // The simulation, run here by the engine as the job runner would have run it, and metered as a job is: 1 unit to start, its bits when it ended.
    {
      const input = { ...simulationRequest.parse(DEMO_SIMULATION.request), seed: DEMO_SIMULATION.request.seed } as SimulationJobInput;
      const sim = simulatorFor(input);
      const result: SimulationProgress = { points: input.points.map((_, i) => runPoint(sim, i, engineRules(input))) };
      const units = unitsForBits(result.points.reduce((a, p) => a + p.counts.infoBits, 0));
      const id = newJobId("sim");
      const [created, ended] = [ago(DEMO_SIMULATION.days), ago(DEMO_SIMULATION.days - DEMO_SIMULATION.seconds / 86_400)];
      await tx
        .insertInto("jobs")
        .values({ id, org_id: org.id, api_key_id: ci.id, kind: "simulation", input: JSON.stringify(input), status: "done", result: JSON.stringify(result), progress: JSON.stringify(result), units, attempts: 1, created_at: created, started_at: created, updated_at: ended, finished_at: ended })
        .execute();
      rows.push({ org_id: org.id, api_key_id: ci.id, endpoint: "simulations.create", method: "POST", status: 202, units: 1, duration_ms: 3.1, request_id: "req_seedsim0", created_at: created, reported_at: null });
      rows.push({ org_id: org.id, api_key_id: ci.id, endpoint: "jobs.simulation", method: "JOB", status: 200, units, duration_ms: DEMO_SIMULATION.seconds * 1000, request_id: id, created_at: ended, reported_at: null });
    }
    // Each row draws on the allowance of its key's mode: the bench rig's test key on the test allowance.
    const modeOf = new Map([ci, bench, oldRelay].map((k) => [k.id, k.mode]));
    for (const r of rows) r.mode = modeOf.get(r.api_key_id!) ?? "live";
    for (let i = 0; i < rows.length; i += 200) await tx.insertInto("usage_events").values(rows.slice(i, i + 200)).execute();
    // Each key was last used at its latest call; keys without calls were never used.
    for (const k of [ci, bench, oldRelay]) {
      const last = rows.filter((r) => r.api_key_id === k.id).reduce((a, r) => (r.created_at > a ? r.created_at : a), "");
      await tx.updateTable("api_keys").set({ last_used_at: last || null }).where("id", "=", k.id).execute();
    }
    return org.id;
  });
}
