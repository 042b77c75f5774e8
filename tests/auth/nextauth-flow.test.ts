import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { getDb, nowIso } from "@/db";
import { insertAuthUser } from "@/db/queries/auth";
import { findUserByEmail } from "@/db/queries/users";
import { readMailbox, waitForMessage } from "@/fakes/mailbox";
import { resetAuthLimits } from "@/lib/auth/brute-force";
import { hashPassword } from "@/lib/auth/passwords";
import { linksIn, ORIGIN, postFromConsole, startMailbox } from "./helpers";
import { NextAuthBrowser } from "./nextauth-browser";

/** next-auth's real route handler, end to end (tests/auth/nextauth-browser.ts answers next/headers from the request). */
let mailbox: Awaited<ReturnType<typeof startMailbox>>;
beforeAll(async () => {
  mailbox = await startMailbox();
  process.env.NEXTAUTH_URL = ORIGIN;
});
afterAll(async () => {
  delete process.env.NEXTAUTH_URL;
  await mailbox.stop();
});
beforeEach(() => resetAuthLimits());

describe("next-auth e-mail sign-in through the route handler", () => {
  it("a link for a new address creates the user, signs in once, and the session carries id and e-mail", async () => {
    const email = "first.visit@example.com";
    const b = new NextAuthBrowser();
    const since = new Date();
    const asked = await b.call("POST", "/api/auth/signin/email", { email, csrfToken: await b.csrf(), callbackUrl: "/console", json: "true" });
    const next = ((await asked.json()) as { url: string }).url;
    expect((await b.call("GET", next)).headers.get("location")).toBe("/signin/check-mail");

    const m = await waitForMessage(mailbox.dir, email, { since });
    expect(m.subject).toBe("Your Paritas sign-in link");
    const link = linksIn(m.text).find((l) => l.includes("/api/auth/callback/email"))!;
    const token = new URL(link).searchParams.get("token")!;
    const stored = await (await getDb()).selectFrom("verification_tokens").select("token_hash").where("identifier", "=", email).execute();
    expect(JSON.stringify(stored)).not.toContain(token);

    const followed = await b.call("GET", link);
    expect(followed.status).toBe(302);
    expect(followed.headers.get("location")).toBe(`${ORIGIN}/console`);
    const user = (await findUserByEmail(await getDb(), email))!;
    expect(user.email_verified).not.toBeNull();
    expect(await b.session()).toMatchObject({ userId: user.id, email, token: { epoch: 0 } });

    const stranger = new NextAuthBrowser();
    const again = await stranger.call("GET", link);
    expect((await stranger.call("GET", again.headers.get("location")!)).headers.get("location")).toBe("/signin?error=Verification");
    expect(await stranger.session()).toBeNull();
  });

  it("after 5 links in 15 minutes for one address, the next request is refused (AccessDenied) and nothing is sent", async () => {
    const email = "eager@example.com";
    const b = new NextAuthBrowser();
    for (let i = 0; i < 5; i++) await b.call("POST", "/api/auth/signin/email", { email, csrfToken: await b.csrf(), json: "true" });
    const refused = await b.call("POST", "/api/auth/signin/email", { email, csrfToken: await b.csrf(), json: "true" });
    const next = ((await refused.json()) as { url: string }).url;
    expect((await b.call("GET", next)).headers.get("location")).toBe("/signin?error=AccessDenied");
    await new Promise((r) => setTimeout(r, 200));
    expect((await readMailbox(mailbox.dir)).filter((m) => m.to === email)).toHaveLength(5);
  });
});

describe("next-auth password sign-in through the route handler", () => {
  it("the right password sets a session; a wrong one answers CredentialsSignin; too many answer locked", async () => {
    const email = "password.user@example.com";
    const password = "a decent passphrase";
    const user = await insertAuthUser(await getDb(), { email, name: "P. User", passwordHash: await hashPassword(password), emailVerified: nowIso() });
    const b = new NextAuthBrowser();
    const tryPassword = async (pw: string) => {
      const res = await b.call("POST", "/api/auth/callback/credentials", { email, password: pw, csrfToken: await b.csrf(), json: "true" });
      return new URL(((await res.json()) as { url: string }).url).searchParams.get("error");
    };

    expect(await tryPassword("not it at all")).toBe("CredentialsSignin");
    expect(await b.session()).toBeNull();
    expect(await tryPassword(password)).toBeNull();
    expect(await b.session()).toMatchObject({ userId: user.id, email, token: { epoch: 0 } });

    for (let i = 0; i < 5; i++) await tryPassword("still not it");
    expect(await tryPassword(password)).toBe("locked");
  });
});

describe("sign-up, then the e-mail link, then the password", () => {
  it("the password chosen at sign-up works once the e-mail link has been followed", async () => {
    const email = "newcomer@example.com";
    const password = "chosen at sign-up";
    expect((await postFromConsole("/api/console/auth/signup", { name: "New Comer", email, password })).status).toBe(202);
    const b = new NextAuthBrowser();
    const signInWithPassword = async () => {
      const res = await b.call("POST", "/api/auth/callback/credentials", { email, password, csrfToken: await b.csrf(), json: "true" });
      return new URL(((await res.json()) as { url: string }).url).searchParams.get("error");
    };
    expect(await signInWithPassword()).toBe("CredentialsSignin");

    // What the sign-up page does next: ask next-auth for a link to the address.
    const since = new Date();
    await b.call("POST", "/api/auth/signin/email", { email, csrfToken: await b.csrf(), callbackUrl: "/console", json: "true" });
    const link = linksIn((await waitForMessage(mailbox.dir, email, { since })).text).find((l) => l.includes("/api/auth/callback/email"))!;
    await new NextAuthBrowser().call("GET", link);

    expect(await signInWithPassword()).toBeNull();
    expect(await b.session()).toMatchObject({ email });
  });
});
