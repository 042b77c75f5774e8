import { beforeEach, describe, expect, it, vi } from "vitest";
import { getDb } from "@/db";
import { listAudit } from "@/db/queries/audit";
import { insertOrg } from "@/db/queries/orgs";
import { findMembership } from "@/db/queries/users";
import type { Org } from "@/db/schema";
import { createKey } from "@/lib/api/key-service";
import { sendMail } from "@/lib/mail/send";
import { expectFieldError, expectProblem, postJson } from "../helpers/api";
import { addMember, consoleCall, makeConsoleOrg, sentMails, type ConsoleFixture, type Person } from "../helpers/console";

vi.mock(import("@/lib/mail/send"), async (orig) => ({ ...(await orig()), sendMail: vi.fn(async () => {}) }));

const member = (org: Org, userId: number) => `/api/console/orgs/${org.slug}/members/${userId}`;
const setRole = (org: Org, by: Person, userId: number, role: string) => consoleCall("PATCH", member(org, userId), { cookie: by.cookie, body: { role } });
const remove = (org: Org, by: Person, userId: number) => consoleCall("DELETE", member(org, userId), { cookie: by.cookie });
const transfer = (org: Org, by: Person, userId: number) => consoleCall("POST", `/api/console/orgs/${org.slug}/transfer`, { cookie: by.cookie, body: { userId } });
const roleOf = async (org: Org, p: Person) => (await findMembership(await getDb(), org.id, p.id))?.role;

describe("members list and role changes", () => {
  let fx: ConsoleFixture;
  beforeEach(async () => {
    fx = await makeConsoleOrg();
  });

  it("lists every member with e-mail, name, role and join time", async () => {
    const res = await consoleCall("GET", `/api/console/orgs/${fx.org.slug}/members`, { cookie: fx.billing.cookie });
    expect(res.status).toBe(200);
    const byId = new Map(res.body.members.map((m: { userId: number }) => [m.userId, m]));
    expect(byId.size).toBe(5);
    expect(byId.get(fx.developer.id)).toEqual({ userId: fx.developer.id, email: fx.developer.email, name: "developer", role: "developer", joinedAt: expect.stringMatching(/^\d{4}-\d\d-\d\dT/) });
    expect(byId.has(fx.otherOwner.id)).toBe(false);
  });

  it("an owner changes a role; it is audited and takes effect on the member's next request", async () => {
    expect((await consoleCall("GET", `/api/console/orgs/${fx.org.slug}/keys`, { cookie: fx.spare.cookie })).status).toBe(200);
    const res = await setRole(fx.org, fx.owner, fx.spare.id, "billing");
    expect(res.status, res.text).toBe(200);
    expect(res.body.member).toMatchObject({ userId: fx.spare.id, role: "billing" });
    expect(await roleOf(fx.org, fx.spare)).toBe("billing");
    // The spare's session cookie is unchanged; the role comes from the database.
    expectProblem(await consoleCall("GET", `/api/console/orgs/${fx.org.slug}/keys`, { cookie: fx.spare.cookie }), 403, "role-refused");
    const audit = (await listAudit(fx.db, fx.org.id)).filter((a) => a.action === "member.role_changed");
    expect(audit).toHaveLength(1);
    expect(JSON.parse(audit[0]!.details)).toMatchObject({ from: "developer", to: "billing" });
  });

  it("setting the role a member already has changes nothing and writes no audit row", async () => {
    const res = await setRole(fx.org, fx.owner, fx.developer.id, "developer");
    expect(res.status).toBe(200);
    expect((await listAudit(fx.db, fx.org.id)).some((a) => a.action === "member.role_changed")).toBe(false);
  });

  it("422 for an unknown role; 404 for a user who is not a member, and for a user id that is not a number", async () => {
    expectFieldError(await setRole(fx.org, fx.owner, fx.spare.id, "superuser"), "/role");
    expectProblem(await setRole(fx.org, fx.owner, fx.otherOwner.id, "billing"), 404, "not-found");
    expectProblem(await consoleCall("PATCH", `/api/console/orgs/${fx.org.slug}/members/abc`, { cookie: fx.owner.cookie, body: { role: "billing" } }), 404, "not-found");
  });

  it("removing a member ends their access at once and is audited; a developer may not remove someone else", async () => {
    expectProblem(await remove(fx.org, fx.developer, fx.spare.id), 403, "role-refused");
    const res = await remove(fx.org, fx.owner, fx.spare.id);
    expect(res.status, res.text).toBe(200);
    expect(res.body.member.userId).toBe(fx.spare.id);
    // A removal also ends the removed person's sessions (tests/auth/sessions-end.test.ts).
    expectProblem(await consoleCall("GET", `/api/console/orgs/${fx.org.slug}/members`, { cookie: fx.spare.cookie }), 401, "signed-out");
    const removed = (await listAudit(fx.db, fx.org.id)).filter((a) => a.action === "member.removed");
    expect(removed).toMatchObject([{ actor: `user:${fx.owner.id}`, target_id: String(fx.spare.id) }]);
    expect(JSON.parse(removed[0]!.details)).toMatchObject({ role: "developer", left: false });
    expectProblem(await remove(fx.org, fx.owner, fx.spare.id), 404, "not-found");
  });

  it("any member can leave; the audit row says they left", async () => {
    expect((await remove(fx.org, fx.billing, fx.billing.id)).status).toBe(200);
    expect(await roleOf(fx.org, fx.billing)).toBeUndefined();
    const row = (await listAudit(fx.db, fx.org.id)).find((a) => a.action === "member.removed")!;
    expect(JSON.parse(row.details)).toMatchObject({ left: true });
  });
});

describe("removing a member and their keys", () => {
  let fx: ConsoleFixture;
  beforeEach(async () => {
    vi.mocked(sendMail).mockClear();
    fx = await makeConsoleOrg();
  });
  const capacityWith = async (key: string) => (await postJson("/api/v1/capacity", { channel: "bsc", p: 0.1 }, `Bearer ${key}`)).status;
  const removeWithKeys = (by: Person, userId: number, flag: string) => consoleCall("DELETE", `${member(fx.org, userId)}?revokeKeys=${flag}`, { cookie: by.cookie });

  it("by default the removed member's keys keep working (the owner chose to keep them)", async () => {
    expect((await remove(fx.org, fx.owner, fx.spare.id)).body.revokedKeys).toEqual([]);
    expect(await capacityWith(fx.keys.spare.key)).toBe(200);
  });

  it("revokeKeys=true revokes, in the same request, every working key they created: audited, owners mailed, 401 from then on", async () => {
    // A second key of the spare's, in a rotation overlap: still working, so it goes too; an expired one is left alone.
    const rotated = await consoleCall("POST", `/api/console/orgs/${fx.org.slug}/keys/${fx.keys.spare.record.id}/rotate`, { cookie: fx.owner.cookie, body: { overlapHours: 24 } });
    expect(rotated.status, rotated.text).toBe(201);
    const expired = await createKey(fx.db, { orgId: fx.org.id, name: "old", mode: "test", scopes: ["compute"], createdByUserId: fx.spare.id, expiresAt: new Date(Date.now() - 1000).toISOString() }, "cli");
    vi.mocked(sendMail).mockClear();

    const res = await removeWithKeys(fx.owner, fx.spare.id, "true");
    expect(res.status, res.text).toBe(200);
    const revokedIds = res.body.revokedKeys.map((k: { id: number }) => k.id).sort((a: number, b: number) => a - b);
    expect(revokedIds).toEqual([fx.keys.spare.record.id, rotated.body.record.id].sort((a, b) => a - b));
    expect(await capacityWith(fx.keys.spare.key)).toBe(401);
    expect(await capacityWith(rotated.body.key)).toBe(401);
    // Another member's key is untouched.
    expect(await capacityWith(fx.keys.developer.key)).toBe(200);

    const audit = await listAudit(fx.db, fx.org.id);
    expect(audit.filter((a) => a.action === "key.revoked").map((a) => Number(a.target_id)).sort((a, b) => a - b)).toEqual(revokedIds);
    expect(audit.some((a) => a.action === "key.revoked" && a.target_id === String(expired.record.id))).toBe(false);
    expect(JSON.parse(audit.find((a) => a.action === "member.removed")!.details)).toMatchObject({ keysRevoked: true });
    // One notice per revoked key to each owner (two owners in the fixture).
    const notices = sentMails().filter((m) => m.subject.includes("revoked"));
    expect(notices.map((m) => m.to).sort()).toEqual([fx.coOwner.email, fx.coOwner.email, fx.owner.email, fx.owner.email].sort());
  });

  it("a member leaving may revoke their own keys the same way", async () => {
    expect((await removeWithKeys(fx.developer, fx.developer.id, "true")).status).toBe(200);
    expect(await capacityWith(fx.keys.developer.key)).toBe(401);
  });

  it("422 for a revokeKeys that is not a boolean, and nothing changes", async () => {
    expectFieldError(await removeWithKeys(fx.owner, fx.spare.id, "perhaps"), "/revokeKeys");
    expect(await roleOf(fx.org, fx.spare)).toBe("developer");
    expect(await capacityWith(fx.keys.spare.key)).toBe(200);
  });

  it("the last owner's refusal rolls back the key revocations too", async () => {
    const db = await getDb();
    const org = await insertOrg(db, { slug: `solo-${Date.now()}`, name: "Solo" });
    const solo = await addMember(db, org, "solo", "owner");
    const k = await createKey(db, { orgId: org.id, name: "solo key", mode: "test", scopes: ["compute"], createdByUserId: solo.id }, "cli");
    expectProblem(await consoleCall("DELETE", `${member(org, solo.id)}?revokeKeys=true`, { cookie: solo.cookie }), 409, "last-owner");
    expect(await capacityWith(k.key)).toBe(200);
  });
});

describe("the last owner", () => {
  let org: Org;
  let owner: Person;
  let dev: Person;
  beforeEach(async () => {
    const db = await getDb();
    org = await insertOrg(db, { slug: `solo-${Math.random().toString(36).slice(2)}`, name: "Solo" });
    owner = await addMember(db, org, "solo-owner", "owner");
    dev = await addMember(db, org, "solo-dev", "developer");
  });

  it("cannot be demoted, cannot leave and cannot be removed (409 last-owner), and nothing changes", async () => {
    expectProblem(await setRole(org, owner, owner.id, "developer"), 409, "last-owner");
    expectProblem(await remove(org, owner, owner.id), 409, "last-owner");
    expect(await roleOf(org, owner)).toBe("owner");
    expect((await listAudit(await getDb(), org.id)).length).toBe(0);
  });

  it("with a second owner, one owner can be demoted; the remaining one then cannot", async () => {
    expect((await setRole(org, owner, dev.id, "owner")).status).toBe(200);
    expect((await setRole(org, owner, owner.id, "billing")).status).toBe(200);
    expectProblem(await setRole(org, dev, dev.id, "developer"), 409, "last-owner");
    expectProblem(await remove(org, dev, dev.id), 409, "last-owner");
  });

  it("after transferring ownership, the former owner is a developer and can leave; the new owner is now the last", async () => {
    const res = await transfer(org, owner, dev.id);
    expect(res.status, res.text).toBe(200);
    expect(res.body).toMatchObject({ owner: { userId: dev.id, role: "owner" }, previousOwner: { userId: owner.id, role: "developer" } });
    expect(await roleOf(org, dev)).toBe("owner");
    expect(await roleOf(org, owner)).toBe("developer");
    // Owner-only routes now refuse the former owner.
    expectProblem(await consoleCall("GET", `/api/console/orgs/${org.slug}/audit`, { cookie: owner.cookie }), 403, "role-refused");

    const audit = (await listAudit(await getDb(), org.id)).filter((a) => a.action === "org.ownership_transferred");
    expect(audit).toMatchObject([{ actor: `user:${owner.id}`, target_type: "user", target_id: String(dev.id) }]);

    expect((await remove(org, owner, owner.id)).status).toBe(200);
    expectProblem(await remove(org, dev, dev.id), 409, "last-owner");
    expectProblem(await setRole(org, dev, dev.id, "billing"), 409, "last-owner");
  });

  it("transfer to oneself is 422, to someone outside the org 404", async () => {
    expectFieldError(await transfer(org, owner, owner.id), "/userId");
    const fx = await makeConsoleOrg();
    expectProblem(await transfer(org, owner, fx.owner.id), 404, "not-found");
    expect(await roleOf(org, owner)).toBe("owner");
  });
});
