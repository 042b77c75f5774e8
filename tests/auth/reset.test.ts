import { createHash } from "node:crypto";
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { getDb, nowIso } from "@/db";
import { insertAuthUser } from "@/db/queries/auth";
import { findUserByEmail } from "@/db/queries/users";
import { readMailbox, waitForMessage } from "@/fakes/mailbox";
import { resetAuthLimits } from "@/lib/auth/brute-force";
import { authorizeCredentials } from "@/lib/auth/options";
import { hashPassword } from "@/lib/auth/passwords";
import { expectFieldError, expectProblem, postJson } from "../helpers/api";
import { linksIn, ORIGIN, postFromConsole, startMailbox } from "./helpers";

const REQUEST = "/api/console/auth/reset-request";
const CONFIRM = "/api/console/auth/reset-confirm";
const OLD = "the old password";
const NEW = "a brand new password";

let mailbox: Awaited<ReturnType<typeof startMailbox>>;
beforeAll(async () => {
  mailbox = await startMailbox();
});
afterAll(() => mailbox.stop());
beforeEach(() => resetAuthLimits());

let n = 0;
async function makeUser(verified = true) {
  const email = `resetter${++n}@example.com`;
  await insertAuthUser(await getDb(), { email, name: "Resetter", passwordHash: await hashPassword(OLD), emailVerified: verified ? nowIso() : null });
  return email;
}

/** Ask for a reset link and return the token from the mailed link. */
async function requestLink(email: string): Promise<string> {
  const since = new Date();
  expect((await postFromConsole(REQUEST, { email })).status).toBe(202);
  const m = await waitForMessage(mailbox.dir, email, { since });
  const link = linksIn(m.text).find((l) => l.startsWith(`${ORIGIN}/reset/`));
  expect(link, m.text).toBeTruthy();
  return link!.slice(`${ORIGIN}/reset/`.length);
}

const signIn = (email: string, password: string) => authorizeCredentials({ email, password }, {});
const tokenRows = async () => (await getDb()).selectFrom("verification_tokens").selectAll().where("purpose", "=", "password-reset").execute();

describe("password reset: happy path", () => {
  it("the mailed link sets a new password, once", async () => {
    const email = await makeUser();
    const token = await requestLink(email);
    expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/);

    const res = await postFromConsole(CONFIRM, { token, password: NEW });
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ next: "sign-in", detail: expect.any(String) });
    expect(await signIn(email, NEW)).not.toBeNull();
    expect(await signIn(email, OLD)).toBeNull();

    expectProblem(await postFromConsole(CONFIRM, { token, password: "yet another password" }), 410, "reset-link-invalid");
    expect(await signIn(email, NEW)).not.toBeNull();
  });

  it("only the SHA-256 of the token is stored, valid for one hour", async () => {
    const email = await makeUser();
    const before = Date.now();
    const token = await requestLink(email);
    const rows = (await tokenRows()).filter((r) => r.identifier === email);
    expect(rows).toHaveLength(1);
    expect(rows[0]!.token_hash).toBe(createHash("sha256").update(token).digest("hex"));
    expect(JSON.stringify(rows)).not.toContain(token);
    const ttl = Date.parse(rows[0]!.expires_at) - before;
    expect(ttl).toBeGreaterThan(59 * 60_000);
    expect(ttl).toBeLessThanOrEqual(61 * 60_000);
  });

  it("using the newest link also voids older ones", async () => {
    const email = await makeUser();
    const first = await requestLink(email);
    const second = await requestLink(email);
    expect((await postFromConsole(CONFIRM, { token: second, password: NEW })).status).toBe(200);
    expectProblem(await postFromConsole(CONFIRM, { token: first, password: "another password" }), 410, "reset-link-invalid");
  });

  it("a reset confirms an address whose sign-up was never confirmed", async () => {
    const email = await makeUser(false);
    expect(await signIn(email, OLD)).toBeNull();
    await postFromConsole(CONFIRM, { token: await requestLink(email), password: NEW });
    expect(await signIn(email, NEW)).not.toBeNull();
  });
});

describe("password reset: the same answer for every address", () => {
  it("an unknown address gets the same status and body, and no mail is sent", async () => {
    const known = await postFromConsole(REQUEST, { email: await makeUser() });
    const unknown = await postFromConsole(REQUEST, { email: "never-registered@example.com" });
    expect(unknown.status).toBe(202);
    expect(unknown.body).toEqual(known.body);
    expect(unknown.headers["content-type"]).toBe(known.headers["content-type"]);
    await new Promise((r) => setTimeout(r, 300));
    expect((await readMailbox(mailbox.dir)).some((m) => m.to.includes("never-registered"))).toBe(false);
    expect((await tokenRows()).some((r) => r.identifier === "never-registered@example.com")).toBe(false);
  });

  it("at most 3 links per address per hour: later requests still answer 202 but send nothing", async () => {
    const email = await makeUser();
    for (let i = 0; i < 3; i++) await requestLink(email);
    expect((await postFromConsole(REQUEST, { email })).status).toBe(202);
    await new Promise((r) => setTimeout(r, 300));
    expect((await readMailbox(mailbox.dir)).filter((m) => m.to === email)).toHaveLength(3);
  });
});

describe("password reset: refused links and input", () => {
  it("an expired link is refused and the password stays", async () => {
    const email = await makeUser();
    const token = await requestLink(email);
    await (await getDb()).updateTable("verification_tokens").set({ expires_at: new Date(Date.now() - 1000).toISOString() }).where("identifier", "=", email).execute();
    expectProblem(await postFromConsole(CONFIRM, { token, password: NEW }), 410, "reset-link-invalid");
    expect(await signIn(email, OLD)).not.toBeNull();
  });

  it("an unknown token is refused the same way", async () => {
    expectProblem(await postFromConsole(CONFIRM, { token: "A".repeat(43), password: NEW }), 410, "reset-link-invalid");
  });

  it("a sign-in link's token cannot reset a password", async () => {
    const email = await makeUser();
    const token = "B".repeat(43);
    await (await getDb())
      .insertInto("verification_tokens")
      .values({ identifier: email, token_hash: createHash("sha256").update(token).digest("hex"), purpose: "sign-in", expires_at: new Date(Date.now() + 600_000).toISOString() })
      .execute();
    expectProblem(await postFromConsole(CONFIRM, { token, password: NEW }), 410, "reset-link-invalid");
  });

  it("a weak new password is a 422 and does not use up the link", async () => {
    const email = await makeUser();
    const token = await requestLink(email);
    expectFieldError(await postFromConsole(CONFIRM, { token, password: "short" }), "/password", /at least 10/);
    expect((await postFromConsole(CONFIRM, { token, password: NEW })).status).toBe(200);
  });

  it("a malformed request is a 422 with pointers", async () => {
    expectFieldError(await postFromConsole(REQUEST, { email: "nope" }), "/email");
    expectFieldError(await postFromConsole(CONFIRM, { password: NEW }), "/token");
  });
});

describe("password reset: security", () => {
  it("cross-origin POSTs are 403 and send nothing", async () => {
    const email = await makeUser();
    expectProblem(await postJson(REQUEST, { email }, undefined, { origin: "https://elsewhere.example" }), 403, "cross-origin");
    expectProblem(await postJson(CONFIRM, { token: "A".repeat(43), password: NEW }, undefined, { origin: "https://elsewhere.example" }), 403, "cross-origin");
    expectProblem(await postJson(REQUEST, { email }), 403, "cross-origin");
    await new Promise((r) => setTimeout(r, 200));
    expect((await readMailbox(mailbox.dir)).some((m) => m.to === email)).toBe(false);
  });

  it("10 requests per hour per IP, then 429 with Retry-After", async () => {
    const ip = { "x-forwarded-for": "198.51.100.77" };
    for (let i = 0; i < 10; i++) expect((await postFromConsole(REQUEST, { email: `nobody${i}@example.com` }, ip)).status).toBe(202);
    const res = await postFromConsole(REQUEST, { email: "nobody@example.com" }, ip);
    expectProblem(res, 429, "rate-limited");
    expect(res.headers["retry-after"]).toBeTruthy();
  });

  it("links point at NEXTAUTH_URL when it is set, not at whatever Host the request names", async () => {
    process.env.NEXTAUTH_URL = "https://console.paritas.example/";
    try {
      const email = await makeUser();
      const since = new Date();
      await postFromConsole(REQUEST, { email }, { host: "attacker.example" });
      const m = await waitForMessage(mailbox.dir, email, { since });
      expect(linksIn(m.text).some((l) => l.startsWith("https://console.paritas.example/reset/"))).toBe(true);
      expect(m.text).not.toContain("attacker.example");
    } finally {
      delete process.env.NEXTAUTH_URL;
    }
  });

  it("a user with a new password after a reset is found by the lower-cased address", async () => {
    const email = await makeUser();
    await postFromConsole(CONFIRM, { token: await requestLink(email.toUpperCase()), password: NEW });
    expect((await findUserByEmail(await getDb(), email))!.password_hash).toMatch(/^\$2/);
    expect(await signIn(email, NEW)).not.toBeNull();
  });
});
