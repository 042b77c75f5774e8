import { beforeEach, describe, expect, it, vi } from "vitest";
import { listAudit } from "@/db/queries/audit";
import { createKey } from "@/lib/api/key-service";
import { insertApiKey } from "@/db/queries/api-keys";
import { hashKey, isWellFormedKey } from "@/lib/api/keys";
import { sendMail } from "@/lib/mail/send";
import { expectFieldError, expectProblem, getQuery, postJson } from "../helpers/api";
import { consoleCall, makeConsoleOrg, sentMails, type ConsoleFixture, type Person } from "../helpers/console";
import { forgeWellFormedKey } from "../helpers/security";

vi.mock(import("@/lib/mail/send"), async (orig) => ({ ...(await orig()), sendMail: vi.fn(async () => {}) }));

let fx: ConsoleFixture;
beforeEach(async () => {
  vi.mocked(sendMail).mockClear();
  fx = await makeConsoleOrg();
});

interface KeyRecord {
  id: number;
  name: string;
  prefix: string;
  mode: string;
  scopes: string[];
  createdBy: { id: number; email: string } | null;
  state: string;
  expiresAt: string | null;
  revokedAt: string | null;
  rotatedFromKeyId: number | null;
}

const keysPath = () => `/api/console/orgs/${fx.org.slug}/keys`;
const listKeys = async (p: Person): Promise<KeyRecord[]> => {
  const res = await consoleCall("GET", keysPath(), { cookie: p.cookie });
  expect(res.status, res.text).toBe(200);
  return res.body.keys;
};
const rotateWith = (p: Person, id: number, body: Record<string, unknown>) => consoleCall("POST", `${keysPath()}/${id}/rotate`, { cookie: p.cookie, body });
const rotate = (p: Person, id: number, overlapMinutes: unknown) => rotateWith(p, id, { overlapMinutes });
const revoke = (p: Person, id: number) => consoleCall("POST", `${keysPath()}/${id}/revoke`, { cookie: p.cookie });
/** One call of the public API with a key: the status it gets. */
const capacityWith = async (key: string) => (await postJson("/api/v1/capacity", { channel: "bsc", p: 0.1 }, `Bearer ${key}`)).status;
const ownerMailsAbout = (prefix: string) => sentMails().filter((m) => m.subject.includes(prefix)).map((m) => m.to).sort();
const owners = () => [fx.owner.email, fx.coOwner.email].sort();

describe("listing", () => {
  it("an owner sees every key of the org with its creator and state", async () => {
    const cli = await createKey(fx.db, { orgId: fx.org.id, name: "ops", mode: "live", scopes: ["usage:read"] }, "cli");
    const keys = await listKeys(fx.owner);
    expect(keys.map((k) => k.id).sort((a, b) => a - b)).toEqual([fx.keys.owner, fx.keys.developer, fx.keys.spare, cli].map((k) => k.record.id).sort((a, b) => a - b));
    expect(keys.find((k) => k.id === fx.keys.developer.record.id)).toMatchObject({
      name: "developer key",
      prefix: fx.keys.developer.record.prefix,
      mode: "test",
      scopes: ["compute", "usage:read", "claims"],
      createdBy: { id: fx.developer.id, email: fx.developer.email },
      state: "active",
      expiresAt: null,
      revokedAt: null,
      rotatedFromKeyId: null,
    });
    expect(keys.find((k) => k.id === cli.record.id)).toMatchObject({ createdBy: null, mode: "live", scopes: ["usage:read"] });
    expect(JSON.stringify(keys)).not.toContain(fx.keys.owner.key);
  });

  it("a developer sees only the keys they created", async () => {
    expect((await listKeys(fx.developer)).map((k) => k.id)).toEqual([fx.keys.developer.record.id]);
    expect((await listKeys(fx.spare)).map((k) => k.id)).toEqual([fx.keys.spare.record.id]);
  });
});

describe("creating", () => {
  it("returns the key once, stores only its hash, audits it and tells every owner", async () => {
    const res = await consoleCall("POST", keysPath(), { cookie: fx.developer.cookie, body: { name: "buoy CI", scopes: ["compute"], mode: "live" } });
    expect(res.status, res.text).toBe(201);
    const { key, record } = res.body as { key: string; record: KeyRecord };
    expect(isWellFormedKey(key)).toBe(true);
    expect(key.startsWith("live.prt1.")).toBe(true);
    expect(record).toMatchObject({ name: "buoy CI", mode: "live", scopes: ["compute"], createdBy: { id: fx.developer.id, email: fx.developer.email }, state: "active" });
    expect(key.startsWith(record.prefix)).toBe(true);
    expect(await capacityWith(key)).toBe(200);

    const row = await fx.db.selectFrom("api_keys").selectAll().where("id", "=", record.id).executeTakeFirstOrThrow();
    expect(row.key_hash).toBe(hashKey(key));
    expect(JSON.stringify(row)).not.toContain(key);
    expect((await listAudit(fx.db, fx.org.id)).filter((a) => a.action === "key.created" && a.target_id === String(record.id))).toHaveLength(1);

    expect(ownerMailsAbout(record.prefix)).toEqual(owners());
    for (const m of sentMails()) expect(m.text).not.toContain(key);
  });

  it("stores an expiry given with a UTC offset as UTC (expiry checks compare the text)", async () => {
    const at = new Date(Math.floor(Date.now() / 1000) * 1000 + 3600_000);
    // The same instant written two hours east of UTC.
    const local = new Date(at.getTime() + 2 * 3600_000).toISOString().replace("Z", "+02:00");
    const res = await consoleCall("POST", keysPath(), { cookie: fx.owner.cookie, body: { name: "short", scopes: ["compute"], mode: "test", expiresAt: local } });
    expect(res.status, res.text).toBe(201);
    expect(res.body.record.expiresAt).toBe(at.toISOString());
    expect(res.body.record.state).toBe("active");
  });

  it.each([
    ["no scopes", { name: "k", scopes: [], mode: "test" }, "/scopes"],
    ["an unknown scope", { name: "k", scopes: ["admin"], mode: "test" }, "/scopes/0"],
    ["an unknown mode", { name: "k", scopes: ["compute"], mode: "prod" }, "/mode"],
    ["an empty name", { name: "  ", scopes: ["compute"], mode: "test" }, "/name"],
    ["an expiry in the past", { name: "k", scopes: ["compute"], mode: "test", expiresAt: "2020-01-01T00:00:00Z" }, "/expiresAt"],
    ["an expiry that is not a time", { name: "k", scopes: ["compute"], mode: "test", expiresAt: "tomorrow" }, "/expiresAt"],
  ])("422 for %s", async (_name, body, pointer) => {
    expectFieldError(await consoleCall("POST", keysPath(), { cookie: fx.owner.cookie, body }), pointer);
    expect(sentMails()).toEqual([]);
  });

  it("a failing mail server does not fail the request; the failure is logged", async () => {
    vi.mocked(sendMail).mockRejectedValue(new Error("connect ECONNREFUSED"));
    const log = vi.spyOn(console, "error").mockImplementation(() => {});
    try {
      const res = await consoleCall("POST", keysPath(), { cookie: fx.owner.cookie, body: { name: "k", scopes: ["compute"], mode: "test" } });
      expect(res.status, res.text).toBe(201);
      await vi.waitFor(() => expect(log).toHaveBeenCalledTimes(2));
      expect(await capacityWith(res.body.key)).toBe(200);
    } finally {
      log.mockRestore();
      vi.mocked(sendMail).mockImplementation(async () => {});
    }
  });
});

describe("rotation with an overlap window", () => {
  it("both keys work inside the window; after it the old key gets 401 and the new one still works", async () => {
    const old = fx.keys.owner;
    const res = await rotate(fx.owner, old.record.id, 24 * 60);
    expect(res.status, res.text).toBe(201);
    const { key, record, previous } = res.body as { key: string; record: KeyRecord; previous: { id: number; expiresAt: string } };
    expect(previous.id).toBe(old.record.id);
    expect(Math.abs(Date.parse(previous.expiresAt) - (Date.now() + 24 * 3600_000))).toBeLessThan(60_000);
    expect(record).toMatchObject({ name: old.record.name, mode: "test", scopes: ["compute", "usage:read", "claims"], rotatedFromKeyId: old.record.id, state: "active", expiresAt: null });

    expect(await capacityWith(old.key)).toBe(200);
    expect(await capacityWith(key)).toBe(200);
    const listed = new Map((await listKeys(fx.owner)).map((k) => [k.id, k]));
    expect(listed.get(old.record.id)).toMatchObject({ state: "expiring", expiresAt: previous.expiresAt });
    expect(listed.get(record.id)).toMatchObject({ state: "active", rotatedFromKeyId: old.record.id });

    // The window ends.
    await fx.db.updateTable("api_keys").set({ expires_at: new Date(Date.now() - 1000).toISOString() }).where("id", "=", old.record.id).execute();
    const refused = await postJson("/api/v1/capacity", { channel: "bsc", p: 0.1 }, `Bearer ${old.key}`);
    expect(expectProblem(refused, 401, "unauthenticated").detail).toMatch(/expired/);
    expect(await capacityWith(key)).toBe(200);
    expect((await listKeys(fx.owner)).find((k) => k.id === old.record.id)!.state).toBe("expired");

    const audit = (await listAudit(fx.db, fx.org.id)).filter((a) => a.action === "key.rotated");
    expect(audit).toHaveLength(1);
    expect(JSON.parse(audit[0]!.details)).toMatchObject({ newKeyId: record.id, overlapMinutes: 24 * 60, overlapHours: 24 });
    expect(ownerMailsAbout(old.record.prefix)).toEqual(owners());
  });

  it("an overlap of 0 ends the old key at once", async () => {
    const old = fx.keys.developer;
    const res = await rotate(fx.developer, old.record.id, 0);
    expect(res.status, res.text).toBe(201);
    expect(await capacityWith(old.key)).toBe(401);
    expect(await capacityWith(res.body.key)).toBe(200);
  });

  it("never lengthens a key's life: an earlier expiry stays", async () => {
    const soon = new Date(Date.now() + 3600_000).toISOString();
    const short = await createKey(fx.db, { orgId: fx.org.id, name: "short", mode: "test", scopes: ["compute"], expiresAt: soon, createdByUserId: fx.owner.id }, "test");
    const res = await rotate(fx.owner, short.record.id, 7 * 24 * 60);
    expect(res.body.previous.expiresAt).toBe(soon);
  });

  it("the new key stays with the old key's creator, so a developer sees the key an owner rotated for them", async () => {
    const res = await rotate(fx.owner, fx.keys.developer.record.id, 60);
    expect(res.body.record.createdBy).toEqual({ id: fx.developer.id, email: fx.developer.email });
    expect((await listKeys(fx.developer)).map((k) => k.id)).toContain(res.body.record.id);
  });

  it("409 for a revoked or an expired key", async () => {
    await revoke(fx.owner, fx.keys.spare.record.id);
    expectProblem(await rotate(fx.owner, fx.keys.spare.record.id, 60), 409, "key-inactive");
    await rotate(fx.owner, fx.keys.owner.record.id, 0);
    expectProblem(await rotate(fx.owner, fx.keys.owner.record.id, 60), 409, "key-inactive");
  });

  it.each([[90, 90], [7 * 24 * 60, 7 * 24 * 60]])("takes any whole number of minutes up to 7 days: %j", async (overlapMinutes, expected) => {
    const res = await rotate(fx.owner, fx.keys.owner.record.id, overlapMinutes);
    expect(res.status, res.text).toBe(201);
    expect(Math.abs(Date.parse(res.body.previous.expiresAt) - (Date.now() + expected * 60_000))).toBeLessThan(60_000);
  });

  it("still takes whole overlapHours (up to 168) from older clients", async () => {
    const res = await rotateWith(fx.owner, fx.keys.owner.record.id, { overlapHours: 168 });
    expect(res.status, res.text).toBe(201);
    expect(Math.abs(Date.parse(res.body.previous.expiresAt) - (Date.now() + 168 * 3600_000))).toBeLessThan(60_000);
  });

  it.each([
    [7 * 24 * 60 + 1, /at most 10080 minutes/],
    [-1, /negative/],
    [1.5, /whole number of minutes/],
    ["60", /whole number of minutes/],
    [null, /whole number of minutes/],
  ])("422 with a pointer for overlapMinutes %j, and the key keeps working", async (overlapMinutes, message) => {
    expectFieldError(await rotate(fx.owner, fx.keys.owner.record.id, overlapMinutes), "/overlapMinutes", message);
    expect(await capacityWith(fx.keys.owner.key)).toBe(200);
  });

  it.each([[169], [721], [-1], [1.5], ["24"], [null]])("422 for overlapHours %j", async (overlapHours) => {
    expectFieldError(await rotateWith(fx.owner, fx.keys.owner.record.id, { overlapHours }), "/overlapHours");
    expect(await capacityWith(fx.keys.owner.key)).toBe(200);
  });

  it.each([[{}], [{ overlapMinutes: 60, overlapHours: 1 }]])("422 unless exactly one of overlapMinutes and overlapHours is given: %j", async (body) => {
    expectFieldError(await rotateWith(fx.owner, fx.keys.owner.record.id, body), "/overlapMinutes", /exactly one/);
    expect(await capacityWith(fx.keys.owner.key)).toBe(200);
  });

  it("a developer cannot reach another member's key (404), whatever the id", async () => {
    expectProblem(await rotate(fx.developer, fx.keys.owner.record.id, 1), 404, "not-found");
    expectProblem(await rotate(fx.developer, 999999, 1), 404, "not-found");
    expect(await capacityWith(fx.keys.owner.key)).toBe(200);
  });
});

describe("keys issued in the earlier prt_<mode>_ format", () => {
  /** A stored key in the old format, as the key service issued them before (hash and 13-character prefix). */
  async function legacyKey(name: string) {
    const key = forgeWellFormedKey("test");
    const record = await insertApiKey(fx.db, {
      org_id: fx.org.id,
      name,
      mode: "test",
      prefix: key.slice(0, "prt_test_".length + 4),
      key_hash: hashKey(key),
      scopes: "compute usage:read",
      created_by_user_id: fx.owner.id,
      created_at: new Date().toISOString(),
      expires_at: null,
      rotated_from_key_id: null,
    });
    return { key, record };
  }

  it("keep authenticating; rotation replaces one by a key in the current format, with the chosen overlap", async () => {
    const old = await legacyKey("legacy ci");
    expect(old.key).toMatch(/^prt_test_[0-9A-Za-z]{38}$/);
    expect(await capacityWith(old.key)).toBe(200);

    const res = await rotate(fx.owner, old.record.id, 30);
    expect(res.status, res.text).toBe(201);
    const fresh = res.body.key as string;
    expect(fresh).toMatch(/^test\.prt1\.[0-9A-Za-z]{36}$/);
    expect(isWellFormedKey(fresh)).toBe(true);
    expect(Math.abs(Date.parse(res.body.previous.expiresAt) - (Date.now() + 30 * 60_000))).toBeLessThan(60_000);
    expect(await capacityWith(old.key)).toBe(200);
    expect(await capacityWith(fresh)).toBe(200);
  });

  it("stop at once when revoked", async () => {
    const old = await legacyKey("legacy bench");
    expect(await capacityWith(old.key)).toBe(200);
    expect((await revoke(fx.owner, old.record.id)).status).toBe(200);
    const refused = await postJson("/api/v1/capacity", { channel: "bsc", p: 0.1 }, `Bearer ${old.key}`);
    expect(expectProblem(refused, 401, "unauthenticated").detail).toMatch(/revoked/);
  });
});

describe("revocation", () => {
  it("is immediate, audited and mailed to owners; a second revocation changes nothing", async () => {
    const k = fx.keys.spare;
    expect(await capacityWith(k.key)).toBe(200);
    const res = await revoke(fx.owner, k.record.id);
    expect(res.status, res.text).toBe(200);
    expect(res.body.record).toMatchObject({ id: k.record.id, state: "revoked", revokedAt: expect.any(String) });
    const refused = await postJson("/api/v1/capacity", { channel: "bsc", p: 0.1 }, `Bearer ${k.key}`);
    expect(expectProblem(refused, 401, "unauthenticated").detail).toMatch(/revoked/);
    expect(ownerMailsAbout(k.record.prefix)).toEqual(owners());

    vi.mocked(sendMail).mockClear();
    expect((await revoke(fx.owner, k.record.id)).status).toBe(200);
    expect(sentMails()).toEqual([]);
    expect((await listAudit(fx.db, fx.org.id)).filter((a) => a.action === "key.revoked")).toHaveLength(1);
  });
});

describe("the bench credential", () => {
  const renew = (p: Person) => consoleCall("POST", `/api/console/orgs/${fx.org.slug}/bench-credential`, { cookie: p.cookie });
  const benchRows = () => fx.db.selectFrom("api_keys").selectAll().where("org_id", "=", fx.org.id).where("purpose", "=", "bench").execute();

  it("is a test key for compute, usage:read and claims that lasts an hour, held by the caller, audited once, not mailed, not listed", async () => {
    const res = await renew(fx.developer);
    expect(res.status, res.text).toBe(201);
    const { key, expiresAt, holder } = res.body as { key: string; expiresAt: string; holder: number };
    expect(isWellFormedKey(key) && key.startsWith("test.prt1.")).toBe(true);
    expect(holder).toBe(fx.developer.id);
    expect(Math.abs(Date.parse(expiresAt) - (Date.now() + 3600_000))).toBeLessThan(60_000);
    expect(await capacityWith(key)).toBe(200);
    expect((await getQuery("/api/v1/usage", {}, `Bearer ${key}`)).status).toBe(200);
    // Only usage:read and compute: nothing else the API guards.
    const [row] = await benchRows();
    expect(row).toMatchObject({ scopes: "compute usage:read claims", mode: "test", created_by_user_id: fx.developer.id, key_hash: hashKey(key), revoked_at: null });

    for (const p of [fx.developer, fx.owner]) expect((await listKeys(p)).map((k) => k.id)).not.toContain(row!.id);
    expect((await listAudit(fx.db, fx.org.id)).filter((a) => a.action === "bench.credential_issued")).toHaveLength(1);
    expect(sentMails()).toEqual([]);
  });

  it("is one per person: a renewal gives the same credential a new secret, the previous secret stops, and nothing more is audited", async () => {
    const first = (await renew(fx.developer)).body.key as string;
    const second = (await renew(fx.developer)).body.key as string;
    expect(second).not.toBe(first);
    expect(await capacityWith(first)).toBe(401);
    expect(await capacityWith(second)).toBe(200);
    // Another person has their own.
    const owners = (await renew(fx.owner)).body.key as string;
    expect(await capacityWith(second)).toBe(200);
    expect(await capacityWith(owners)).toBe(200);
    expect((await benchRows()).map((r) => r.created_by_user_id).sort()).toEqual([fx.owner.id, fx.developer.id].sort());
    expect((await listAudit(fx.db, fx.org.id)).filter((a) => a.action === "bench.credential_issued")).toHaveLength(2);
  });

  it("cannot be rotated or revoked as a key (it is not one people manage)", async () => {
    await renew(fx.developer);
    const [row] = await benchRows();
    expectProblem(await rotate(fx.owner, row!.id, 0), 404, "not-found");
    expectProblem(await revoke(fx.owner, row!.id), 404, "not-found");
  });

  it("ends when its holder leaves the org or becomes a billing admin, even when their keys are kept", async () => {
    const dev = (await renew(fx.developer)).body.key as string;
    const spare = (await renew(fx.spare)).body.key as string;
    expect((await consoleCall("PATCH", `/api/console/orgs/${fx.org.slug}/members/${fx.spare.id}`, { cookie: fx.owner.cookie, body: { role: "billing" } })).status).toBe(200);
    expect(await capacityWith(spare)).toBe(401);
    expect((await consoleCall("DELETE", `/api/console/orgs/${fx.org.slug}/members/${fx.developer.id}`, { cookie: fx.owner.cookie })).status).toBe(200);
    expect(await capacityWith(dev)).toBe(401);
    // Their ordinary key was not revoked (no revokeKeys).
    expect(await capacityWith(fx.keys.developer.key)).toBe(200);
  });
});
