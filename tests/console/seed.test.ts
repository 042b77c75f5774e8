/**
 * The demo scenario (db/seed/demo.ts) holds what the README promises a newcomer: three people
 * in three roles who can sign in with the listed password, keys in every state the console
 * shows, and 30 UTC days of traffic that is consistent with those keys.
 */
import { beforeAll, describe, expect, test } from "vitest";
import { getDb, type Db } from "@/db";
import { DEMO_ORG, DEMO_PASSWORD, DEMO_USERS, seedDemo } from "@/db/seed/demo";
import type { Org } from "@/db/schema";
import { verifyPassword } from "@/lib/auth/passwords";
import { listOrgKeys } from "@/lib/console/keys";

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

  test("seeding again changes nothing", async () => {
    const count = async (t: "users" | "api_keys" | "usage_events" | "audit_log") =>
      Number((await db.selectFrom(t).select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow()).n);
    const before = await Promise.all([count("users"), count("api_keys"), count("usage_events"), count("audit_log")]);
    expect(await seedDemo(db)).toBe(org.id);
    expect(await Promise.all([count("users"), count("api_keys"), count("usage_events"), count("audit_log")])).toEqual(before);
  });
});
