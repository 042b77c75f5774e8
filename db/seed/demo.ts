import type { Db } from "@/db";
import type { NewApiKey } from "@/db/schema";
import { insertApiKey } from "@/db/queries/api-keys";
import { insertAuthUser } from "@/db/queries/auth";
import { insertAudit } from "@/db/queries/audit";
import { findOrgBySlug, insertOrg } from "@/db/queries/orgs";
import { insertMembership } from "@/db/queries/users";
import { createKey } from "@/lib/api/key-service";
import { generateKey } from "@/lib/api/keys";
import { allScopes } from "@/lib/api/scopes";
import { hashPassword } from "@/lib/auth/passwords";

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

/** A key row with a fresh secret nobody is shown, for the keys the seed backdates or puts straight into a state. */
async function insertSeedKey(tx: Db, row: Omit<NewApiKey, "prefix" | "key_hash">) {
  const { prefix, hash } = generateKey(row.mode);
  return insertApiKey(tx, { ...row, prefix, key_hash: hash });
}

/** Seed the demo org once; later runs leave it as it is, except to give the demo people passwords they lack. Returns the org id. */
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
  return db.transaction().execute(async (tx) => {
    const org = await insertOrg(tx, { ...DEMO_ORG, plan: "team" });
    const users = [];
    for (const u of DEMO_USERS) {
      const user = await insertAuthUser(tx, { email: u.email, name: u.name, passwordHash, emailVerified: now.toISOString() });
      await insertMembership(tx, { orgId: org.id, userId: user.id, role: u.role });
      users.push(user);
    }
    const dev = users[1]!.id;
    const ci = await createKey(tx, { orgId: org.id, name: "buoy firmware CI", mode: "live", scopes: allScopes, createdByUserId: dev }, `user:${dev}`);
    const bench = await createKey(tx, { orgId: org.id, name: "bench rig", mode: "test", scopes: ["compute"], createdByUserId: dev }, `user:${dev}`);
    // Keys in the other states: one revoked after a leak drill, one that expired.
    for (const [name, state] of [["modem v1 (retired)", "revoked"], ["summer intern trial", "expired"]] as const) {
      const k = await insertSeedKey(tx, {
        org_id: org.id,
        name,
        mode: "test",
        scopes: allScopes.join(" "),
        created_by_user_id: users[0]!.id,
        created_at: new Date(now.getTime() - 60 * DAY).toISOString(),
        expires_at: state === "expired" ? new Date(now.getTime() - 5 * DAY).toISOString() : null,
        revoked_at: state === "revoked" ? new Date(now.getTime() - 12 * DAY).toISOString() : null,
      });
      await insertAudit(tx, {
        orgId: org.id,
        actor: `user:${users[0]!.id}`,
        action: state === "revoked" ? "key.revoked" : "key.created",
        targetType: "api_key",
        targetId: k.id,
        details: { prefix: k.prefix, name, mode: "test" },
      });
    }
    // A live key in a rotation overlap: the shore station's relay key was replaced two days ago
    // and the old one keeps working for five more days while the station picks up the new one.
    const owner = users[0]!.id;
    const oldRelay = await insertSeedKey(tx, {
      org_id: org.id,
      name: "shore station relay",
      mode: "live",
      scopes: "compute",
      created_by_user_id: owner,
      created_at: new Date(now.getTime() - 90 * DAY).toISOString(),
      last_used_at: new Date(now.getTime() - 3 * 3600_000).toISOString(),
      expires_at: new Date(now.getTime() + 5 * DAY).toISOString(),
    });
    const newRelay = await insertSeedKey(tx, {
      org_id: org.id,
      name: "shore station relay",
      mode: "live",
      scopes: "compute",
      created_by_user_id: owner,
      created_at: new Date(now.getTime() - 2 * DAY).toISOString(),
      rotated_from_key_id: oldRelay.id,
    });
    await insertAudit(tx, {
      orgId: org.id,
      actor: `user:${owner}`,
      action: "key.rotated",
      targetType: "api_key",
      targetId: oldRelay.id,
      details: {
        prefix: oldRelay.prefix,
        newKeyId: newRelay.id,
        newPrefix: newRelay.prefix,
        overlapHours: 7 * 24,
        oldKeyEndsAt: oldRelay.expires_at,
      },
    });
    // The developer's keys predate the 30 days of traffic below.
    await tx.updateTable("api_keys").set({ created_at: new Date(now.getTime() - 45 * DAY).toISOString() }).where("id", "=", ci.record.id).execute();
    await tx.updateTable("api_keys").set({ created_at: new Date(now.getTime() - 32 * DAY).toISOString() }).where("id", "=", bench.record.id).execute();

    // 30 days of CI traffic: heavier on weekdays, a few refused calls.
    const rand = rng(20261201);
    const rows = [];
    for (let d = 29; d >= 0; d--) {
      const day = new Date(now.getTime() - d * DAY);
      const weekday = day.getUTCDay() % 6 !== 0;
      for (const [endpoint, method, cost] of ENDPOINTS) {
        const calls = Math.round((weekday ? 18 : 4) * (0.5 + rand()) * (endpoint === "usage" ? 0.2 : 1));
        for (let c = 0; c < calls; c++) {
          const status = rand() < 0.04 ? 422 : 200;
          const at = new Date(day.getTime() - Math.floor(rand() * 8 * 3600_000));
          rows.push({
            org_id: org.id,
            api_key_id: rand() < 0.8 ? ci.record.id : bench.record.id,
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
    for (let i = 0; i < rows.length; i += 200) await tx.insertInto("usage_events").values(rows.slice(i, i + 200)).execute();
    // Each key was last used at its latest call.
    for (const k of [ci.record, bench.record]) {
      const last = rows.filter((r) => r.api_key_id === k.id).reduce((a, r) => (r.created_at > a ? r.created_at : a), "");
      if (last) await tx.updateTable("api_keys").set({ last_used_at: last }).where("id", "=", k.id).execute();
    }
    return org.id;
  });
}
