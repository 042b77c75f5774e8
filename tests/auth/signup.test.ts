import { beforeEach, describe, expect, it } from "vitest";
import { getDb, nowIso } from "@/db";
import { insertAuthUser } from "@/db/queries/auth";
import { findUserByEmail } from "@/db/queries/users";
import { kyselyAdapter } from "@/lib/auth/adapter";
import { resetAuthLimits } from "@/lib/auth/brute-force";
import { authorizeCredentials } from "@/lib/auth/options";
import { hashPassword, verifyPassword } from "@/lib/auth/passwords";
import { api, expectFieldError, expectProblem, postJson } from "../helpers/api";
import { postFromConsole } from "./helpers";

const PATH = "/api/console/auth/signup";
let n = 0;
const fresh = () => ({ name: "Ines Okafor", email: `ines${++n}@example.com`, password: "long enough pass" });

beforeEach(() => resetAuthLimits());

describe("POST /api/console/auth/signup: happy path", () => {
  it("creates an account whose password works once the address is confirmed", async () => {
    const input = fresh();
    const res = await postFromConsole(PATH, { ...input, email: input.email.toUpperCase() });
    expect(res.status).toBe(202);
    expect(res.body).toEqual({ next: "confirm-address", detail: expect.any(String) });

    const db = await getDb();
    const user = (await findUserByEmail(db, input.email))!;
    expect(user).toMatchObject({ email: input.email, name: input.name, email_verified: null });
    expect(user.password_hash).toMatch(/^\$2[aby]\$/);
    expect(user.password_hash).not.toContain(input.password);

    // Until the e-mail link is followed the password does not sign in…
    expect(await authorizeCredentials({ email: input.email, password: input.password }, {})).toBeNull();
    // …and following it (next-auth's e-mail callback marks the address verified) makes it work.
    await kyselyAdapter(getDb).updateUser!({ id: String(user.id), emailVerified: new Date() });
    expect(await authorizeCredentials({ email: input.email, password: input.password }, {})).toMatchObject({ id: String(user.id) });
  });

  it("accepts a same-origin request that sends Sec-Fetch-Site instead of Origin", async () => {
    const res = await postJson(PATH, fresh(), undefined, { "sec-fetch-site": "same-origin" });
    expect(res.status).toBe(202);
  });
});

describe("POST /api/console/auth/signup: taken addresses get the same answer", () => {
  it("a confirmed account is left unchanged: same status and body, old password still the one", async () => {
    const db = await getDb();
    const email = `taken${++n}@example.com`;
    const oldHash = await hashPassword("the original one");
    await insertAuthUser(db, { email, name: "Original", passwordHash: oldHash, emailVerified: nowIso() });

    const newcomer = await postFromConsole(PATH, fresh());
    const taken = await postFromConsole(PATH, { name: "Impostor", email, password: "attacker's choice" });
    expect(taken.status).toBe(newcomer.status);
    expect(taken.body).toEqual(newcomer.body);
    expect(taken.headers["content-type"]).toBe(newcomer.headers["content-type"]);

    const user = (await findUserByEmail(db, email))!;
    expect(user.name).toBe("Original");
    expect(user.password_hash).toBe(oldHash);
    expect(await verifyPassword("attacker's choice", user.password_hash)).toBe(false);
  });

  it("a sign-up nobody confirmed yet is replaced by the newer one", async () => {
    const input = fresh();
    await postFromConsole(PATH, input);
    const res = await postFromConsole(PATH, { ...input, name: "Ines O.", password: "a newer password" });
    expect(res.status).toBe(202);
    const user = (await findUserByEmail(await getDb(), input.email))!;
    expect(user.name).toBe("Ines O.");
    expect(await verifyPassword("a newer password", user.password_hash)).toBe(true);
  });
});

describe("POST /api/console/auth/signup: bad input", () => {
  it("a password under 10 characters is a 422 pointing at /password", async () => {
    expectFieldError(await postFromConsole(PATH, { ...fresh(), password: "short" }), "/password", /at least 10/);
  });

  it("a password longer than bcrypt reads is a 422", async () => {
    expectFieldError(await postFromConsole(PATH, { ...fresh(), password: "x".repeat(73) }), "/password", /72 bytes/);
  });

  it("a malformed address, an empty name and an unknown field are 422s with pointers", async () => {
    expectFieldError(await postFromConsole(PATH, { ...fresh(), email: "not-an-address" }), "/email");
    expectFieldError(await postFromConsole(PATH, { ...fresh(), name: "   " }), "/name");
    expectFieldError(await postFromConsole(PATH, { ...fresh(), role: "owner" }), "/role");
  });

  it("a body that is not JSON is 415 or 400", async () => {
    expectProblem(await api().post(PATH).set("origin", "http://localhost").set("content-type", "text/plain").send("hi"), 415, "unsupported-media-type");
    expectProblem(await postFromConsole(PATH, "{nope"), 400, "bad-request");
  });

  it("nothing is created for refused input", async () => {
    const input = { ...fresh(), password: "short" };
    await postFromConsole(PATH, input);
    expect(await findUserByEmail(await getDb(), input.email)).toBeUndefined();
  });
});

describe("POST /api/console/auth/signup: security", () => {
  it("a cross-origin POST is 403 and creates nothing", async () => {
    const input = fresh();
    expectProblem(await postJson(PATH, input, undefined, { origin: "https://elsewhere.example" }), 403, "cross-origin");
    expectProblem(await postJson(PATH, input, undefined, { origin: "null" }), 403, "cross-origin");
    expectProblem(await postJson(PATH, input), 403, "cross-origin");
    expectProblem(await postJson(PATH, input, undefined, { "sec-fetch-site": "cross-site" }), 403, "cross-origin");
    expect(await findUserByEmail(await getDb(), input.email)).toBeUndefined();
  });

  it("10 sign-ups per hour per IP, then 429 with Retry-After", async () => {
    const ip = { "x-forwarded-for": "198.51.100.23" };
    for (let i = 0; i < 10; i++) expect((await postFromConsole(PATH, fresh(), ip)).status).toBe(202);
    const res = await postFromConsole(PATH, fresh(), ip);
    expectProblem(res, 429, "rate-limited");
    expect(Number(res.headers["retry-after"])).toBeGreaterThan(0);
    expect((await postFromConsole(PATH, fresh(), { "x-forwarded-for": "198.51.100.24" })).status).toBe(202);
  });
});
