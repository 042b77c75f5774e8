import { sql } from "kysely";
import { describe, expect, it, vi } from "vitest";
import { databaseFile, openDb, type Db } from "@/db";
import { setOrgPlan } from "@/db/queries/billing";
import { insertJob } from "@/db/queries/jobs";
import { claimQuotaNotice, monthKey } from "@/db/queries/quota";
import { insertUsageEvent } from "@/db/queries/usage";
import type { KeyMode } from "@/db/schema";
import { createKey } from "@/lib/api/key-service";
import { recordUsage } from "@/lib/api/metering";
import { reserveQuota } from "@/lib/api/quota";
import { allScopes } from "@/lib/api/scopes";
import { announceAllowance } from "@/lib/billing/notices";
import { NOTICE_THRESHOLDS, PLANS } from "@/lib/billing/plans";
import { databaseQueue } from "@/lib/jobs/queue";
import { api, expectProblem, getQuery, postJson } from "../helpers/api";
import { makeConsoleOrg, sentMails } from "../helpers/console";
import { makeOrgWithKey } from "../helpers/fixtures";
import { finished, runnerForThisFile, until } from "../helpers/jobs";

vi.mock(import("@/lib/mail/send"), async (orig) => ({ ...(await orig()), sendMail: vi.fn(async () => {}) }));

/**
 * Monthly quotas by plan over HTTP. Every expected figure is worked out here from the plan catalogue's numbers
 * (allowance, overage, test allowance, bits per job) and the documented unit rules (a 1-bit distance call is 1 unit;
 * a simulation holds ⌈bound / 2^26⌉ units), never read back from a response. The reset instant is the first
 * millisecond of next month in UTC, computed with Date.UTC independently of the product's periodOf.
 */

const LANTERN = PLANS.lantern;
const BEACON = PLANS.beacon;
const ONE_UNIT = { a: "1011", b: "1001" };

const month = () => monthKey(new Date());
const monthStart = () => {
  const d = new Date();
  return new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), 1)).toISOString();
};
/** First instant of next month, UTC (Date.UTC rolls month 12 over into January of the next year). */
const nextReset = () => {
  const d = new Date();
  return new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + 1, 1)).toISOString();
};

let seeded = 0;
/** A usage row written straight into the ledger, as if an earlier call this month had cost `units`. */
async function seedLedger(db: Db, orgId: number, mode: KeyMode, units: number, keyId: number | null = null) {
  await insertUsageEvent(db, {
    org_id: orgId,
    api_key_id: keyId,
    endpoint: "distance",
    method: "POST",
    status: 200,
    units,
    duration_ms: 1,
    request_id: `seed-${process.pid}-${++seeded}`,
    created_at: new Date().toISOString(),
    reported_at: null,
    mode,
  });
}

/** The month's counter as stored; undefined before the org's first call made it. */
async function counter(db: Db, orgId: number, mode: KeyMode): Promise<number | undefined> {
  const row = await db.selectFrom("quota_counters").select("used").where("org_id", "=", orgId).where("mode", "=", mode).where("period", "=", month()).executeTakeFirst();
  return row?.used;
}

/** Sum of the org's usage rows of this month for a mode: the ledger the counter must agree with. */
async function ledger(db: Db, orgId: number, mode: KeyMode): Promise<number> {
  const r = await db
    .selectFrom("usage_events")
    .select(sql<number>`coalesce(sum(units), 0)`.as("u"))
    .where("org_id", "=", orgId)
    .where("mode", "=", mode)
    .where("created_at", ">=", monthStart())
    .executeTakeFirstOrThrow();
  return Number(r.u);
}

/** Units still held by the org's unfinished jobs. */
async function held(db: Db, orgId: number): Promise<number> {
  const r = await db.selectFrom("jobs").select(sql<number>`coalesce(sum(reserved_units), 0)`.as("u")).where("org_id", "=", orgId).where("status", "in", ["queued", "running"]).executeTakeFirstOrThrow();
  return Number(r.u);
}

const usageRows = (db: Db, orgId: number) => db.selectFrom("usage_events").selectAll().where("org_id", "=", orgId).orderBy("id").execute();

/** The allowance headers, as numbers where they are numbers. */
const quotaHeadersOf = (h: Record<string, string>) => ({ allowance: Number(h["units-allowance"]), used: Number(h["units-used"]), remaining: Number(h["units-remaining"]), reset: h["units-reset"] });

/** An uncoded BSC simulation whose bit bound is exactly `bits` (one point, 1-bit frames: ⌈maxBits / 1⌉ frames of 1 bit). */
const simOfBits = (bits: number) => ({ channel: { type: "bsc" }, points: [0.01], stop: { maxBits: bits }, seed: 1 });

describe("jobs settle with what they ran (runner in this process, for this block only)", () => {
  runnerForThisFile("quota-runner");

  it("after a small simulation ends, the counter equals the ledger and the job's units equal its usage row", async () => {
    const { db, org, auth } = await makeOrgWithKey({ plan: "lantern", mode: "live" });
    // Two points of at most 2^27 bits: bound 2^28 bits → the job holds ⌈2^28 / 2^26⌉ = 4 units while queued.
    const body = { channel: { type: "bsc" }, points: [0.01, 0.02], stop: { minBitErrors: 100, maxBits: 2 ** 27 }, seed: 20261203 };
    const res = await postJson("/api/v1/simulations", body, auth);
    expect(res.status, res.text).toBe(202);
    const done = await until(async () => (await getQuery(`/api/v1/simulations/${res.body.id}`, {}, auth)).body, finished, 30_000);
    expect(done.status).toBe("done");
    const job = await db.selectFrom("jobs").selectAll().where("id", "=", res.body.id).executeTakeFirstOrThrow();
    expect(job.reserved_units).toBe(Math.ceil((2 * 2 ** 27) / 2 ** 26));
    // One unit per started 2^26 information bits actually simulated.
    const bits = done.points.reduce((s: number, p: { counts: { infoBits: number } }) => s + p.counts.infoBits, 0);
    expect(job.units).toBe(Math.ceil(bits / 2 ** 26));
    // 100 bit errors at p = 0.01 and 0.02 come long before 2^27 bits a point: the charge is below what was held.
    expect(job.units).toBeLessThan(job.reserved_units);
    const rows = await usageRows(db, org.id);
    const jobRow = rows.filter((r) => r.endpoint === "jobs.simulation");
    expect(jobRow).toHaveLength(1);
    expect(jobRow[0]!.units).toBe(job.units);
    // The create call (1 unit) and the job's charge; the reservation is gone.
    expect(await counter(db, org.id, "live")).toBe(1 + job.units);
    expect(await counter(db, org.id, "live")).toBe(await ledger(db, org.id, "live"));
    expect(await held(db, org.id)).toBe(0);
  });
});

describe("the call that reaches the allowance, and the one after (Lantern, live)", () => {
  it("4,999 used → a 1-unit call answers 200 at 5,000 with remaining 0; the next is 402 and changes nothing", async () => {
    const { db, org, keyId, auth } = await makeOrgWithKey({ plan: "lantern", mode: "live" });
    await seedLedger(db, org.id, "live", LANTERN.includedUnits - 1, keyId);
    const ok = await postJson("/api/v1/distance", ONE_UNIT, auth);
    expect(ok.status, ok.text).toBe(200);
    expect(ok.headers["x-compute-units"]).toBe("1");
    expect(quotaHeadersOf(ok.headers)).toEqual({ allowance: LANTERN.includedUnits, used: LANTERN.includedUnits, remaining: 0, reset: nextReset() });

    const rowsBefore = (await usageRows(db, org.id)).length;
    const refused = await postJson("/api/v1/distance", ONE_UNIT, auth);
    const problem = expectProblem(refused, 402, "quota-exhausted") as ReturnType<typeof expectProblem> & { quota: unknown };
    expect(problem.quota).toEqual({ plan: "lantern", mode: "live", allowance: LANTERN.includedUnits, used: LANTERN.includedUnits, requested: 1, resetsAt: nextReset() });
    expect(problem.detail).toContain(nextReset());
    expect(quotaHeadersOf(refused.headers)).toEqual({ allowance: LANTERN.includedUnits, used: LANTERN.includedUnits, remaining: 0, reset: nextReset() });

    const rows = await usageRows(db, org.id);
    expect(rows).toHaveLength(rowsBefore + 1);
    expect([rows.at(-1)!.status, rows.at(-1)!.units, rows.at(-1)!.request_id]).toEqual([402, 0, refused.headers["x-request-id"]]);
    expect(await counter(db, org.id, "live")).toBe(LANTERN.includedUnits);
    expect(await ledger(db, org.id, "live")).toBe(LANTERN.includedUnits);
    // Test keys' allowance is untouched, and no job or reservation appeared.
    expect(await counter(db, org.id, "test")).toBeUndefined();
    expect(await db.selectFrom("jobs").select("id").where("org_id", "=", org.id).execute()).toEqual([]);

    // A free call (GET /usage costs 0 units) still answers with the allowance used up.
    const free = await getQuery("/api/v1/usage", {}, auth);
    expect(free.status, free.text).toBe(200);
    expect(quotaHeadersOf(free.headers)).toEqual({ allowance: LANTERN.includedUnits, used: LANTERN.includedUnits, remaining: 0, reset: nextReset() });
  });

  it("a simulation whose reservation is more than what is left is refused whole: 402, no job, counter unchanged; one that just fits is queued", async () => {
    const { db, org, keyId, auth } = await makeOrgWithKey({ plan: "lantern", mode: "live" });
    const used = 4_500;
    await seedLedger(db, org.id, "live", used, keyId);
    // The create call reserves its own 1 unit first, so the job may hold 5,000 − 4,500 − 1 = 499 units.
    const fits = LANTERN.includedUnits - used - 1;
    const tooBig = simOfBits((fits + 1) * 2 ** 26);
    const refused = await postJson("/api/v1/simulations", tooBig, auth);
    const problem = expectProblem(refused, 402, "quota-exhausted") as ReturnType<typeof expectProblem> & { quota: Record<string, unknown> };
    // `used` includes the create call's own unit, held while the job's reservation was tried.
    expect(problem.quota).toMatchObject({ plan: "lantern", mode: "live", allowance: LANTERN.includedUnits, requested: fits + 1, used: used + 1 });
    expect(await db.selectFrom("jobs").select("id").where("org_id", "=", org.id).execute()).toEqual([]);
    expect(await counter(db, org.id, "live")).toBe(used);
    expect(quotaHeadersOf(refused.headers).used).toBe(used);

    const ok = await postJson("/api/v1/simulations", simOfBits(fits * 2 ** 26), auth);
    expect(ok.status, ok.text).toBe(202);
    expect(quotaHeadersOf(ok.headers)).toMatchObject({ used: LANTERN.includedUnits, remaining: 0 });
    expect(await counter(db, org.id, "live")).toBe(LANTERN.includedUnits);
    expect(await held(db, org.id)).toBe(fits);
  });
});

describe("overage and test keys", () => {
  it("Beacon live at 39,999: calls go on past 40,000, billed as overage, with remaining 0", async () => {
    const { db, org, keyId, auth } = await makeOrgWithKey({ plan: "beacon", mode: "live" });
    await seedLedger(db, org.id, "live", BEACON.includedUnits - 1, keyId);
    const seen = [];
    for (let i = 0; i < 3; i++) {
      const res = await postJson("/api/v1/distance", ONE_UNIT, auth);
      expect(res.status, res.text).toBe(200);
      seen.push(quotaHeadersOf(res.headers));
    }
    expect(seen).toEqual([0, 1, 2].map((i) => ({ allowance: BEACON.includedUnits, used: BEACON.includedUnits + i, remaining: 0, reset: nextReset() })));
    expect(await counter(db, org.id, "live")).toBe(BEACON.includedUnits + 2);
    expect(await ledger(db, org.id, "live")).toBe(BEACON.includedUnits + 2);
  });

  it("on Beacon a test key draws on the test allowance only, and stops there (402, mode test) although the plan bills live overage", async () => {
    const { db, org, keyId, auth } = await makeOrgWithKey({ plan: "beacon", mode: "test" });
    const live = await createKey(db, { orgId: org.id, name: "live key", mode: "live", scopes: allScopes }, "system");
    const liveUsed = 100;
    await seedLedger(db, org.id, "live", liveUsed, live.record.id);
    await seedLedger(db, org.id, "test", BEACON.testUnits - 1, keyId);

    const last = await postJson("/api/v1/distance", ONE_UNIT, auth);
    expect(last.status, last.text).toBe(200);
    expect(quotaHeadersOf(last.headers)).toEqual({ allowance: BEACON.testUnits, used: BEACON.testUnits, remaining: 0, reset: nextReset() });
    expect(await counter(db, org.id, "test")).toBe(BEACON.testUnits);
    // The live counter is not even created by test-key calls.
    expect(await counter(db, org.id, "live")).toBeUndefined();

    const refused = await postJson("/api/v1/distance", ONE_UNIT, auth);
    const problem = expectProblem(refused, 402, "quota-exhausted") as ReturnType<typeof expectProblem> & { quota: unknown };
    expect(problem.quota).toEqual({ plan: "beacon", mode: "test", allowance: BEACON.testUnits, used: BEACON.testUnits, requested: 1, resetsAt: nextReset() });
    expect(await counter(db, org.id, "test")).toBe(BEACON.testUnits);

    // The live key of the same org sees its own allowance, with the live ledger's 100 units plus this call.
    const liveCall = await postJson("/api/v1/distance", ONE_UNIT, `Bearer ${live.key}`);
    expect(liveCall.status, liveCall.text).toBe(200);
    expect(quotaHeadersOf(liveCall.headers)).toEqual({ allowance: BEACON.includedUnits, used: liveUsed + 1, remaining: BEACON.includedUnits - liveUsed - 1, reset: nextReset() });
    expect(await counter(db, org.id, "test")).toBe(BEACON.testUnits);
  });
});

describe("allowance headers", () => {
  it("on a success, a 422 validation failure and a 404; not on a 401", async () => {
    const { db, org, keyId, auth } = await makeOrgWithKey({ plan: "lantern", mode: "live" });
    await seedLedger(db, org.id, "live", 1_234, keyId);
    const expected = (used: number) => ({ allowance: LANTERN.includedUnits, used, remaining: LANTERN.includedUnits - used, reset: nextReset() });

    const ok = await postJson("/api/v1/distance", ONE_UNIT, auth);
    expect(ok.status).toBe(200);
    expect(quotaHeadersOf(ok.headers)).toEqual(expected(1_235));
    const invalid = await postJson("/api/v1/distance", { a: "1", b: "10" }, auth);
    expectProblem(invalid, 422, "validation-failed");
    expect(quotaHeadersOf(invalid.headers)).toEqual(expected(1_235));
    const missing = await getQuery("/api/v1/simulations/sim-0000000000000000", {}, auth);
    expectProblem(missing, 404, "not-found");
    expect(quotaHeadersOf(missing.headers)).toEqual(expected(1_235));

    const anonymous = await postJson("/api/v1/distance", ONE_UNIT);
    expectProblem(anonymous, 401, "unauthenticated");
    for (const h of ["units-allowance", "units-used", "units-remaining", "units-reset"]) expect(anonymous.headers[h]).toBeUndefined();
  });
});

describe("allowance e-mails", () => {
  /** A console org (two owners, a developer, a billing admin, a spare developer) on `plan`, with a live key. */
  async function consoleOrgOn(plan: "lantern" | "beacon") {
    const f = await makeConsoleOrg();
    await setOrgPlan(f.db, f.org.id, plan);
    const live = await createKey(f.db, { orgId: f.org.id, name: "live key", mode: "live", scopes: allScopes }, "system");
    const mails = () => sentMails().filter((m) => [f.owner, f.coOwner, f.developer, f.billing, f.spare].some((p) => p.email === m.to));
    return { ...f, auth: `Bearer ${live.key}`, keyId: live.record.id, mails, billingTo: [f.owner.email, f.coOwner.email, f.billing.email].sort() };
  }
  const pct = (m: { subject: string }) => /(\d+) %/.exec(m.subject)?.[1];

  it("Beacon: crossing 80 % mails each owner and billing admin once; crossing 100 % mails them once more", async () => {
    const f = await consoleOrgOn("beacon");
    const at80 = 0.8 * BEACON.includedUnits;
    await seedLedger(f.db, f.org.id, "live", at80 - 1, f.keyId);
    expect((await postJson("/api/v1/distance", ONE_UNIT, f.auth)).status).toBe(200);
    const first = await until(async () => f.mails(), (m) => m.length >= 3, 5_000);
    expect(first.map((m) => m.to).sort()).toEqual(f.billingTo);
    expect(first.map(pct)).toEqual(["80", "80", "80"]);
    expect(first[0]!.text).toContain(`${at80.toLocaleString("en-US")} of the ${BEACON.includedUnits.toLocaleString("en-US")}`);

    // More calls past 80 %: no more mail. Then console work (no key) takes it to 39,999 and a call crosses 100 %.
    expect((await postJson("/api/v1/distance", ONE_UNIT, f.auth)).status).toBe(200);
    const consoleWork = BEACON.includedUnits - 1 - (at80 + 1);
    await recordUsage(f.db, { payer: { orgId: f.org.id, plan: "beacon", mode: "live" }, keyId: null, endpoint: "distance", method: "POST", status: 200, units: consoleWork, durationMs: 1, requestId: `console-${process.pid}`, at: new Date() });
    expect(await counter(f.db, f.org.id, "live")).toBe(BEACON.includedUnits - 1);
    expect((await postJson("/api/v1/distance", ONE_UNIT, f.auth)).status).toBe(200);
    const all = await until(async () => f.mails(), (m) => m.length >= 6, 5_000);
    expect((await postJson("/api/v1/distance", ONE_UNIT, f.auth)).status).toBe(200);
    const full = all.filter((m) => pct(m) === "100");
    expect(full.map((m) => m.to).sort()).toEqual(f.billingTo);
    // A paid plan goes on past its allowance at the overage price, in dollars and cents.
    expect(full[0]!.text).toContain(`$${(BEACON.overagePerUnit! / 100).toFixed(2)}`);
    expect(full[0]!.text).not.toMatch(/refused \(402\)/);
    const notices = await f.db.selectFrom("quota_notices").select(["threshold"]).where("org_id", "=", f.org.id).orderBy("threshold").execute();
    expect(notices.map((n) => n.threshold)).toEqual([80, 100]);
    // Still exactly one mail per person and threshold after the further calls (their notices would have been sent by now).
    await new Promise((r) => setTimeout(r, 200));
    const after = f.mails();
    expect(after).toHaveLength(6);
    expect(after.filter((m) => m.to === f.developer.email || m.to === f.spare.email)).toEqual([]);
    // Another process (its own connection, none of this one's memory) past both thresholds sends nothing either.
    const elsewhere = openDb(databaseFile());
    await announceAllowance(elsewhere, { orgId: f.org.id, plan: BEACON, month: month(), used: BEACON.includedUnits + 2, resetsAt: nextReset(), thresholds: NOTICE_THRESHOLDS });
    await elsewhere.destroy();
    expect(f.mails()).toHaveLength(6);
  });

  it("Lantern: the 100 % mail says live calls are now refused", async () => {
    const f = await consoleOrgOn("lantern");
    await seedLedger(f.db, f.org.id, "live", LANTERN.includedUnits - 1, f.keyId);
    expect((await postJson("/api/v1/distance", ONE_UNIT, f.auth)).status).toBe(200);
    // From 4,999 to 5,000 both thresholds are reached at once: both mails, to the three of them.
    const mails = await until(async () => f.mails(), (m) => m.length >= 6, 5_000);
    const full = mails.filter((m) => pct(m) === "100");
    expect(full.map((m) => m.to).sort()).toEqual(f.billingTo);
    expect(full[0]!.text).toMatch(/refused \(402\)/);
    expect(mails.filter((m) => pct(m) === "80").map((m) => m.to).sort()).toEqual(f.billingTo);
  });

  it("Lantern: a call refused short of the allowance sends the 100 % notice once, worded for what happened", async () => {
    const f = await consoleOrgOn("lantern");
    // The fixture's queued simulation would take Lantern's one job slot.
    await f.db.updateTable("jobs").set({ status: "cancelled" }).where("org_id", "=", f.org.id).execute();
    // 4,998 used (past 80 %, whose mail is not under test here); a call needing 3 units does not fit in the 2 left.
    await seedLedger(f.db, f.org.id, "live", LANTERN.includedUnits - 2, f.keyId);
    await claimQuotaNotice(f.db, f.org.id, month(), 80, new Date().toISOString());
    const three = { channel: { type: "bsc" }, points: [0.1], stop: { maxBits: 3 * 2 ** 26 - 64 }, seed: 1 };
    expectProblem(await postJson("/api/v1/simulations", three, f.auth), 402, "quota-exhausted");
    const mails = await until(async () => f.mails(), (m) => m.length >= 3, 5_000);
    expect(mails.map((m) => m.to).sort()).toEqual(f.billingTo);
    expect(mails[0]!.subject).toBe(`Paritas: ${f.org.name} has too few compute units left this month`);
    expect(mails[0]!.text).toContain(`${(LANTERN.includedUnits - 1).toLocaleString("en-US")} of the ${LANTERN.includedUnits.toLocaleString("en-US")}`);
    // A second refusal sends nothing more this month.
    expectProblem(await postJson("/api/v1/simulations", three, f.auth), 402, "quota-exhausted");
    await new Promise((r) => setTimeout(r, 200));
    expect(f.mails()).toHaveLength(3);
  });
});

describe("simulation budgets by plan (no runner: jobs stay queued)", () => {
  it("Lantern: over 2^36 bits → 422 work-limit naming a larger plan; a second job → 429; cancelling gives the reservation back", async () => {
    const { db, org, auth } = await makeOrgWithKey({ plan: "lantern", mode: "live" });
    const over = await postJson("/api/v1/simulations", simOfBits(LANTERN.maxBitsPerJob + 1), auth);
    const problem = expectProblem(over, 422, "work-limit") as ReturnType<typeof expectProblem> & { limit: Record<string, unknown> };
    expect(problem.limit).toMatchObject({ requested: LANTERN.maxBitsPerJob + 1, allowed: LANTERN.maxBitsPerJob });
    expect(problem.detail).toContain("Lantern");
    expect(problem.detail).toContain("Beacon");
    expect(await counter(db, org.id, "live")).toBe(0);

    // Exactly 2^36 bits is allowed and holds 2^36 / 2^26 = 1,024 units besides the create call's 1.
    const ok = await postJson("/api/v1/simulations", simOfBits(LANTERN.maxBitsPerJob), auth);
    expect(ok.status, ok.text).toBe(202);
    const reservation = LANTERN.maxBitsPerJob / 2 ** 26;
    expect(await counter(db, org.id, "live")).toBe(1 + reservation);
    expect(await held(db, org.id)).toBe(reservation);

    const second = await postJson("/api/v1/simulations", simOfBits(1000), auth);
    const limit = expectProblem(second, 429, "job-limit") as ReturnType<typeof expectProblem> & { limit: Record<string, unknown> };
    expect(limit.limit).toMatchObject({ allowed: LANTERN.maxActiveJobs });
    expect(await counter(db, org.id, "live")).toBe(1 + reservation);

    const cancelled = await api().delete(`/api/v1/simulations/${ok.body.id}`).set("authorization", auth);
    expect(cancelled.status, cancelled.text).toBe(200);
    expect(cancelled.body.status).toBe("cancelled");
    expect(quotaHeadersOf(cancelled.headers).used).toBe(1);
    expect(await counter(db, org.id, "live")).toBe(1);
    expect(await ledger(db, org.id, "live")).toBe(1);
  });
});

describe("the counter always equals the ledger", () => {
  it("a Beacon test key (it stops at its allowance, and Beacon allows several jobs) after successes, refusals, a replay, a validation failure and a queued job: counter = usage rows + units held by unfinished jobs", async () => {
    const { db, org, keyId, auth } = await makeOrgWithKey({ plan: "beacon", mode: "test" });
    await seedLedger(db, org.id, "test", BEACON.testUnits - 40, keyId);
    const statuses: number[] = [];
    const call = async (body: unknown, headers: Record<string, string> = {}) => statuses.push((await postJson("/api/v1/distance", body, auth, headers)).status);
    await call(ONE_UNIT);
    await call(ONE_UNIT, { "idempotency-key": "quota-replay-1" });
    await call(ONE_UNIT, { "idempotency-key": "quota-replay-1" });
    await call({ a: "1", b: "10" });
    // A queued job holding 30 · 2^26 / 2^26 = 30 units, plus its 1-unit create call: 9,960 + 2 + 31 = 9,993 used.
    statuses.push((await postJson("/api/v1/simulations", simOfBits(30 * 2 ** 26), auth)).status);
    // A job needing 10 more when 7 are left is refused whole.
    statuses.push((await postJson("/api/v1/simulations", simOfBits(10 * 2 ** 26), auth)).status);
    for (let i = 0; i < 8; i++) await call(ONE_UNIT);
    expect(statuses).toEqual([200, 200, 200, 422, 202, 402, ...Array<number>(7).fill(200), 402]);
    expect(await counter(db, org.id, "test")).toBe(BEACON.testUnits);
    expect(await held(db, org.id)).toBe(30);
    expect(await counter(db, org.id, "test")).toBe((await ledger(db, org.id, "test")) + (await held(db, org.id)));
  });
});

describe("concurrency", () => {
  it("20 parallel calls with 10 units left: exactly 10 succeed, 10 get 402, the counter ends at the allowance", async () => {
    const { db, org, keyId, auth } = await makeOrgWithKey({ plan: "lantern", mode: "live" });
    await seedLedger(db, org.id, "live", LANTERN.includedUnits - 10, keyId);
    const results = await Promise.all(Array.from({ length: 20 }, () => postJson("/api/v1/distance", ONE_UNIT, auth)));
    const statuses = results.map((r) => r.status).sort();
    expect(statuses).toEqual([...Array<number>(10).fill(200), ...Array<number>(10).fill(402)]);
    expect(await counter(db, org.id, "live")).toBe(LANTERN.includedUnits);
    expect(await ledger(db, org.id, "live")).toBe(LANTERN.includedUnits);
    expect((await usageRows(db, org.id)).filter((r) => r.status === 402 && r.units === 0)).toHaveLength(10);
  });
});

describe("counters made while a usage row is written", () => {
  it("a job queued last month and ending this month: last month gets its reservation back, this month counts the charge once", async () => {
    const { db, org, keyId } = await makeOrgWithKey({ plan: "beacon", mode: "live" });
    const now = new Date();
    const lastMonth = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth() - 1, 15));
    const payer = { orgId: org.id, plan: "beacon", mode: "live" as const };
    // As enqueueSimulation does, but last month: 10 units held, the job running under a lease.
    await reserveQuota(db, payer, 10, lastMonth);
    const id = "sim-quotamonthend00";
    await insertJob(db, {
      id,
      org_id: org.id,
      api_key_id: keyId,
      kind: "simulation",
      input: JSON.stringify(simOfBits(10 * 2 ** 26)),
      status: "running",
      created_at: lastMonth.toISOString(),
      updated_at: lastMonth.toISOString(),
      started_at: lastMonth.toISOString(),
      lease_holder: "quota-holder",
      lease_expires_at: new Date(now.getTime() + 60_000).toISOString(),
      reserved_units: 10,
    });
    expect(await databaseQueue(db).finish(id, "quota-holder", { status: "done", units: 3 })).toBe(true);
    const before = await db.selectFrom("quota_counters").select("used").where("org_id", "=", org.id).where("period", "=", monthKey(lastMonth)).executeTakeFirstOrThrow();
    expect(before.used).toBe(0);
    expect(await ledger(db, org.id, "live")).toBe(3);
    expect(await counter(db, org.id, "live")).toBe(3);
  });

  it("usage recorded without a reservation as the month's first row is counted once", async () => {
    const { db, org } = await makeOrgWithKey({ plan: "beacon", mode: "live" });
    const state = await recordUsage(db, { payer: { orgId: org.id, plan: "beacon", mode: "live" }, keyId: null, endpoint: "distance", method: "POST", status: 200, units: 5, durationMs: 1, requestId: `first-${process.pid}`, at: new Date() });
    expect(await ledger(db, org.id, "live")).toBe(5);
    expect(await counter(db, org.id, "live")).toBe(5);
    expect(state.used).toBe(5);
  });
});
