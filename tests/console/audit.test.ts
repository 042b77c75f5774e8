import { beforeAll, describe, expect, it, vi } from "vitest";
import { insertAudit } from "@/db/queries/audit";
import { expectFieldError } from "../helpers/api";
import { consoleCall, makeConsoleOrg, type ConsoleFixture } from "../helpers/console";

vi.mock(import("@/lib/mail/send"), async (orig) => ({ ...(await orig()), sendMail: vi.fn(async () => {}) }));

interface Entry {
  id: number;
  at: string;
  actor: { kind: string; id: string; userId?: number; email?: string };
  action: string;
  targetType: string;
  targetId: string;
  details: Record<string, unknown>;
}

let fx: ConsoleFixture;
/** Actions this file performs through the console, in order. */
const performed: string[] = [];
let newKeyId: number;

beforeAll(async () => {
  fx = await makeConsoleOrg();
  const org = `/api/console/orgs/${fx.org.slug}`;
  const ok = async (res: Awaited<ReturnType<typeof consoleCall>>, action: string) => {
    expect(res.status, res.text).toBeLessThan(300);
    performed.push(action);
    return res;
  };
  await ok(await consoleCall("POST", `${org}/invitations`, { cookie: fx.owner.cookie, body: { email: "audit.new@example.com", role: "developer" } }), "member.invited");
  newKeyId = (await ok(await consoleCall("POST", `${org}/keys`, { cookie: fx.developer.cookie, body: { name: "audited", scopes: ["compute"], mode: "test" } }), "key.created")).body.record.id;
  await ok(await consoleCall("POST", `${org}/keys/${newKeyId}/rotate`, { cookie: fx.developer.cookie, body: { overlapHours: 2 } }), "key.rotated");
  await ok(await consoleCall("POST", `${org}/keys/${newKeyId}/revoke`, { cookie: fx.owner.cookie }), "key.revoked");
  await ok(await consoleCall("PATCH", `${org}/members/${fx.spare.id}`, { cookie: fx.owner.cookie, body: { role: "billing" } }), "member.role_changed");
  await ok(await consoleCall("DELETE", `${org}/invitations/${fx.invitation.id}`, { cookie: fx.coOwner.cookie }), "invitation.revoked");
  await ok(await consoleCall("DELETE", `${org}/members/${fx.spare.id}`, { cookie: fx.owner.cookie }), "member.removed");
  await ok(await consoleCall("POST", `${org}/transfer`, { cookie: fx.coOwner.cookie, body: { userId: fx.billing.id } }), "org.ownership_transferred");
  // Scripts act too.
  for (const actor of ["cli", "demo", "bench", "system"]) {
    await insertAudit(fx.db, { orgId: fx.org.id, actor, action: "key.created", targetType: "api_key", targetId: 1 });
    performed.push("key.created");
  }
});

const audit = async (query: Record<string, string | number> = {}): Promise<{ entries: Entry[]; nextCursor: string | null }> => {
  const qs = new URLSearchParams(Object.entries(query).map(([k, v]) => [k, String(v)])).toString();
  const res = await consoleCall("GET", `/api/console/orgs/${fx.org.slug}/audit${qs ? `?${qs}` : ""}`, { cookie: fx.owner.cookie });
  expect(res.status, res.text).toBe(200);
  return res.body;
};

/** Every entry, page by page. */
async function everything(query: Record<string, string | number> = {}): Promise<Entry[]> {
  const all: Entry[] = [];
  let cursor: string | null = null;
  do {
    const page: { entries: Entry[]; nextCursor: string | null } = await audit({ ...query, limit: 3, ...(cursor ? { cursor } : {}) });
    all.push(...page.entries);
    cursor = page.nextCursor;
  } while (cursor);
  return all;
}

describe("the audit log", () => {
  it("has one entry per change, newest first; the fixture's own keys come first in time", async () => {
    const entries = await everything();
    const mine = entries.slice(0, performed.length).map((e) => e.action);
    expect(mine).toEqual([...performed].reverse());
    // Before them: the three keys the fixture created.
    expect(entries.slice(performed.length).map((e) => e.action)).toEqual(["key.created", "key.created", "key.created"]);
    const ids = entries.map((e) => e.id);
    expect(ids).toEqual([...ids].sort((a, b) => b - a));
    expect(new Set(ids).size).toBe(ids.length);
  });

  it("resolves actors: people to their e-mail, the CLI, and the product's own scripts as system", async () => {
    const { entries } = await audit({ limit: 200 });
    const rotated = entries.find((e) => e.action === "key.rotated")!;
    expect(rotated.actor).toEqual({ kind: "user", id: `user:${fx.developer.id}`, userId: fx.developer.id, email: fx.developer.email });
    expect(rotated).toMatchObject({ targetType: "api_key", targetId: String(newKeyId), details: { overlapHours: 2 } });
    expect(rotated.at).toMatch(/^\d{4}-\d\d-\d\dT/);
    const scripted = entries.slice(0, 4).map((e) => e.actor);
    expect(scripted).toEqual([
      { kind: "system", id: "system" },
      { kind: "system", id: "bench" },
      { kind: "system", id: "demo" },
      { kind: "cli", id: "cli" },
    ]);
  });

  it("filters by action and by actor, separately and together", async () => {
    const rotations = await everything({ action: "key.rotated" });
    expect(rotations.map((e) => e.action)).toEqual(["key.rotated"]);
    const byOwner = await everything({ actor: `user:${fx.owner.id}` });
    expect(byOwner.map((e) => e.action)).toEqual(["member.removed", "member.role_changed", "key.revoked", "member.invited", "key.created"]);
    const both = await everything({ actor: `user:${fx.owner.id}`, action: "key.created" });
    expect(both).toHaveLength(1);
    expect(both[0]!.targetId).toBe(String(fx.keys.owner.record.id));
    expect(await everything({ actor: "cli" })).toHaveLength(1);
    expect(await everything({ action: "no.such_action" })).toEqual([]);
  });

  it("pages with a cursor; empty filter parameters count as absent", async () => {
    const first = await audit({ limit: 2, actor: "", action: "" });
    expect(first.entries).toHaveLength(2);
    expect(first.nextCursor).toEqual(expect.any(String));
    const second = await audit({ limit: 2, cursor: first.nextCursor! });
    expect(second.entries[0]!.id).toBeLessThan(first.entries[1]!.id);
    const all = await audit({ limit: 200 });
    expect(all.nextCursor).toBeNull();
    expect(all.entries.slice(0, 4).map((e) => e.id)).toEqual([...first.entries, ...second.entries].map((e) => e.id));
  });

  it("shows only the org's own entries", async () => {
    const { entries } = await audit({ limit: 200 });
    const other = await fx.db.selectFrom("audit_log").select("id").where("org_id", "=", fx.other.id).execute();
    expect(other.length).toBeGreaterThan(0);
    const ids = new Set(entries.map((e) => e.id));
    for (const o of other) expect(ids.has(o.id)).toBe(false);
  });

  it.each([
    ["a cursor it did not issue", { cursor: "bm90LWEtY3Vyc29y" }, "/cursor"],
    ["a limit of 0", { limit: 0 }, "/limit"],
    ["a limit over 200", { limit: 201 }, "/limit"],
    ["a malformed actor", { actor: "user:abc" }, "/actor"],
    ["a malformed action", { action: "DROP TABLE" }, "/action"],
  ])("422 for %s", async (_name, query, pointer) => {
    const qs = new URLSearchParams(Object.entries(query).map(([k, v]) => [k, String(v)])).toString();
    expectFieldError(await consoleCall("GET", `/api/console/orgs/${fx.org.slug}/audit?${qs}`, { cookie: fx.owner.cookie }), pointer);
  });
});
