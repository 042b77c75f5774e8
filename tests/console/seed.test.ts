/**
 * The demo scenario (db/seed/demo.ts) holds what the README promises a newcomer: three people
 * in three roles who can sign in with the listed password, keys in every state the console
 * shows, 30 UTC days of traffic that is consistent with those keys, and one history that the
 * ledger, the people and the keys tell alike.
 */
import { beforeAll, describe, expect, test } from "vitest";
import { getDb, type Db } from "@/db";
import { DEMO_ORG, DEMO_PASSWORD, DEMO_SIMULATION, DEMO_USERS, seedDemo } from "@/db/seed/demo";
import type { Org } from "@/db/schema";
import { verifyPassword } from "@/lib/auth/passwords";
import { listAuditEntries } from "@/lib/console/audit";
import { listOrgClaims } from "@/lib/console/claims";
import { listOrgKeys } from "@/lib/console/keys";
import { listOrgSimulations, orgSimulation } from "@/lib/console/simulations";
import { clopperPearson } from "../helpers/sim-interval";

let db: Db;
let org: Org;
const now = new Date();

beforeAll(async () => {
  db = await getDb();
  await seedDemo(db, now);
  org = await db.selectFrom("orgs").selectAll().where("slug", "=", DEMO_ORG.slug).executeTakeFirstOrThrow();
});

const people = () =>
  db
    .selectFrom("memberships")
    .innerJoin("users", "users.id", "memberships.user_id")
    .select(["users.id", "users.email", "users.password_hash", "memberships.role"])
    .where("memberships.org_id", "=", org.id)
    .execute();

async function owner() {
  const o = (await people()).find((p) => p.role === "owner")!;
  return { id: o.id, email: o.email, role: o.role };
}

describe("demo scenario", () => {
  test("one owner, one developer and one billing admin, each opened by the documented password", async () => {
    const members = await people();
    expect(members.map((m) => [m.email, m.role]).sort()).toEqual(DEMO_USERS.map((u) => [u.email, u.role]).sort());
    for (const m of members) expect(await verifyPassword(DEMO_PASSWORD, m.password_hash), m.email).toBe(true);
    expect(await verifyPassword("tide-pool-2025", members[0]!.password_hash)).toBe(false);
  });

  test("keys in every state the console lists, the rotated pair linked", async () => {
    const keys = await listOrgKeys(db, org, await owner());
    expect(new Set(keys.map((k) => k.state))).toEqual(new Set(["active", "expiring", "revoked", "expired"]));
    const expiring = keys.filter((k) => k.state === "expiring");
    expect(expiring).toHaveLength(1);
    const successor = keys.find((k) => k.rotatedFromKeyId === expiring[0]!.id);
    expect(successor?.state).toBe("active");
    expect(successor?.name).toBe(expiring[0]!.name);
    expect(Date.parse(expiring[0]!.expiresAt!)).toBeGreaterThan(now.getTime());
  });

  test("30 UTC days of traffic, none in the future, each call made by a key that existed then", async () => {
    const events = await db.selectFrom("usage_events").selectAll().where("org_id", "=", org.id).execute();
    const days = new Set(events.map((e) => e.created_at.slice(0, 10)));
    expect(days.size).toBeGreaterThanOrEqual(29); // 30 days back from `now`, which may sit early in a UTC day
    expect(days.size).toBeLessThanOrEqual(31);
    expect(events.every((e) => Date.parse(e.created_at) <= now.getTime())).toBe(true);
    const created = new Map((await db.selectFrom("api_keys").select(["id", "created_at", "last_used_at"]).execute()).map((k) => [k.id, k]));
    for (const e of events) expect(Date.parse(e.created_at)).toBeGreaterThanOrEqual(Date.parse(created.get(e.api_key_id!)!.created_at));
    // A key's "last used" is its latest call.
    for (const id of new Set(events.map((e) => e.api_key_id!))) {
      const latest = events.filter((e) => e.api_key_id === id).reduce((a, e) => (e.created_at > a ? e.created_at : a), "");
      expect(created.get(id)!.last_used_at).toBe(latest);
    }
    // Refused calls cost nothing (DESIGN.md's metering rule).
    expect(events.filter((e) => e.status >= 400).every((e) => e.units === 0)).toBe(true);
  });

  test("every key's last use is its latest call, and a key without calls was never used", async () => {
    const keys = await db.selectFrom("api_keys").select(["id", "name", "last_used_at"]).where("org_id", "=", org.id).execute();
    const events = await db.selectFrom("usage_events").select(["api_key_id", "created_at"]).where("org_id", "=", org.id).execute();
    for (const k of keys) {
      const latest = events.filter((e) => e.api_key_id === k.id).reduce<string | null>((a, e) => (a === null || e.created_at > a ? e.created_at : a), null);
      expect(k.last_used_at, k.name).toBe(latest);
    }
    // The story has both: keys in use and one never used (the relay's successor, not yet picked up).
    expect(keys.some((k) => k.last_used_at === null)).toBe(true);
    expect(keys.filter((k) => k.last_used_at !== null).length).toBeGreaterThanOrEqual(3);
  });

  test("the ledger records each change at its time, in order, and people join before they make keys", async () => {
    const entries = await db.selectFrom("audit_log").selectAll().where("org_id", "=", org.id).orderBy("id").execute();
    const keys = await db.selectFrom("api_keys").selectAll().where("org_id", "=", org.id).execute();
    const memberships = await db.selectFrom("memberships").selectAll().where("org_id", "=", org.id).execute();
    const invitations = await db.selectFrom("invitations").selectAll().where("org_id", "=", org.id).execute();
    const joinedAt = new Map(memberships.map((m) => [m.user_id, m.created_at]));
    const details = (e: (typeof entries)[number]) => JSON.parse(e.details) as Record<string, unknown>;
    const of = (action: string) => entries.filter((e) => e.action === action);

    // Newest id is the newest change, and nothing happened after the seed ran.
    const times = entries.map((e) => e.created_at);
    expect(times).toEqual([...times].sort());
    expect(Date.parse(times.at(-1)!)).toBeLessThanOrEqual(now.getTime());
    // The history is spread over months, not written in one instant.
    expect(Date.parse(times.at(-1)!) - Date.parse(times[0]!)).toBeGreaterThan(90 * 86_400_000);

    const founded = of("org.created");
    expect(founded).toHaveLength(1);
    expect(founded[0]!.created_at).toBe(org.created_at);
    expect(founded[0]!.actor).toBe(`user:${(await owner()).id}`);
    expect(joinedAt.get((await owner()).id)).toBe(org.created_at);

    // Everyone else came in through an invitation: invited, then joined when they accepted it.
    expect(of("member.joined")).toHaveLength(memberships.length - 1);
    for (const j of of("member.joined")) {
      const inv = invitations.find((i) => i.id === details(j).invitationId)!;
      expect(j.actor).toBe(`user:${j.target_id}`);
      expect(j.created_at).toBe(joinedAt.get(Number(j.target_id)));
      expect(j.created_at).toBe(inv.accepted_at);
      const invited = of("member.invited").find((e) => e.target_id === String(inv.id))!;
      expect(invited.created_at).toBe(inv.created_at);
      expect(invited.created_at < j.created_at).toBe(true);
    }
    // Role changes end in the role people hold now.
    for (const m of memberships) {
      const last = of("member.role_changed").filter((e) => e.target_id === String(m.user_id)).at(-1);
      if (last) expect(details(last).to).toBe(m.role);
    }
    expect(of("member.role_changed").length).toBeGreaterThan(0);

    for (const k of keys) {
      // Each key starts with one entry by its creator at its creation: created, or rotated into being.
      const start = k.rotated_from_key_id === null ? of("key.created").filter((e) => e.target_id === String(k.id)) : of("key.rotated").filter((e) => details(e).newKeyId === k.id);
      expect(start, k.name).toHaveLength(1);
      expect(start[0]!.created_at, k.name).toBe(k.created_at);
      expect(start[0]!.actor, k.name).toBe(`user:${k.created_by_user_id}`);
      expect(joinedAt.get(k.created_by_user_id!)! < k.created_at, `${k.name} made after its creator joined`).toBe(true);
      const revoked = of("key.revoked").filter((e) => e.target_id === String(k.id));
      expect(revoked.map((e) => e.created_at), k.name).toEqual(k.revoked_at ? [k.revoked_at] : []);
      if (k.rotated_from_key_id !== null) {
        const old = keys.find((o) => o.id === k.rotated_from_key_id)!;
        expect(details(start[0]!)).toMatchObject({ prefix: old.prefix, newPrefix: k.prefix, oldKeyEndsAt: old.expires_at });
        expect(Date.parse(old.expires_at!) - Date.parse(k.created_at)).toBe((details(start[0]!).overlapHours as number) * 3600_000);
      }
    }
    // Every entry is one of the above.
    expect(new Set(entries.map((e) => e.action))).toEqual(new Set(["org.created", "member.invited", "member.joined", "member.role_changed", "key.created", "key.revoked", "key.rotated"]));
  });

  test("each actor has one name: the ledger calls people by their names, and keys by the creator the keys page shows", async () => {
    const { entries } = await listAuditEntries(db, org, { limit: 200 });
    const users = await db.selectFrom("users").select(["id", "name"]).where("email", "in", DEMO_USERS.map((u) => u.email)).execute();
    const names = new Map(users.map((u) => [`user:${u.id}`, u.name]));
    for (const e of entries) {
      expect(e.actor.kind).toBe("user");
      expect(e.actor.name).toBe(names.get(e.actor.id));
      // The sentence opens with the same name.
      expect(e.sentence[0]).toMatchObject({ text: e.actor.name });
    }
    const keys = await listOrgKeys(db, org, await owner());
    for (const k of keys) {
      const start = entries.find((e) => (e.action === "key.created" && e.targetId === String(k.id)) || (e.action === "key.rotated" && e.details.newKeyId === k.id))!;
      expect(start.actor.id, k.name).toBe(`user:${k.createdBy!.id}`);
    }
  });

  test("claims about the telemetry link: each verdict, the numbers behind them true, each made by a key that could then, as a metered call", async () => {
    const claims = await db.selectFrom("claims").selectAll().where("org_id", "=", org.id).orderBy("created_at").execute();
    expect(new Set(claims.map((c) => c.verdict))).toEqual(new Set(["supported", "refuted", "inconclusive"]));
    expect(new Set(claims.map((c) => c.label)).size).toBeGreaterThanOrEqual(2);
    const keys = new Map((await db.selectFrom("api_keys").selectAll().where("org_id", "=", org.id).execute()).map((k) => [k.id, k]));
    const calls = await db.selectFrom("usage_events").selectAll().where("org_id", "=", org.id).where("endpoint", "=", "claims.create").execute();
    expect(calls).toHaveLength(claims.length);
    for (const c of claims) {
      const key = keys.get(c.api_key_id!)!;
      expect(key.scopes.split(" "), c.label).toContain("claims");
      expect(key.created_at < c.created_at && (key.revoked_at === null || c.created_at < key.revoked_at)).toBe(true);
      expect(Date.parse(c.created_at)).toBeLessThanOrEqual(now.getTime());
      expect(c.decided_at).toBe(c.created_at);
      expect(calls.filter((e) => e.api_key_id === c.api_key_id && e.created_at === c.created_at && e.status === 201 && e.units === 1)).toHaveLength(1);
    }

    // The numbers, against formulas written out here: a t-error-correcting code fails when more than t of n bits
    // flip (binomial tail), and 0 errors in N bits bound the BER by 1 − 0.05^(1/N) ≈ −ln(0.05)/N at 95 % (rule of three, REFERENCES.md).
    const choose = (n: number, j: number): number => (j === 0 ? 1 : (choose(n, j - 1) * (n - j + 1)) / j);
    const fails = (n: number, t: number, p: number) => 1 - Array.from({ length: t + 1 }, (_, j) => choose(n, j) * p ** j * (1 - p) ** (n - j)).reduce((a, b) => a + b, 0);
    const { claims: shown, labels } = await listOrgClaims(db, org, { limit: 100 });
    expect(shown).toHaveLength(claims.length);
    const near = (a: number, b: number) => Math.abs(a - b) / b < 1e-6;
    for (const c of shown) {
      const e = c.evidence as { mode: string; code?: { family: string }; channel?: { p: number }; trials?: number; errors?: number };
      if (e.code?.family === "hamming") {
        expect(near(c.rate!, fails(7, 1, e.channel!.p)), c.label).toBe(true);
      } else if (e.code?.family === "golay") {
        expect(near(c.rate!, fails(23, 3, e.channel!.p)), c.label).toBe(true);
      } else if (e.errors === 0) {
        expect(Math.abs(c.interval!.upper - -Math.log(0.05) / e.trials!) / c.interval!.upper).toBeLessThan(1e-6);
      }
      expect(c.verdict === "supported", `${c.label}: ${c.reasoning}`).toBe(c.rate! <= c.target.atMost && c.interval!.upper <= c.target.atMost);
    }
    // The story: Hamming (7,4) fails its target on the noisier link, Golay (23,12) holds, the rig's 2 errors in 5·10⁹ bits cannot decide BER ≤ 1e-9.
    const of = (family: string, p: number) => shown.find((c) => (c.evidence as { code?: { family: string }; channel?: { p: number } }).code?.family === family && (c.evidence as { channel: { p: number } }).channel.p === p);
    expect(of("hamming", 1e-3)?.verdict).toBe("supported");
    expect(of("hamming", 5e-3)?.verdict).toBe("refuted");
    expect(of("golay", 5e-3)?.verdict).toBe("supported");
    expect(shown.find((c) => c.verdict === "inconclusive")?.moreTrialsToDecide).toBeGreaterThan(0);
    // Each label's latest verdict is that of its newest claim.
    for (const l of labels) expect(l.latestVerdict).toBe(shown.find((c) => c.label === l.label)!.verdict);
  });

  test("one finished simulation with a curve to show: the (7,4) Hamming FER inside its 99 % interval at every p, metered to the key that started it", async () => {
    const { simulations } = await listOrgSimulations(db, org, { limit: 20 });
    expect(simulations).toHaveLength(1);
    const sim = await orgSimulation(db, org, simulations[0]!.id);
    expect(sim).toMatchObject({ status: "done", progress: 1, seed: DEMO_SIMULATION.request.seed, code: { n: 7, k: 4 } });
    expect(Date.parse(sim.createdAt)).toBeLessThan(now.getTime());
    for (const pt of sim.points) {
      expect(pt.stoppedBy).toBe("minBitErrors");
      // A perfect single-error-correcting code fails on two or more flips: FER = 1 − (1−p)^7 − 7p(1−p)^6 (Hamming 1950); 99 % Clopper–Pearson (Clopper & Pearson 1934).
      const fer = 1 - (1 - pt.x) ** 7 - 7 * pt.x * (1 - pt.x) ** 6;
      const [lo, hi] = clopperPearson(pt.counts.frameErrors, pt.counts.frames, 0.99);
      expect(fer, `p = ${pt.x}`).toBeGreaterThan(lo);
      expect(fer, `p = ${pt.x}`).toBeLessThan(hi);
    }
    const row = await db.selectFrom("jobs").selectAll().where("id", "=", sim.id).executeTakeFirstOrThrow();
    const metered = await db.selectFrom("usage_events").selectAll().where("org_id", "=", org.id).where("endpoint", "in", ["simulations.create", "jobs.simulation"]).execute();
    expect(metered.map((e) => [e.endpoint, e.api_key_id, e.units]).sort()).toEqual([
      ["jobs.simulation", row.api_key_id, Math.ceil(sim.points.reduce((a, q) => a + q.counts.infoBits, 0) / 2 ** 26)],
      ["simulations.create", row.api_key_id, 1],
    ]);
  });

  test("seeding again changes nothing", async () => {
    const count = async (t: "users" | "api_keys" | "usage_events" | "audit_log" | "claims" | "jobs") =>
      Number((await db.selectFrom(t).select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow()).n);
    const before = await Promise.all([count("users"), count("api_keys"), count("usage_events"), count("audit_log"), count("claims"), count("jobs")]);
    expect(await seedDemo(db)).toBe(org.id);
    expect(await Promise.all([count("users"), count("api_keys"), count("usage_events"), count("audit_log"), count("claims"), count("jobs")])).toEqual(before);
  });
});
