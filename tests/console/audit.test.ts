import { readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { beforeAll, describe, expect, it, vi } from "vitest";
import { insertAudit } from "@/db/queries/audit";
import { SENTENCES, listAuditEntries, type SentencePart } from "@/lib/console/audit";
import { expectFieldError } from "../helpers/api";
import { consoleCall, inviteLinkTo, makeConsoleOrg, makePerson, type ConsoleFixture, type Person } from "../helpers/console";

vi.mock(import("@/lib/mail/send"), async (orig) => ({ ...(await orig()), sendMail: vi.fn(async () => {}) }));

interface Entry {
  id: number;
  at: string;
  actor: { kind: string; id: string; name: string; userId?: number; email?: string };
  action: string;
  targetType: string;
  targetId: string;
  details: Record<string, unknown>;
  sentence: SentencePart[];
}

let fx: ConsoleFixture;
/** Actions this file performs through the console, in order. */
const performed: string[] = [];
let newKeyId: number;
let keyPrefix: string;
let successorPrefix: string;
let keyEnds: string;
let overlapEnds: string;
let joiner: Person;
let simulationId: string;

beforeAll(async () => {
  fx = await makeConsoleOrg();
  const org = `/api/console/orgs/${fx.org.slug}`;
  const ok = async (res: Awaited<ReturnType<typeof consoleCall>>, action: string) => {
    expect(res.status, res.text).toBeLessThan(300);
    performed.push(action);
    return res;
  };
  joiner = await makePerson(fx.db, "joiner");
  await ok(await consoleCall("POST", `${org}/invitations`, { cookie: fx.owner.cookie, body: { email: joiner.email, role: "developer" } }), "member.invited");
  await ok(await consoleCall("POST", "/api/console/invitations/accept", { cookie: joiner.cookie, body: { token: inviteLinkTo(joiner.email).token } }), "member.joined");
  keyEnds = new Date(Date.now() + 30 * 86_400_000).toISOString();
  const created = (await ok(await consoleCall("POST", `${org}/keys`, { cookie: fx.developer.cookie, body: { name: "audited", scopes: ["compute"], mode: "test", expiresAt: keyEnds } }), "key.created")).body.record;
  newKeyId = created.id;
  keyPrefix = created.prefix;
  const rotated = (await ok(await consoleCall("POST", `${org}/keys/${newKeyId}/rotate`, { cookie: fx.developer.cookie, body: { overlapHours: 2 } }), "key.rotated")).body;
  successorPrefix = rotated.record.prefix;
  overlapEnds = rotated.previous.expiresAt;
  await ok(await consoleCall("POST", `${org}/keys/${newKeyId}/revoke`, { cookie: fx.owner.cookie }), "key.revoked");
  // Renewed twice, recorded once.
  await ok(await consoleCall("POST", `${org}/bench-credential`, { cookie: fx.developer.cookie }), "bench.credential_issued");
  expect((await consoleCall("POST", `${org}/bench-credential`, { cookie: fx.developer.cookie })).status).toBe(201);
  simulationId = (await ok(await consoleCall("POST", `${org}/simulations`, { cookie: fx.developer.cookie, body: { channel: { type: "bsc" }, points: [0.1, 0.2], stop: { maxBits: 1000 } } }), "simulation.started")).body.simulation.id;
  await ok(await consoleCall("DELETE", `${org}/simulations/${simulationId}`, { cookie: fx.developer.cookie }), "simulation.cancelled");
  await ok(await consoleCall("PATCH", `${org}/members/${fx.spare.id}`, { cookie: fx.owner.cookie, body: { role: "billing" } }), "member.role_changed");
  await ok(await consoleCall("DELETE", `${org}/invitations/${fx.invitation.id}`, { cookie: fx.coOwner.cookie }), "invitation.revoked");
  await ok(await consoleCall("DELETE", `${org}/members/${fx.spare.id}`, { cookie: fx.owner.cookie }), "member.removed");
  await ok(await consoleCall("DELETE", `${org}/members/${joiner.id}?revokeKeys=true`, { cookie: joiner.cookie }), "member.removed");
  await ok(await consoleCall("POST", `${org}/transfer`, { cookie: fx.coOwner.cookie, body: { userId: fx.billing.id } }), "org.ownership_transferred");
  // The demo seed records the org's founding (db/seed/demo.ts), and a newer version may write actions this one does not know.
  await insertAudit(fx.db, { orgId: fx.org.id, actor: `user:${fx.owner.id}`, action: "org.created", targetType: "org", targetId: fx.org.id, details: { name: fx.org.name, plan: "team" } });
  await insertAudit(fx.db, { orgId: fx.org.id, actor: `user:${fx.owner.id}`, action: "widget.polished", targetType: "widget_part", targetId: 7 });
  performed.push("org.created", "widget.polished");
  // Billing writes its entries when the provider's events arrive (lib/billing/accounts.ts); the flows are tested in tests/billing.
  await insertAudit(fx.db, { orgId: fx.org.id, actor: `user:${fx.billing.id}`, action: "billing.checkout_started", targetType: "org", targetId: fx.org.id, details: { plan: "beacon" } });
  await insertAudit(fx.db, { orgId: fx.org.id, actor: "system", action: "billing.plan_changed", targetType: "org", targetId: fx.org.id, details: { from: "lantern", to: "beacon", reason: "checkout" } });
  await insertAudit(fx.db, { orgId: fx.org.id, actor: "system", action: "billing.payment_failed", targetType: "invoice", targetId: "invoice.q1w2e3r4t5y6", details: { amount: 14146, graceUntil: "2027-01-08T00:00:00.000Z" } });
  await insertAudit(fx.db, { orgId: fx.org.id, actor: "system", action: "billing.payment_recovered", targetType: "invoice", targetId: "invoice.q1w2e3r4t5y6", details: { amount: 14146 } });
  performed.push("billing.checkout_started", "billing.plan_changed", "billing.payment_failed", "billing.payment_recovered");
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
    expect(rotated.actor).toEqual({ kind: "user", id: `user:${fx.developer.id}`, userId: fx.developer.id, name: "developer", email: fx.developer.email });
    expect(rotated).toMatchObject({ targetType: "api_key", targetId: String(newKeyId), details: { overlapHours: 2 } });
    expect(rotated.at).toMatch(/^\d{4}-\d\d-\d\dT/);
    const scripted = entries.slice(0, 4).map((e) => e.actor);
    expect(scripted).toEqual([
      { kind: "system", id: "system", name: "the system" },
      { kind: "system", id: "bench", name: "the system" },
      { kind: "system", id: "demo", name: "the system" },
      { kind: "cli", id: "cli", name: "the operator CLI" },
    ]);
  });

  it("filters by action and by actor, separately and together", async () => {
    const rotations = await everything({ action: "key.rotated" });
    expect(rotations.map((e) => e.action)).toEqual(["key.rotated"]);
    const byOwner = await everything({ actor: `user:${fx.owner.id}` });
    expect(byOwner.map((e) => e.action)).toEqual(["widget.polished", "org.created", "member.removed", "member.role_changed", "key.revoked", "member.invited", "key.created"]);
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

/** A sentence as text, with moments as [ISO] (the browser formats them in the reader's zone). */
const text = (parts: SentencePart[]) => parts.map((p) => (typeof p === "string" ? p : "at" in p ? `[${p.at}]` : p.text)).join("");
const links = (parts: SentencePart[]) => parts.flatMap((p) => (typeof p === "object" && "href" in p && p.href ? [[p.text, p.href]] : []));

describe("each entry as a sentence", () => {
  let entries: Entry[];
  let members: string;
  let keysPage: string;
  beforeAll(async () => {
    entries = await everything();
    members = `/console/${fx.org.slug}/members`;
    keysPage = `/console/${fx.org.slug}/keys`;
  });
  const one = (action: string, pick: (e: Entry) => boolean = () => true) => {
    const found = entries.filter((e) => e.action === action && pick(e));
    expect(found, action).toHaveLength(1);
    return found[0]!;
  };

  it("names keys by name and prefix, linked to the keys page, with their scopes and end", () => {
    const created = one("key.created", (e) => e.targetId === String(newKeyId));
    expect(text(created.sentence)).toBe(`developer created the test key “audited” (${keyPrefix}…) with the scope compute, to work until [${keyEnds}].`);
    expect(links(created.sentence)).toEqual([
      ["developer", members],
      [`${keyPrefix}…`, keysPage],
    ]);
    const fixtureKey = one("key.created", (e) => e.actor.id === `user:${fx.owner.id}`);
    expect(text(fixtureKey.sentence)).toBe(`owner created the test key “owner key” (${fx.keys.owner.record.prefix}…) with the scopes compute, usage:read and claims.`);
    // The old key's overlap was cut short by the revocation that followed.
    expect(text(one("key.rotated").sentence)).toBe(`developer rotated the key “audited” (${keyPrefix}…) to ${successorPrefix}…; the old key was to work until [${overlapEnds}].`);
    expect(links(one("key.rotated").sentence).map(([, href]) => href)).toEqual([members, keysPage, keysPage]);
    expect(text(one("key.revoked").sentence)).toBe(`owner revoked the key “audited” (${keyPrefix}…); it stopped working at once.`);
    // Prefixes read as code, not as words.
    expect(one("key.revoked").sentence).toContainEqual({ text: `${keyPrefix}…`, style: "code", href: keysPage });
  });

  it("names people by name, linked to the people page only while they belong to the org", async () => {
    const invitee = (await fx.db.selectFrom("invitations").select("email").where("id", "=", fx.invitation.id).executeTakeFirstOrThrow()).email;
    expect(text(one("org.created").sentence)).toBe("owner created the organisation Console org.");
    expect(text(one("member.invited").sentence)).toBe(`owner invited ${joiner.email} to join as a developer.`);
    expect(one("member.invited").sentence).toContainEqual({ text: joiner.email, style: "email" });
    expect(text(one("member.joined").sentence)).toBe("joiner joined as a developer.");
    expect(text(one("simulation.started").sentence)).toBe(`developer started the simulation ${simulationId} (2 points).`);
    expect(text(one("simulation.cancelled").sentence)).toBe(`developer cancelled the simulation ${simulationId} before it started.`);
    expect(one("simulation.cancelled").sentence).toContainEqual({ text: simulationId, style: "code", href: `/console/${fx.org.slug}/simulations/${simulationId}` });
    expect(text(one("bench.credential_issued").sentence)).toBe(
      "developer received a bench credential: a test key for compute, usage:read and claims that the console's bench renews hourly while they use it. It is not listed among the keys, and it ends when they leave or lose the bench.",
    );
    expect(text(one("invitation.revoked").sentence)).toBe(`co-owner withdrew the invitation to ${invitee}.`);
    expect(text(one("billing.checkout_started").sentence)).toBe("billing opened a checkout to move to Beacon; the plan changes when the payment is confirmed.");
    expect(text(one("billing.plan_changed").sentence)).toBe("The system moved the organisation from Lantern to Beacon after a payment through checkout.");
    expect(text(one("billing.payment_failed").sentence)).toBe("The system recorded a failed payment of $141.46 for invoice invoice.q1w2e3r4t5y6; the plan stays until [2027-01-08T00:00:00.000Z] unless it is paid.");
    expect(text(one("billing.payment_recovered").sentence)).toBe("The system recorded the payment of $141.46 for invoice invoice.q1w2e3r4t5y6; the grace period ended.");
    expect(text(one("member.role_changed").sentence)).toBe("owner changed the role of spare from developer to billing admin.");
    expect(text(one("member.removed", (e) => e.targetId === String(fx.spare.id)).sentence)).toBe("owner removed spare (billing admin); the keys they created keep working.");
    expect(text(one("member.removed", (e) => e.targetId === String(joiner.id)).sentence)).toBe("joiner left the organisation and revoked every working key they had created.");
    const handover = one("org.ownership_transferred");
    expect(text(handover.sentence)).toBe("co-owner handed ownership to billing and became a developer.");
    expect(links(handover.sentence)).toEqual([
      ["co-owner", members],
      ["billing", members],
    ]);
    // Spare and joiner have left: their names stay, without a link to a page that no longer lists them.
    expect(links(one("member.role_changed").sentence)).toEqual([["owner", members]]);
    expect(links(one("member.joined").sentence)).toEqual([]);
  });

  it("names scripts as the operator CLI or the system, and still writes a sentence for an action it does not know", () => {
    const scripted = entries.filter((e) => e.actor.kind !== "user" && e.action === "key.created").map((e) => text(e.sentence));
    const ownerKey = `the key “owner key” (${fx.keys.owner.record.prefix}…)`;
    expect(scripted).toEqual([`The system created ${ownerKey}.`, `The system created ${ownerKey}.`, `The system created ${ownerKey}.`, `The operator CLI created ${ownerKey}.`]);
    expect(text(one("widget.polished").sentence)).toBe("owner recorded widget.polished on widget part 7.");
  });

  it("tells an overlap by where it stands: ended at once, running, or over", async () => {
    const k = fx.otherKey.record;
    const hour = 3_600_000;
    const t0 = Date.now() - 10 * hour;
    const rotation = (at: number, endsAt: number, overlapHours: number) =>
      insertAudit(fx.db, {
        orgId: fx.other.id,
        actor: `user:${fx.otherOwner.id}`,
        action: "key.rotated",
        targetType: "api_key",
        targetId: k.id,
        details: { prefix: k.prefix, overlapHours, oldKeyEndsAt: new Date(endsAt).toISOString() },
        at: new Date(at).toISOString(),
      });
    await rotation(t0, t0, 0);
    await rotation(t0, t0 + 2 * hour, 2);
    await rotation(t0, t0 + 20 * hour, 20);
    const { entries: rotations } = await listAuditEntries(fx.db, fx.other, { action: "key.rotated", limit: 10 });
    const head = `other-owner rotated the key “other key” (${k.prefix}…); the old key`;
    expect(rotations.map((e) => text(e.sentence))).toEqual([
      `${head} works until [${new Date(t0 + 20 * hour).toISOString()}].`,
      `${head} worked until [${new Date(t0 + 2 * hour).toISOString()}].`,
      `${head} stopped at once.`,
    ]);
  });

  it("has a sentence of its own for every action the code writes", () => {
    // Every `action: "…"` literal next to an audit write in lib/, scripts/ and the demo seed.
    const root = join(__dirname, "../..");
    const sources = ["lib", "scripts", "db/seed"].flatMap((dir) =>
      readdirSync(join(root, dir), { recursive: true, encoding: "utf8" })
        .filter((f) => f.endsWith(".ts"))
        .map((f) => readFileSync(join(root, dir, f), "utf8")),
    );
    const written = new Set(sources.flatMap((src) => [...src.matchAll(/action: "([a-z_]+\.[a-z_]+)"/g)].map((m) => m[1]!)));
    expect(written.size).toBeGreaterThanOrEqual(10);
    expect([...written].filter((a) => !(a in SENTENCES))).toEqual([]);
    // …and this file checks each one's sentence above.
    expect([...written].filter((a) => !performed.includes(a))).toEqual([]);
  });
});
