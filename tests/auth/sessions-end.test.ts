import { encode } from "next-auth/jwt";
import { NextRequest } from "next/server";
import { afterEach, beforeAll, describe, expect, it, vi } from "vitest";
import { findSessionUser } from "@/db/queries/sessions";
import { hashToken } from "@/lib/auth/adapter";
import { authOptions } from "@/lib/auth/options";
import { authSecret, SESSION_IDLE_SECONDS, SESSION_LIFETIME_SECONDS, sessionCookie } from "@/lib/auth/session";
import proxy from "@/proxy";
import { expectProblem } from "../helpers/api";
import { consoleCall, makeConsoleOrg, type ConsoleFixture, type Person } from "../helpers/console";

vi.mock(import("@/lib/mail/send"), async (orig) => ({ ...(await orig()), sendMail: vi.fn(async () => {}) }));

let fx: ConsoleFixture;
beforeAll(async () => {
  fx = await makeConsoleOrg();
});
afterEach(() => vi.useRealTimers());

const me = (cookie: string) => consoleCall("GET", "/api/console/me", { cookie });
const members = (cookie: string) => consoleCall("GET", `/api/console/orgs/${fx.org.slug}/members`, { cookie });
/** A session cookie minted `secondsAgo` in the past, as if last used then. */
async function cookieFrom(secondsAgo: number, p: Person, maxAge = 3600): Promise<string> {
  vi.useFakeTimers({ toFake: ["Date"] });
  vi.setSystemTime(Date.now() - secondsAgo * 1000);
  const cookie = await sessionCookie({ userId: p.id, email: p.email }, maxAge, await epochOf(p));
  vi.useRealTimers();
  return cookie;
}
const epochOf = async (p: Person) => (await findSessionUser(fx.db, p.id))!.session_epoch;
/** A session cookie as a user's browser holds it right after sign-in, with the epoch the sign-in writes into it. */
const freshSession = async (p: Person) => sessionCookie({ userId: p.id, email: p.email }, 3600, await epochOf(p));

describe("idle timeout and lifetime", () => {
  it("the documented numbers: 30 minutes idle, 24 hours from sign-in, the lifetime also next-auth's maxAge", () => {
    expect(SESSION_IDLE_SECONDS).toBe(30 * 60);
    expect(SESSION_LIFETIME_SECONDS).toBe(24 * 60 * 60);
    expect(authOptions().session?.maxAge).toBe(SESSION_LIFETIME_SECONDS);
  });

  it("a session unused for longer than the idle timeout gets 401 signed-out", async () => {
    const idle = await cookieFrom(SESSION_IDLE_SECONDS + 60, fx.developer);
    expectProblem(await me(idle), 401, "signed-out");
    expectProblem(await members(idle), 401, "signed-out");
  });

  it("a session used within the idle timeout works, and the answer renews its cookie with the same attributes", async () => {
    const recent = await cookieFrom(SESSION_IDLE_SECONDS - 120, fx.developer);
    const res = await me(recent);
    expect(res.status).toBe(200);
    const set = ([] as string[]).concat(res.headers["set-cookie"] ?? []);
    expect(set).toHaveLength(1);
    expect(set[0]).toMatch(/^next-auth\.session-token=[^;]+; Path=\/; Max-Age=\d+; HttpOnly; SameSite=Lax$/);
    // The renewed cookie starts a new idle period but keeps the sign-in time: its Max-Age is what is left of the lifetime.
    const maxAge = Number(/Max-Age=(\d+)/.exec(set[0]!)![1]);
    expect(maxAge).toBeGreaterThan(SESSION_LIFETIME_SECONDS - SESSION_IDLE_SECONDS - 10);
    expect(maxAge).toBeLessThanOrEqual(SESSION_LIFETIME_SECONDS - (SESSION_IDLE_SECONDS - 120));
    expect((await me(set[0]!.split(";")[0]!)).status).toBe(200);
  });

  it("a cookie issued moments ago is not re-issued on every call", async () => {
    const res = await me(fx.developer.cookie);
    expect(res.status).toBe(200);
    expect(res.headers["set-cookie"]).toBeUndefined();
  });

  it("a session renewed a minute ago but signed in more than the lifetime ago is refused", async () => {
    const signedInAt = Math.floor(Date.now() / 1000) - SESSION_LIFETIME_SECONDS - 60;
    const token = await encode({ token: { sub: String(fx.developer.id), email: fx.developer.email, epoch: await epochOf(fx.developer), signedInAt }, secret: authSecret(), maxAge: 3600 });
    expectProblem(await me(`next-auth.session-token=${token}`), 401, "signed-out");
  });

  it("proxy.ts sends an idle session's page request to sign in", async () => {
    const idle = await cookieFrom(SESSION_IDLE_SECONDS + 60, fx.developer);
    const res = await proxy(new NextRequest(`http://localhost:3000/console/${fx.org.slug}`, { headers: { cookie: idle } }));
    expect(res.status).toBe(307);
    expect(new URL(res.headers.get("location")!).pathname).toBe("/signin");
  });
});

describe("cookie attributes", () => {
  const saved = process.env.NEXTAUTH_URL;
  afterEach(() => {
    if (saved === undefined) delete process.env.NEXTAUTH_URL;
    else process.env.NEXTAUTH_URL = saved;
  });

  it("HttpOnly and SameSite=Lax always; Secure with the __Secure- name when the public origin is https", () => {
    process.env.NEXTAUTH_URL = "https://paritas.example.com";
    const https = authOptions();
    expect(https.useSecureCookies).toBe(true);
    expect(https.cookies?.sessionToken).toEqual({ name: "__Secure-next-auth.session-token", options: { httpOnly: true, sameSite: "lax", path: "/", secure: true } });
    process.env.NEXTAUTH_URL = "http://localhost:3000";
    const http = authOptions();
    expect(http.useSecureCookies).toBe(false);
    expect(http.cookies?.sessionToken).toEqual({ name: "next-auth.session-token", options: { httpOnly: true, sameSite: "lax", path: "/", secure: false } });
  });
});

describe("a password reset ends the account's other sessions", () => {
  it("an old session gets 401 after the reset; one issued after works, and sign-in writes the new epoch", async () => {
    const p = fx.billing;
    const before = await freshSession(p);
    expect((await me(before)).status).toBe(200);

    const token = `reset-token-${p.id}-${Date.now()}`;
    await fx.db
      .insertInto("verification_tokens")
      .values({ identifier: p.email, token_hash: hashToken(token), purpose: "password-reset", expires_at: new Date(Date.now() + 3_600_000).toISOString() })
      .execute();
    // The browser that does the reset is sent to sign in with the new password (its own session ends too).
    const done = await consoleCall("POST", "/api/console/auth/reset-confirm", { cookie: before, body: { token, password: "a brand new password" } });
    expect(done.status).toBe(200);
    expect(done.body.next).toBe("sign-in");

    expectProblem(await me(before), 401, "signed-out");
    expectProblem(await members(before), 401, "signed-out");

    const jwt = authOptions().callbacks!.jwt!;
    const issued = await jwt({ token: {}, user: { id: String(p.id), email: p.email }, account: null, trigger: "signIn" });
    expect(issued.epoch).toBe(await epochOf(p));
    expect(issued.epoch).toBe(1);
    const after = await sessionCookie({ userId: p.id, email: p.email }, 3600, issued.epoch as number);
    expect((await me(after)).status).toBe(200);
    expect((await members(after)).status).toBe(200);
    // The reset itself is not a session: nothing was set for the browser that made it.
    expect(done.headers["set-cookie"]).toBeUndefined();
  });
});

describe("a removal from an organisation ends the removed person's sessions", () => {
  it("the removed member's old session gets 401; a session issued after works; the owner's own is untouched", async () => {
    const local = await makeConsoleOrg();
    const old = await freshSession(local.spare);
    expect((await me(old)).status).toBe(200);

    const res = await consoleCall("DELETE", `/api/console/orgs/${local.org.slug}/members/${local.spare.id}`, { cookie: local.owner.cookie });
    expect(res.status).toBe(200);

    expectProblem(await me(old), 401, "signed-out");
    const after = await freshSession(local.spare);
    const mine = await me(after);
    expect(mine.status).toBe(200);
    expect(mine.body.orgs).toEqual([]);
    expect((await me(local.owner.cookie)).status).toBe(200);
  });

  it("leaving keeps one's own session (only a removal by someone else ends them)", async () => {
    const local = await makeConsoleOrg();
    const res = await consoleCall("DELETE", `/api/console/orgs/${local.org.slug}/members/${local.developer.id}`, { cookie: local.developer.cookie });
    expect(res.status).toBe(200);
    expect((await me(local.developer.cookie)).status).toBe(200);
    expect(await epochOf(local.developer)).toBe(0);
  });
});
