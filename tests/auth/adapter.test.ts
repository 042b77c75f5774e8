import { createHash } from "node:crypto";
import { describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { insertAuthUser } from "@/db/queries/auth";
import { hashToken, kyselyAdapter, SIGN_IN_LINK_SECONDS } from "@/lib/auth/adapter";
import { hashPassword } from "@/lib/auth/passwords";
import "./helpers";

const adapter = kyselyAdapter(getDb);
const later = (s: number) => new Date(Date.now() + s * 1000);
const sha256 = (s: string) => createHash("sha256").update(s).digest("hex");
let n = 0;
const address = () => `Person${++n}@Example.COM`;

describe("users", () => {
  it("createUser stores the address in lower case and answers with a string id", async () => {
    const email = address();
    const verified = new Date("2026-03-01T10:00:00.000Z");
    const u = await adapter.createUser!({ email, emailVerified: verified, name: "Ada" });
    expect(u).toEqual({ id: expect.stringMatching(/^[1-9]\d*$/), email: email.toLowerCase(), name: "Ada", emailVerified: verified });
    const row = await (await getDb()).selectFrom("users").selectAll().where("id", "=", Number(u.id)).executeTakeFirstOrThrow();
    expect(row.email).toBe(email.toLowerCase());
    expect(row.email_verified).toBe(verified.toISOString());
    expect(row.password_hash).toBeNull();
  });

  it("getUser and getUserByEmail find the user; the address in any case", async () => {
    const email = address();
    const u = await adapter.createUser!({ email, emailVerified: null });
    expect(await adapter.getUser!(u.id)).toEqual(u);
    expect(await adapter.getUserByEmail!(email.toUpperCase())).toEqual(u);
  });

  it("unknown ids and addresses are null, malformed ids too", async () => {
    expect(await adapter.getUser!("999999")).toBeNull();
    expect(await adapter.getUser!("not-a-number")).toBeNull();
    expect(await adapter.getUser!("-1")).toBeNull();
    expect(await adapter.getUserByEmail!("nobody@example.com")).toBeNull();
  });

  it("there are no OAuth accounts: getUserByAccount is null, linkAccount refuses", async () => {
    expect(await adapter.getUserByAccount!({ provider: "any", providerAccountId: "1" })).toBeNull();
    expect(() => adapter.linkAccount!({ userId: "1", type: "oauth", provider: "any", providerAccountId: "1" })).toThrow(/no OAuth/);
  });

  it("updateUser changes the name and records the first confirmation of the address", async () => {
    const u = await adapter.createUser!({ email: address(), emailVerified: null });
    expect((await adapter.updateUser!({ id: u.id, name: "Grace" })).name).toBe("Grace");
    const first = new Date();
    const v1 = await adapter.updateUser!({ id: u.id, emailVerified: first });
    expect(v1.emailVerified).toBeInstanceOf(Date);
    const v2 = await adapter.updateUser!({ id: u.id, emailVerified: new Date(Date.now() + 60_000) });
    expect(v2.emailVerified).toEqual(v1.emailVerified);
    await expect(adapter.updateUser!({ id: "999999", name: "x" })).rejects.toThrow();
  });

  it("a password from a sign-up left unconfirmed past the link lifetime is dropped when the address is first proved", async () => {
    const db = await getDb();
    const hash = await hashPassword("someone else's password");
    const stale = await insertAuthUser(db, { email: address(), name: "Squatter", passwordHash: hash });
    const old = new Date(Date.now() - (SIGN_IN_LINK_SECONDS + 60) * 1000).toISOString();
    await db.updateTable("users").set({ created_at: old }).where("id", "=", stale.id).execute();
    const fresh = await insertAuthUser(db, { email: address(), name: "Newcomer", passwordHash: hash });

    await adapter.updateUser!({ id: String(stale.id), emailVerified: new Date() });
    await adapter.updateUser!({ id: String(fresh.id), emailVerified: new Date() });
    const rows = await db.selectFrom("users").select(["id", "password_hash", "email_verified"]).where("id", "in", [stale.id, fresh.id]).orderBy("id").execute();
    expect(rows[0]).toMatchObject({ password_hash: null, email_verified: expect.any(String) });
    expect(rows[1]).toMatchObject({ password_hash: hash, email_verified: expect.any(String) });
  });
});

describe("verification tokens", () => {
  const tokenRows = async () => (await getDb()).selectFrom("verification_tokens").selectAll().execute();

  it("only a SHA-256 of the token is stored, with purpose sign-in", async () => {
    const token = "next-auth-hands-us-this-" + n;
    const expires = later(600);
    expect(await adapter.createVerificationToken!({ identifier: "Link@Example.com", token, expires })).toEqual({ identifier: "Link@Example.com", token, expires });
    const row = (await tokenRows()).find((r) => r.token_hash === sha256(token));
    expect(row).toEqual({ identifier: "link@example.com", token_hash: sha256(token), purpose: "sign-in", expires_at: expires.toISOString() });
    expect(JSON.stringify(await tokenRows())).not.toContain(token);
    expect(hashToken(token)).toBe(sha256(token));
  });

  it("a token works once", async () => {
    const token = "single-use-token";
    const expires = later(600);
    await adapter.createVerificationToken!({ identifier: "once@example.com", token, expires });
    expect(await adapter.useVerificationToken!({ identifier: "once@example.com", token })).toEqual({ identifier: "once@example.com", token, expires });
    expect(await adapter.useVerificationToken!({ identifier: "once@example.com", token })).toBeNull();
  });

  it("an expired token is refused, and deleted", async () => {
    const token = "expired-token";
    await adapter.createVerificationToken!({ identifier: "late@example.com", token, expires: later(-1) });
    expect(await adapter.useVerificationToken!({ identifier: "late@example.com", token })).toBeNull();
    expect((await tokenRows()).some((r) => r.token_hash === sha256(token))).toBe(false);
  });

  it("a token is bound to its address, and a wrong token or no address finds nothing", async () => {
    const token = "bound-token";
    await adapter.createVerificationToken!({ identifier: "owner@example.com", token, expires: later(600) });
    expect(await adapter.useVerificationToken!({ identifier: "other@example.com", token })).toBeNull();
    expect(await adapter.useVerificationToken!({ identifier: "owner@example.com", token: "guess" })).toBeNull();
    expect(await adapter.useVerificationToken!({ identifier: "", token })).toBeNull();
    expect(await adapter.useVerificationToken!({ identifier: "OWNER@example.com", token })).not.toBeNull();
  });

  it("a sign-in token cannot be used as a password-reset token, nor the other way round", async () => {
    const db = await getDb();
    const token = "reset-purpose-token";
    await db.insertInto("verification_tokens").values({ identifier: "mix@example.com", token_hash: sha256(token), purpose: "password-reset", expires_at: later(600).toISOString() }).execute();
    expect(await adapter.useVerificationToken!({ identifier: "mix@example.com", token })).toBeNull();
  });

  it("creating a token prunes expired ones", async () => {
    await adapter.createVerificationToken!({ identifier: "prune@example.com", token: "old", expires: later(-5) });
    await adapter.createVerificationToken!({ identifier: "prune@example.com", token: "new", expires: later(600) });
    const hashes = (await tokenRows()).map((r) => r.token_hash);
    expect(hashes).not.toContain(sha256("old"));
    expect(hashes).toContain(sha256("new"));
  });
});
