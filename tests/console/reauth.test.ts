import { decode } from "next-auth/jwt";
import { beforeEach, describe, expect, it, vi } from "vitest";
import { setPassword } from "@/db/queries/auth";
import { createKey } from "@/lib/api/key-service";
import { allScopes } from "@/lib/api/scopes";
import { resetAuthLimits } from "@/lib/auth/brute-force";
import { hashPassword } from "@/lib/auth/passwords";
import { authSecret, REAUTH_WINDOW_SECONDS, sessionCookie } from "@/lib/auth/session-token";
import { expectFieldError, expectProblem } from "../helpers/api";
import { consoleCall, makeConsoleOrg, type ConsoleFixture, type Person } from "../helpers/console";

vi.mock(import("@/lib/mail/send"), async (orig) => ({ ...(await orig()), sendMail: vi.fn(async () => {}) }));

const PASSWORD = "correct horse battery";
/** Just past the documented window: a confirmation this old no longer counts. */
const STALE = REAUTH_WINDOW_SECONDS + 1;

let fx: ConsoleFixture;
/** A live key of the owner's (the fixture's own keys are test keys). */
let liveKeyId: number;
beforeEach(async () => {
  resetAuthLimits();
  fx = await makeConsoleOrg();
  liveKeyId = (await createKey(fx.db, { orgId: fx.org.id, name: "live key", mode: "live", scopes: allScopes, createdByUserId: fx.owner.id }, `user:${fx.owner.id}`)).record.id;
});

const orgPath = () => `/api/console/orgs/${fx.org.slug}`;
const staleCookie = (p: Person, agoSeconds = STALE) => sessionCookie({ userId: p.id, email: p.email }, 3600, 0, agoSeconds);
const confirm = (cookie: string, password: string) => consoleCall("POST", "/api/console/auth/confirm", { cookie, body: { password } });

/** What the three sensitive actions could change: the org's keys, its memberships and its audit rows. */
async function orgState() {
  const count = async (table: "api_keys" | "memberships" | "audit_log") =>
    (await fx.db.selectFrom(table).select((eb) => eb.fn.countAll<number>().as("n")).where("org_id", "=", fx.org.id).executeTakeFirstOrThrow()).n;
  const roles = await fx.db.selectFrom("memberships").select(["user_id", "role"]).where("org_id", "=", fx.org.id).orderBy("user_id").execute();
  return { keys: await count("api_keys"), members: await count("memberships"), audit: await count("audit_log"), roles };
}

/** The session cookie a response sets, as a Cookie header value. */
function setCookie(res: { headers: Record<string, unknown> }): string {
  const raw = res.headers["set-cookie"];
  const all = Array.isArray(raw) ? (raw as string[]) : [String(raw)];
  const session = all.filter((c) => c.startsWith("next-auth.session-token=")).at(-1);
  if (!session) throw new Error(`no session cookie in ${JSON.stringify(raw)}`);
  return session.split(";")[0]!;
}

const sensitive = {
  "creating a live key": (cookie: string) => consoleCall("POST", `${orgPath()}/keys`, { cookie, body: { name: "live one", scopes: ["compute"], mode: "live" } }),
  "transferring ownership": (cookie: string) => consoleCall("POST", `${orgPath()}/transfer`, { cookie, body: { userId: fx.spare.id } }),
  "removing another member": (cookie: string) => consoleCall("DELETE", `${orgPath()}/members/${fx.spare.id}`, { cookie }),
  // A rotation issues a new live secret, so it asks like creating one.
  "rotating a live key": (cookie: string) => consoleCall("POST", `${orgPath()}/keys/${liveKeyId}/rotate`, { cookie, body: { overlapMinutes: 60 } }),
};
const expected = { "creating a live key": 201, "transferring ownership": 200, "removing another member": 200, "rotating a live key": 201 };

describe("sensitive actions with a confirmation older than the window", () => {
  it.each(Object.keys(sensitive) as (keyof typeof sensitive)[])("%s: 403 reauth-required and nothing changes", async (action) => {
    const before = await orgState();
    const body = expectProblem(await sensitive[action](await staleCookie(fx.owner)), 403, "reauth-required");
    expect(body.detail).toMatch(/15 minutes/);
    expect(await orgState()).toEqual(before);
  });

  it.each(Object.keys(sensitive) as (keyof typeof sensitive)[])("%s: allowed with a confirmation just inside the window", async (action) => {
    const res = await sensitive[action](await staleCookie(fx.owner, REAUTH_WINDOW_SECONDS - 5));
    expect(res.status, res.text).toBe(expected[action]);
  });

  it("a test key (created or rotated), leaving oneself and a role change do not ask", async () => {
    const owner = await staleCookie(fx.owner);
    const key = await consoleCall("POST", `${orgPath()}/keys`, { cookie: owner, body: { name: "test one", scopes: ["compute"], mode: "test" } });
    expect(key.status, key.text).toBe(201);
    expect(key.body.record.mode).toBe("test");
    const rotated = await consoleCall("POST", `${orgPath()}/keys/${fx.keys.owner.record.id}/rotate`, { cookie: owner, body: { overlapMinutes: 60 } });
    expect(rotated.status, rotated.text).toBe(201);
    const role = await consoleCall("PATCH", `${orgPath()}/members/${fx.spare.id}`, { cookie: owner, body: { role: "billing" } });
    expect(role.status, role.text).toBe(200);
    const leave = await consoleCall("DELETE", `${orgPath()}/members/${fx.coOwner.id}`, { cookie: await staleCookie(fx.coOwner) });
    expect(leave.status, leave.text).toBe(200);
  });

  it("a developer removing someone is refused for the role, not asked for a password first", async () => {
    expectProblem(await sensitive["removing another member"](await staleCookie(fx.developer)), 403, "role-refused");
  });

  it("PARITAS_REAUTH_WINDOW_SECONDS narrows the window", async () => {
    vi.stubEnv("PARITAS_REAUTH_WINDOW_SECONDS", "30");
    try {
      const body = expectProblem(await sensitive["creating a live key"](await staleCookie(fx.owner, 60)), 403, "reauth-required");
      expect(body.detail).toMatch(/30 seconds/);
    } finally {
      vi.unstubAllEnvs();
    }
  });
});

describe("POST /api/console/auth/confirm", () => {
  beforeEach(async () => {
    await setPassword(fx.db, fx.owner.id, await hashPassword(PASSWORD));
  });

  it("a wrong password: 422 pointing at /password, and the session stays unconfirmed", async () => {
    const stale = await staleCookie(fx.owner);
    const res = await confirm(stale, "not the password at all");
    expectFieldError(res, "/password", /not this account's password/);
    expect(res.headers["set-cookie"]).toBeUndefined();
    expectProblem(await sensitive["creating a live key"](stale), 403, "reauth-required");
  });

  it("the right password: a new cookie, keeping sign-in time and epoch, whose next sensitive call succeeds", async () => {
    const stale = await staleCookie(fx.owner);
    const res = await confirm(stale, PASSWORD);
    expect(res.status, res.text).toBe(200);
    expect(res.body).toEqual({ confirmed: true, validForSeconds: REAUTH_WINDOW_SECONDS });
    const fresh = setCookie(res);
    const [oldJwt, newJwt] = await Promise.all([stale, fresh].map((c) => decode({ token: c.slice(c.indexOf("=") + 1), secret: authSecret() })));
    expect(newJwt?.signedInAt).toBe(oldJwt?.signedInAt);
    expect(newJwt?.epoch).toBe(oldJwt?.epoch);
    expect(Number(newJwt?.confirmedAt)).toBeGreaterThan(Number(oldJwt?.confirmedAt));
    const key = await sensitive["creating a live key"](fresh);
    expect(key.status, key.text).toBe(201);
    expect(key.body.record.mode).toBe("live");
  });

  it("writes no audit row", async () => {
    const before = await orgState();
    expect((await confirm(await staleCookie(fx.owner), PASSWORD)).status).toBe(200);
    expect(await orgState()).toEqual(before);
  });

  it("a user without a password (e-mail link only) is told to confirm with a sign-in link", async () => {
    const res = await confirm(await staleCookie(fx.coOwner), "anything at all");
    expectFieldError(res, "/password", /sign-in link to your address/);
  });

  it("wrong passwords count with sign-in's failures: after five the right one is refused too", async () => {
    const stale = await staleCookie(fx.owner);
    for (let i = 0; i < 5; i++) expectFieldError(await confirm(stale, `wrong guess ${i}`), "/password");
    const locked = await confirm(stale, PASSWORD);
    expectProblem(locked, 429, "rate-limited");
    // Sign-in's per-address-and-IP window is 15 minutes (lib/auth/brute-force.ts): the wait is within it.
    expect(Number(locked.headers["retry-after"])).toBeGreaterThan(0);
    expect(Number(locked.headers["retry-after"])).toBeLessThanOrEqual(15 * 60);
  });

  it("needs a session and the console's origin", async () => {
    expectProblem(await consoleCall("POST", "/api/console/auth/confirm", { body: { password: PASSWORD } }), 401, "signed-out");
    expectProblem(await consoleCall("POST", "/api/console/auth/confirm", { cookie: fx.owner.cookie, body: { password: PASSWORD }, origin: "http://evil.example" }), 403, "cross-origin");
  });
});
