import { createHash } from "node:crypto";
import { beforeEach, describe, expect, it, vi } from "vitest";
import { listAudit } from "@/db/queries/audit";
import { findMembership } from "@/db/queries/users";
import { sendMail } from "@/lib/mail/send";
import { expectFieldError, expectProblem } from "../helpers/api";
import { consoleCall, invite, inviteLinkTo, makeConsoleOrg, makePerson, sentMails, type ConsoleFixture } from "../helpers/console";

vi.mock(import("@/lib/mail/send"), async (orig) => ({ ...(await orig()), sendMail: vi.fn(async () => {}) }));

let fx: ConsoleFixture;
beforeEach(async () => {
  vi.mocked(sendMail).mockClear();
  fx = await makeConsoleOrg();
});

const invitations = () => `/api/console/orgs/${fx.org.slug}/invitations`;
const inviteAs = (cookie: string, body: unknown) => consoleCall("POST", invitations(), { cookie, body });
const accept = (cookie: string, token: string) => consoleCall("POST", "/api/console/invitations/accept", { cookie, body: { token } });

describe("inviting", () => {
  it("creates a pending invitation for a week and mails a single link to the console", async () => {
    const res = await inviteAs(fx.owner.cookie, { email: "Rin.Okafor@Example.com", role: "billing" });
    expect(res.status, res.text).toBe(201);
    const { invitation } = res.body as { invitation: { id: number; email: string; role: string; expiresAt: string } };
    expect(invitation).toMatchObject({ email: "rin.okafor@example.com", role: "billing" });
    const week = Date.now() + 7 * 86_400_000;
    expect(Math.abs(Date.parse(invitation.expiresAt) - week)).toBeLessThan(60_000);

    const mails = sentMails().filter((m) => m.to === "rin.okafor@example.com");
    expect(mails).toHaveLength(1);
    const { link, token } = inviteLinkTo("rin.okafor@example.com");
    // The link points at the console on the host the owner used.
    expect(link).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/console\/invite\/[A-Za-z0-9_-]{43}$/);
    expect(mails[0]!.text).toContain(fx.owner.email);

    // Only the SHA-256 of the token is stored.
    const row = await fx.db.selectFrom("invitations").selectAll().where("id", "=", invitation.id).executeTakeFirstOrThrow();
    expect(row.token_hash).toBe(createHash("sha256").update(token).digest("hex"));
    expect(JSON.stringify(row)).not.toContain(token);

    const audit = (await listAudit(fx.db, fx.org.id)).filter((a) => a.action === "member.invited");
    expect(audit).toHaveLength(1);
    expect(audit[0]).toMatchObject({ actor: `user:${fx.owner.id}`, target_type: "invitation", target_id: String(invitation.id) });
  });

  it("lists pending invitations to owners with who invited, and to nobody else", async () => {
    const made = (await inviteAs(fx.owner.cookie, { email: "pending@example.com", role: "developer" })).body.invitation;
    const owner = await consoleCall("GET", `/api/console/orgs/${fx.org.slug}/members`, { cookie: fx.owner.cookie });
    expect(owner.body.invitations).toContainEqual({ id: made.id, email: "pending@example.com", role: "developer", expiresAt: made.expiresAt, invitedBy: { id: fx.owner.id, email: fx.owner.email } });
    for (const p of [fx.developer, fx.billing]) {
      const res = await consoleCall("GET", `/api/console/orgs/${fx.org.slug}/members`, { cookie: p.cookie });
      expect(res.status).toBe(200);
      expect(res.body.invitations).toEqual([]);
      expect(res.body.members.length).toBe(5);
    }
  });

  it("refuses to invite someone who is already a member (409)", async () => {
    expectProblem(await inviteAs(fx.owner.cookie, { email: fx.developer.email.toUpperCase(), role: "billing" }), 409, "already-member");
    expect(sentMails()).toEqual([]);
  });

  it("a new invitation to the same address replaces the pending one: the earlier link stops working", async () => {
    const person = await makePerson(fx.db, "twice");
    await inviteAs(fx.owner.cookie, { email: person.email, role: "billing" });
    const first = inviteLinkTo(person.email).token;
    await inviteAs(fx.owner.cookie, { email: person.email, role: "developer" });
    const second = inviteLinkTo(person.email).token;
    expect(second).not.toBe(first);
    expectProblem(await accept(person.cookie, first), 410, "gone");
    expect((await accept(person.cookie, second)).body).toEqual({ org: { slug: fx.org.slug, name: fx.org.name }, role: "developer" });
  });

  it.each([
    ["a malformed address", { email: "not-an-address", role: "developer" }, "/email"],
    ["an unknown role", { email: "a@example.com", role: "admin" }, "/role"],
    ["a missing role", { email: "a@example.com" }, "/role"],
    ["an unknown field", { email: "a@example.com", role: "developer", org: "x" }, "/org"],
  ])("422 for %s", async (_name, body, pointer) => {
    expectFieldError(await inviteAs(fx.owner.cookie, body), pointer);
  });

  it("still creates the invitation when the mail server fails, and logs the failure without the token", async () => {
    vi.mocked(sendMail).mockRejectedValueOnce(new Error("connect ECONNREFUSED 127.0.0.1:2525"));
    const log = vi.spyOn(console, "error").mockImplementation(() => {});
    try {
      const res = await inviteAs(fx.owner.cookie, { email: "unlucky@example.com", role: "developer" });
      expect(res.status, res.text).toBe(201);
      await vi.waitFor(() => expect(log).toHaveBeenCalled());
      const { token } = inviteLinkTo("unlucky@example.com");
      const logged = log.mock.calls.flat().join(" ");
      expect(logged).toContain("unlucky@example.com");
      expect(logged).not.toContain(token);
    } finally {
      log.mockRestore();
    }
  });
});

describe("accepting", () => {
  it("the invited address joins with the invited role; the org then appears in /me beside the user's other orgs", async () => {
    const newcomer = await makePerson(fx.db, "newcomer");
    await inviteAs(fx.owner.cookie, { email: newcomer.email, role: "billing" });
    const { token } = inviteLinkTo(newcomer.email);

    // Someone in another org first, so the newcomer ends up in two.
    await fx.db.insertInto("memberships").values({ org_id: fx.other.id, user_id: newcomer.id, role: "developer", created_at: new Date().toISOString() }).execute();

    const res = await accept(newcomer.cookie, token);
    expect(res.status, res.text).toBe(200);
    expect(res.body).toEqual({ org: { slug: fx.org.slug, name: fx.org.name }, role: "billing" });
    expect((await findMembership(fx.db, fx.org.id, newcomer.id))?.role).toBe("billing");

    const me = await consoleCall("GET", "/api/console/me", { cookie: newcomer.cookie });
    expect(me.body.orgs).toEqual(
      expect.arrayContaining([
        { slug: fx.org.slug, name: fx.org.name, plan: "lighthouse", role: "billing" },
        { slug: fx.other.slug, name: fx.other.name, plan: "lighthouse", role: "developer" },
      ]),
    );
    expect(me.body.orgs).toHaveLength(2);

    const joined = (await listAudit(fx.db, fx.org.id)).filter((a) => a.action === "member.joined");
    expect(joined).toMatchObject([{ actor: `user:${newcomer.id}`, target_type: "user", target_id: String(newcomer.id) }]);
    // No longer pending.
    const list = await consoleCall("GET", `/api/console/orgs/${fx.org.slug}/members`, { cookie: fx.owner.cookie });
    expect(list.body.invitations.map((i: { email: string }) => i.email)).not.toContain(newcomer.email);
  });

  it("a token works once", async () => {
    const newcomer = await makePerson(fx.db, "once");
    const { token } = await invite(fx.db, fx.org, newcomer.email, "developer");
    expect((await accept(newcomer.cookie, token)).status).toBe(200);
    expectProblem(await accept(newcomer.cookie, token), 410, "gone");
  });

  it("an expired invitation is refused (410) and makes no member", async () => {
    const late = await makePerson(fx.db, "late");
    const { token } = await invite(fx.db, fx.org, late.email, "developer", new Date(Date.now() - 1000).toISOString());
    expectProblem(await accept(late.cookie, token), 410, "gone");
    expect(await findMembership(fx.db, fx.org.id, late.id)).toBeUndefined();
  });

  it("someone signed in with another address is refused (403), and the invitee can still accept afterwards", async () => {
    const invitee = await makePerson(fx.db, "invitee");
    const intruder = await makePerson(fx.db, "intruder");
    const { token } = await invite(fx.db, fx.org, invitee.email, "developer");
    expectProblem(await accept(intruder.cookie, token), 403, "invitation-mismatch");
    expect(await findMembership(fx.db, fx.org.id, intruder.id)).toBeUndefined();
    expect((await accept(invitee.cookie, token)).status).toBe(200);
  });

  it("an invitation for someone who is already a member is refused (409)", async () => {
    const { token } = await invite(fx.db, fx.org, fx.billing.email, "owner");
    expectProblem(await accept(fx.billing.cookie, token), 409, "already-member");
    expect((await findMembership(fx.db, fx.org.id, fx.billing.id))?.role).toBe("billing");
  });

  it("an unknown token is 404, a missing one 422", async () => {
    expectProblem(await accept(fx.owner.cookie, "A".repeat(43)), 404, "not-found");
    expectFieldError(await consoleCall("POST", "/api/console/invitations/accept", { cookie: fx.owner.cookie, body: {} }), "/token");
  });
});

describe("revoking", () => {
  it("a revoked invitation cannot be accepted, is audited, and cannot be revoked twice", async () => {
    const person = await makePerson(fx.db, "revoked");
    const { id, token } = await invite(fx.db, fx.org, person.email, "developer");
    const res = await consoleCall("DELETE", `${invitations()}/${id}`, { cookie: fx.owner.cookie });
    expect(res.status, res.text).toBe(200);
    expect(res.body.invitation.id).toBe(id);
    expectProblem(await accept(person.cookie, token), 410, "gone");
    expect((await listAudit(fx.db, fx.org.id)).filter((a) => a.action === "invitation.revoked").map((a) => a.target_id)).toEqual([String(id)]);
    expectProblem(await consoleCall("DELETE", `${invitations()}/${id}`, { cookie: fx.owner.cookie }), 404, "not-found");
  });

  it("an accepted invitation is no longer there to revoke", async () => {
    const person = await makePerson(fx.db, "accepted");
    const { id, token } = await invite(fx.db, fx.org, person.email, "developer");
    await accept(person.cookie, token);
    expectProblem(await consoleCall("DELETE", `${invitations()}/${id}`, { cookie: fx.owner.cookie }), 404, "not-found");
    expect((await findMembership(fx.db, fx.org.id, person.id))?.role).toBe("developer");
  });
});
