import bcrypt from "bcryptjs";
import { encode } from "next-auth/jwt";
import { beforeEach, describe, expect, it, vi } from "vitest";
import { getDb, nowIso } from "@/db";
import { insertAuthUser } from "@/db/queries/auth";
import { resetAuthLimits } from "@/lib/auth/brute-force";
import { authOptions, authorizeCredentials, LOCKED } from "@/lib/auth/options";
import { bcryptCost, hashPassword, verifyPassword } from "@/lib/auth/passwords";
import { authSecret, readSession } from "@/lib/auth/session";
import "./helpers";

const PASSWORD = "correct horse battery";
let n = 0;

async function makeUser(opts: { verified?: boolean; password?: string | null } = {}) {
  const email = `member${++n}@example.com`;
  const password = opts.password === undefined ? PASSWORD : opts.password;
  const user = await insertAuthUser(await getDb(), {
    email,
    name: `Member ${n}`,
    passwordHash: password === null ? null : await hashPassword(password),
    emailVerified: opts.verified === false ? null : nowIso(),
  });
  return { ...user, email };
}

const ipHeaders = (ip: string) => ({ "x-forwarded-for": ip });
const signIn = (email: string, password: string, ip = "198.51.100.7") => authorizeCredentials({ email, password }, ipHeaders(ip));

beforeEach(() => {
  resetAuthLimits();
  vi.restoreAllMocks();
});

describe("passwords", () => {
  it("are bcrypt hashes, never the password itself", async () => {
    const hash = await hashPassword(PASSWORD);
    expect(hash).toMatch(/^\$2[aby]\$04\$/);
    expect(hash).not.toContain(PASSWORD);
    expect(await verifyPassword(PASSWORD, hash)).toBe(true);
    expect(await verifyPassword("wrong password!", hash)).toBe(false);
  });

  it("cost is 10 in production whatever the environment asks for", () => {
    vi.stubEnv("NODE_ENV", "production");
    expect(bcryptCost()).toBe(10);
    vi.unstubAllEnvs();
    expect(bcryptCost()).toBe(4);
  });
});

describe("credentials authorize", () => {
  it("the right password gives the user, with a string id", async () => {
    const u = await makeUser();
    expect(await signIn(u.email.toUpperCase(), PASSWORD)).toEqual({ id: String(u.id), email: u.email, name: u.name });
  });

  it("a wrong password, an unknown address, no password and missing fields are all null", async () => {
    const u = await makeUser();
    const linkOnly = await makeUser({ password: null });
    expect(await signIn(u.email, "not the password")).toBeNull();
    expect(await signIn("nobody@example.com", PASSWORD)).toBeNull();
    expect(await signIn(linkOnly.email, PASSWORD)).toBeNull();
    expect(await authorizeCredentials(undefined, {})).toBeNull();
    expect(await authorizeCredentials({ email: u.email, password: "" }, {})).toBeNull();
  });

  it("an unknown address costs a bcrypt comparison against a dummy hash, like a wrong password", async () => {
    const u = await makeUser();
    const compare = vi.spyOn(bcrypt, "compare");
    await signIn(u.email, "not the password");
    await signIn("nobody@example.com", PASSWORD);
    expect(compare).toHaveBeenCalledTimes(2);
    const [realHash, dummyHash] = compare.mock.calls.map((call) => call[1]);
    expect(realHash).toMatch(/^\$2[aby]\$/);
    expect(dummyHash).toMatch(/^\$2[aby]\$04\$/);
    expect(dummyHash).not.toBe(realHash);
  });

  it("a sign-up whose address is not confirmed yet cannot sign in with its password", async () => {
    const u = await makeUser({ verified: false });
    expect(await signIn(u.email, PASSWORD)).toBeNull();
  });

  it("after 5 failures from one IP even the right password is refused there, with the same answer for unknown addresses", async () => {
    const u = await makeUser();
    for (let i = 0; i < 5; i++) expect(await signIn(u.email, `wrong guess ${i}`)).toBeNull();
    await expect(signIn(u.email, PASSWORD)).rejects.toThrow(LOCKED);
    // From another IP the owner still gets in.
    expect(await signIn(u.email, PASSWORD, "203.0.113.9")).not.toBeNull();

    for (let i = 0; i < 5; i++) expect(await signIn("ghost@example.com", `wrong guess ${i}`)).toBeNull();
    await expect(signIn("ghost@example.com", PASSWORD)).rejects.toThrow(LOCKED);
  });

  it("a success clears the failures of that address from that IP", async () => {
    const u = await makeUser();
    for (let i = 0; i < 4; i++) await signIn(u.email, "wrong guess");
    expect(await signIn(u.email, PASSWORD)).not.toBeNull();
    for (let i = 0; i < 4; i++) await signIn(u.email, "wrong guess");
    expect(await signIn(u.email, PASSWORD)).not.toBeNull();
  });

  it("50 failures from one IP lock that IP for every address", async () => {
    const u = await makeUser();
    for (let i = 0; i < 50; i++) await signIn(`spray${i}@example.com`, "wrong guess", "192.0.2.50");
    await expect(signIn(u.email, PASSWORD, "192.0.2.50")).rejects.toThrow(LOCKED);
    expect(await signIn(u.email, PASSWORD, "192.0.2.51")).not.toBeNull();
  });

  it("30 failures for one address from many IPs pause password sign-in for it (forged IPs do not help)", async () => {
    const u = await makeUser();
    for (let i = 0; i < 30; i++) await signIn(u.email, "wrong guess", `10.0.${i}.1`);
    await expect(signIn(u.email, PASSWORD, "10.9.9.9")).rejects.toThrow(LOCKED);
  });

  it("the IP is the rightmost X-Forwarded-For entry, the one our own proxy saw", async () => {
    const u = await makeUser();
    for (let i = 0; i < 5; i++) await authorizeCredentials({ email: u.email, password: "wrong guess" }, { "x-forwarded-for": `10.1.1.${i}, 198.51.100.99` });
    await expect(signIn(u.email, PASSWORD, "198.51.100.99")).rejects.toThrow(LOCKED);
  });
});

describe("next-auth callbacks", () => {
  const callbacks = authOptions().callbacks!;

  it("jwt puts the user id in sub and the address in email, and lib/auth/session.ts reads that token", async () => {
    const u = await makeUser();
    const user = (await signIn(u.email, PASSWORD))!;
    const token = await callbacks.jwt!({ token: { name: user.name }, user, account: null, trigger: "signIn" });
    expect(token).toMatchObject({ sub: String(u.id), email: u.email });
    const cookie = `next-auth.session-token=${await encode({ token, secret: authSecret() })}`;
    const session = await readSession(new Request("http://localhost/", { headers: { cookie } }), await getDb());
    expect(session).toMatchObject({ userId: u.id, email: u.email, token: { epoch: 0 } });
  });

  it("jwt leaves a token alone on later calls", async () => {
    const token = { sub: "7", email: "seven@example.com" };
    expect(await callbacks.jwt!({ token, account: null } as Parameters<NonNullable<typeof callbacks.jwt>>[0])).toEqual(token);
  });

  it("signIn rations e-mail links to 5 per address per 15 minutes; following a link is never refused", async () => {
    const ask = (email: string) => callbacks.signIn!({ user: { id: email, email }, account: null, email: { verificationRequest: true } });
    for (let i = 0; i < 5; i++) expect(await ask("Rationed@example.com")).toBe(true);
    expect(await ask("rationed@example.com")).toBe(false);
    expect(await ask("other@example.com")).toBe(true);
    expect(await callbacks.signIn!({ user: { id: "1", email: "rationed@example.com" }, account: null })).toBe(true);
  });
});
