import { randomBytes, randomUUID } from "node:crypto";
import { rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { format } from "node:util";
import type { AddressInfo } from "node:net";
import { SMTPServer } from "smtp-server";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { getDb, nowIso } from "@/db";
import { insertAuthUser } from "@/db/queries/auth";
import { startFakeBilling, type FakeBilling } from "@/fakes/billing";
import { readMailbox } from "@/fakes/mailbox";
import { visiblePrefix } from "@/lib/api/keys";
import { consumeRate } from "@/lib/api/rate-limit";
import { resetAuthLimits } from "@/lib/auth/brute-force";
import { authorizeCredentials } from "@/lib/auth/options";
import { hashPassword } from "@/lib/auth/passwords";
import { sessionCookie } from "@/lib/auth/session-token";
import { runReporter } from "@/lib/billing/reporter";
import { clientFor } from "@/lib/billing/provider";
import { databaseQueue } from "@/lib/jobs/queue";
import { runJobs } from "@/lib/jobs/runner";
import { jobKinds } from "@/lib/jobs/simulation-kind";
import { getQuery, postJson } from "../helpers/api";
import { linksIn, ORIGIN, postFromConsole, startMailbox } from "../auth/helpers";
import { NextAuthBrowser } from "../auth/nextauth-browser";
import { consoleCall, makeConsoleOrg, type ConsoleFixture } from "../helpers/console";
import { makeOrgWithKey } from "../helpers/fixtures";
import { finished, until } from "../helpers/jobs";

// The rate limiter is wrapped so one call can fail unexpectedly, the way a broken store would (→ 500).
vi.mock(import("@/lib/api/rate-limit"), async (orig) => {
  const m = await orig();
  return { ...m, consumeRate: vi.fn(m.consumeRate) };
});

/** A browser on next-auth's route whose every answer (body and Location) is kept in `answers` for the search. */
const newBrowser = () => new NextAuthBrowser(async (res) => void answers.push(await res.clone().text(), res.headers.get("location") ?? ""));

/**
 * Every secret sent through every path that logs or stores something: then none of them may appear in what the
 * process wrote (console and stdout/stderr), in any answer, in the audit log or the usage rows; a sign-in, reset or
 * invitation token only in the one message mailed to carry it.
 */
const secret = (label: string) => `${label}-${randomBytes(18).toString("base64url")}`;
const WEBHOOK_SECRET = secret("whsec");
const BILLING_KEY = secret("sk");
const PASSWORD = secret("password");
const WRONG_PASSWORD = secret("wrong-password");
const NEW_PASSWORD = secret("new-password");

const captured: string[] = [];
const answers: string[] = [];
/** Each secret with a name for the failure message; tokens that a mail may carry are in `mailed`. */
const secrets = new Map<string, string>();
const mailed = new Map<string, string>();
const remember = <T extends { text: string }>(res: T): T => (answers.push(res.text), res);

let mailbox: Awaited<ReturnType<typeof startMailbox>>;
let fx: ConsoleFixture;
let standIn: FakeBilling;
const standInState = join(tmpdir(), `paritas-secrets-${randomUUID()}.json`);

beforeAll(async () => {
  for (const m of ["log", "info", "warn", "error", "debug"] as const) vi.spyOn(console, m).mockImplementation((...a: unknown[]) => void captured.push(format(...a)));
  for (const stream of [process.stdout, process.stderr]) {
    const write = stream.write.bind(stream);
    vi.spyOn(stream, "write").mockImplementation(((chunk: unknown, ...rest: never[]) => {
      captured.push(String(chunk));
      return write(chunk as string, ...rest);
    }) as typeof stream.write);
  }
  mailbox = await startMailbox();
  process.env.NEXTAUTH_URL = ORIGIN;
  fx = await makeConsoleOrg();
  for (const [name, k] of Object.entries(fx.keys)) {
    secrets.set(`${name} key`, k.key);
    secrets.set(`${name} key after its prefix`, k.key.slice(visiblePrefix(k.key).length));
  }
  secrets.set("owner session cookie", fx.owner.cookie.slice(fx.owner.cookie.indexOf("=") + 1));
  Object.entries({ WEBHOOK_SECRET, BILLING_KEY, PASSWORD, WRONG_PASSWORD, NEW_PASSWORD }).forEach(([k, v]) => secrets.set(k, v));
  Object.assign(process.env, { PARITAS_BILLING_WEBHOOK_SECRET: WEBHOOK_SECRET, PARITAS_BILLING_SECRET_KEY: BILLING_KEY });
}, 60_000);

afterAll(async () => {
  delete process.env.NEXTAUTH_URL;
  delete process.env.PARITAS_BILLING_WEBHOOK_SECRET;
  delete process.env.PARITAS_BILLING_SECRET_KEY;
  await standIn?.close();
  for (const f of [standInState, `${standInState}.meter-events.jsonl`, `${standInState}.idempotency.jsonl`]) rmSync(f, { force: true });
  await mailbox?.stop();
  vi.restoreAllMocks();
});

const KEY_CHARS = "0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz";
const randomBody = (n: number) => Array.from(randomBytes(n), (b) => KEY_CHARS[b % 62]).join("");

describe("secrets through every path that logs", { timeout: 120_000 }, () => {
  it("API keys: malformed, unknown, revoked, in a 422 body, in bad JSON, and a 500", async () => {
    const malformed = `live.prt1.${randomBody(36)}`; // the checksum almost surely fails: 1 chance in 62^6
    const revoked = await makeOrgWithKey();
    const unknown = await makeOrgWithKey();
    await revoked.db.updateTable("api_keys").set({ revoked_at: nowIso() }).where("id", "=", revoked.keyId).execute();
    await unknown.db.deleteFrom("api_keys").where("id", "=", unknown.keyId).execute();
    const key = fx.keys.developer.key;
    for (const [name, k] of Object.entries({ malformed, revoked: revoked.key, unknown: unknown.key })) {
      secrets.set(`${name} key`, k);
      secrets.set(`${name} key after its prefix`, k.slice(visiblePrefix(k).length));
      expect(remember(await postJson("/api/v1/distance", { a: "1011", b: "1001" }, `Bearer ${k}`)).status).toBe(401);
      expect(remember(await getQuery("/api/v1/usage", {}, `Bearer ${k}`)).status).toBe(401);
    }
    expect(remember(await postJson("/api/v1/distance", { a: key, b: "1001" }, `Bearer ${key}`)).status).toBe(422);
    expect(remember(await postJson("/api/v1/distance", { [key]: 1 }, `Bearer ${key}`)).status).toBe(422);
    // A key of the earlier format, as a caller might paste it into a field name.
    const legacy = `prt_live_${randomBody(38)}`;
    secrets.set("legacy-format key", legacy);
    expect(remember(await postJson("/api/v1/distance", { [legacy]: 1 }, `Bearer ${key}`)).text).toContain("prt_live_");
    expect(remember(await postJson("/api/v1/distance", `{"a": ${key}}`, `Bearer ${key}`)).status).toBe(400);
    // A key in the wrong header: refused as an Idempotency-Key (never stored), replaced as a request id.
    const asIdempotencyKey = remember(await postJson("/api/v1/distance", { a: "1", b: "0" }, `Bearer ${key}`, { "idempotency-key": key }));
    expect(asIdempotencyKey.status).toBe(400);
    expect(asIdempotencyKey.body.detail).toMatch(/looks like an API key/);
    const asRequestId = remember(await postJson("/api/v1/distance", { a: "1", b: "0" }, `Bearer ${key}`, { "x-request-id": key }));
    expect(asRequestId.status).toBe(200);
    expect(asRequestId.headers["x-request-id"]).toMatch(/^req_[0-9a-f]{24}$/);
    // An unexpected failure whose message quotes the key and the header that carried it: logged, without either.
    vi.mocked(consumeRate).mockRejectedValueOnce(new Error(`the rate store is unreachable (asked for ${key} with Authorization: Bearer ${key})`));
    expect(remember(await postJson("/api/v1/distance", { a: key }, `Bearer ${key}`)).status).toBe(500);
    expect(captured.join("")).toContain("the rate store is unreachable");
  });

  it("console: a wrong password at sign-in, a reset asked and confirmed, an invitation sent and accepted", async () => {
    resetAuthLimits();
    const db = await getDb();
    const email = `secret-keeper-${process.pid}@example.com`;
    const keeper = await insertAuthUser(db, { email, name: "Keeper", passwordHash: await hashPassword(PASSWORD), emailVerified: nowIso() });
    expect(await authorizeCredentials({ email, password: WRONG_PASSWORD }, {})).toBeNull();
    expect(await authorizeCredentials({ email: `nobody-${process.pid}@example.com`, password: WRONG_PASSWORD }, {})).toBeNull();

    remember(await postFromConsole("/api/console/auth/reset-request", { email }));
    const resetMail = await until(async () => (await readMailbox(mailbox.dir)).find((m) => m.to === email), Boolean, 10_000);
    const token = linksIn(resetMail!.text).find((l) => l.startsWith(`${ORIGIN}/reset/`))!.slice(`${ORIGIN}/reset/`.length);
    mailed.set("reset token", token);
    expect(remember(await postFromConsole("/api/console/auth/reset-confirm", { token, password: "short" })).status).toBe(422);
    expect(remember(await postFromConsole("/api/console/auth/reset-confirm", { token, password: NEW_PASSWORD })).status).toBe(200);
    expect(remember(await postFromConsole("/api/console/auth/reset-confirm", { token, password: NEW_PASSWORD })).status).toBe(410);

    // Confirming the password before a sensitive action (the reset ended older sessions: epoch 1), wrongly and rightly.
    const keeperCookie = await sessionCookie({ userId: keeper.id, email }, 3600, 1, 3600);
    secrets.set("keeper session cookie", keeperCookie.slice(keeperCookie.indexOf("=") + 1));
    const confirm = (password: string) => consoleCall("POST", "/api/console/auth/confirm", { cookie: keeperCookie, body: { password } });
    expect(remember(await confirm(WRONG_PASSWORD)).status).toBe(422);
    const confirmed = remember(await confirm(NEW_PASSWORD));
    expect(confirmed.status).toBe(200);
    const reissued = String(confirmed.headers["set-cookie"]).match(/next-auth\.session-token=([^;]+)/)![1]!;
    secrets.set("confirmed session cookie", reissued);

    const invitee = `invitee-secret-${process.pid}@example.com`;
    const cookie = fx.owner.cookie;
    expect(remember(await consoleCall("POST", `/api/console/orgs/${fx.org.slug}/invitations`, { cookie, body: { email: invitee, role: "developer" } })).status).toBeLessThan(300);
    const inviteMail = await until(async () => (await readMailbox(mailbox.dir)).find((m) => m.to === invitee), Boolean, 10_000);
    const invitation = inviteMail!.text.match(/\/console\/invite\/([A-Za-z0-9_-]+)/)![1]!;
    mailed.set("invitation token", invitation);
    // Accepted by someone else (403), then unknown and used tokens.
    expect(remember(await consoleCall("POST", "/api/console/invitations/accept", { cookie: fx.developer.cookie, body: { token: invitation } })).status).toBe(403);
    expect(remember(await consoleCall("POST", "/api/console/invitations/accept", { cookie: fx.developer.cookie, body: { token: invitation + "x" } })).status).toBeGreaterThanOrEqual(400);
    // The owner's session on a few reads and a key made and revoked, so its cookie passes the audited paths.
    for (const path of ["members", "keys", "audit", "usage"]) remember(await consoleCall("GET", `/api/console/orgs/${fx.org.slug}/${path}`, { cookie }));
    const made = remember(await consoleCall("POST", `/api/console/orgs/${fx.org.slug}/keys`, { cookie, body: { name: "made here", mode: "test", scopes: ["compute"] } }));
    expect(made.status).toBeLessThan(300);
    const madeKey = (JSON.parse(made.text) as { key: string; id: number }).key;
    secrets.set("console-made key", madeKey);
    answers.pop(); // the one answer meant to show the new key
    remember(await consoleCall("POST", `/api/console/orgs/${fx.org.slug}/keys/${(JSON.parse(made.text) as { id: number }).id}/revoke`, { cookie }));
  });

  it("mail refused by the server: the reset and invitation failures are logged without their tokens", async () => {
    // A mail server that reads each message and then refuses it, so the tokens are known to the test though no mail arrives.
    const bodies: string[] = [];
    const refusing = new SMTPServer({
      authOptional: true,
      disabledCommands: ["STARTTLS"],
      logger: false,
      onData(stream, _session, done) {
        let text = "";
        stream.on("data", (c: Buffer) => (text += c.toString("latin1")));
        stream.on("end", () => (bodies.push(text), done(new Error("mailbox unavailable"))));
      },
    });
    await new Promise<void>((ok) => refusing.listen(0, "127.0.0.1", ok));
    const smtp = process.env.PARITAS_SMTP_URL;
    process.env.PARITAS_SMTP_URL = `smtp://127.0.0.1:${(refusing.server.address() as AddressInfo).port}`;
    try {
      resetAuthLimits();
      const email = `refused-${process.pid}@example.com`;
      await insertAuthUser(await getDb(), { email, name: "Refused", passwordHash: await hashPassword(PASSWORD), emailVerified: nowIso() });
      expect(remember(await postFromConsole("/api/console/auth/reset-request", { email })).status).toBe(202);
      const invitee = `refused-invitee-${process.pid}@example.com`;
      remember(await consoleCall("POST", `/api/console/orgs/${fx.org.slug}/invitations`, { cookie: fx.owner.cookie, body: { email: invitee, role: "developer" } }));
      const logged = async () => bodies.length >= 2 && captured.some((l) => l.includes("reset link not sent")) && captured.some((l) => l.includes(`to ${invitee} failed`));
      expect(await until(logged, Boolean, 10_000)).toBe(true);
    } finally {
      process.env.PARITAS_SMTP_URL = smtp;
      await new Promise<void>((ok) => refusing.close(ok));
    }
    // Quoted-printable may fold a long link: unfold it before reading the tokens.
    const unfolded = bodies.map((b) => b.replace(/=\r?\n/g, ""));
    const reset = unfolded.join("\n").match(/\/reset\/([A-Za-z0-9_-]{20,})/)![1]!;
    const invitation = unfolded.join("\n").match(/\/console\/invite\/([A-Za-z0-9_-]{20,})/)![1]!;
    secrets.set("refused reset token", reset);
    secrets.set("refused invitation token", invitation);
  });

  it("next-auth: a wrong password through the sign-in route, a sign-in link mailed, followed, and followed again", async () => {
    resetAuthLimits();
    const email = `keeper-${process.pid}@example.com`;
    await insertAuthUser(await getDb(), { email, name: "Keeper", passwordHash: await hashPassword(PASSWORD), emailVerified: nowIso() });
    const b = newBrowser();
    await b.call("POST", "/api/auth/callback/credentials", { email, password: WRONG_PASSWORD, csrfToken: await b.csrf(), json: "true" });
    expect(await b.call("GET", "/api/auth/session").then((r) => r.json())).toEqual({});
    await b.call("POST", "/api/auth/callback/credentials", { email, password: PASSWORD, csrfToken: await b.csrf(), json: "true" });
    const session = [...b.jar].find(([k]) => k.includes("session-token"));
    expect(session).toBeTruthy();
    secrets.set("next-auth session cookie", session![1]);

    const linkFor = `link-${process.pid}@example.com`;
    const c = newBrowser();
    const asked = await c.call("POST", "/api/auth/signin/email", { email: linkFor, csrfToken: await c.csrf(), callbackUrl: "/console", json: "true" });
    await c.call("GET", ((await asked.json()) as { url: string }).url);
    const mail = await until(async () => (await readMailbox(mailbox.dir)).find((m) => m.to === linkFor), Boolean, 10_000);
    const link = linksIn(mail!.text).find((l) => l.includes("/api/auth/callback/email"))!;
    mailed.set("sign-in token", new URL(link).searchParams.get("token")!);
    expect((await c.call("GET", link)).status).toBe(302);
    const again = await newBrowser().call("GET", link);
    expect(again.headers.get("location")).toMatch(/error=Verification/);
    const [cookieName, cookieValue] = [...c.jar].find(([k]) => k.includes("session-token"))!;
    expect(cookieName).toBeTruthy();
    secrets.set("link session cookie", cookieValue);
  });

  it("billing: a webhook with a bad signature, the reporter failing against the provider", async () => {
    const body = JSON.stringify({ id: "evt_forged", type: "invoice.paid", data: { object: {} } });
    for (const signature of [`t=${Math.floor(Date.now() / 1000)},v1=${"0".repeat(64)}`, WEBHOOK_SECRET, "garbage"]) {
      const res = remember(await postJson("/api/webhooks/billing", body, undefined, { "stripe-signature": signature }));
      expect(res.status).toBe(400);
    }
    // The stand-in knows another key, so every call the reporter makes is refused.
    standIn = await startFakeBilling({ port: 0, stateFile: standInState, secretKey: secret("other"), webhookSecret: secret("other-wh"), closeDelayMs: 1e9, retryBaseMs: 50 });
    const stripe = clientFor({ secretKey: BILLING_KEY, host: "127.0.0.1", port: standIn.port, protocol: "http" } as Parameters<typeof clientFor>[0]);
    const stop = new AbortController();
    const lines: string[] = [];
    const reporting = runReporter(await getDb(), stripe, stop.signal, { idleMs: 20, log: (l) => (lines.push(l), console.log(l)) });
    await until(async () => lines.length, (n) => n > 0, 20_000);
    stop.abort();
    await reporting;
    expect(lines[0]).toMatch(/^reporting failed/);
  });

  it("jobs: a simulation queued with the key runs on a runner that logs", async () => {
    const key = fx.keys.developer.key;
    const body = { code: { family: "hamming", r: 3 }, channel: { type: "bsc" }, points: [0.02], stop: { maxBits: 20_000 }, seed: 12 };
    const res = remember(await postJson("/api/v1/simulations", body, `Bearer ${key}`, { "idempotency-key": "secrets-sim-1" }));
    expect(res.status).toBe(202);
    const stop = new AbortController();
    const running = runJobs({ queue: databaseQueue(await getDb()), kinds: jobKinds, holder: "secrets-runner", heartbeatMs: 100, idleMs: 20, parallel: 2, log: (l) => console.log(l) }, stop.signal);
    const id = (JSON.parse(res.text) as { id: string }).id;
    const done = await until(async () => JSON.parse(remember(await getQuery(`/api/v1/simulations/${id}`, {}, `Bearer ${key}`)).text) as { status: string }, finished, 60_000);
    stop.abort();
    await running;
    expect(done.status).toBe("done");
  });

  it("no secret in the output, the answers, the audit log or the usage rows; tokens only in their own mail", async () => {
    const db = await getDb();
    const audit = (await db.selectFrom("audit_log").selectAll().execute()).map((r) => JSON.stringify(r));
    const usage = (await db.selectFrom("usage_events").selectAll().execute()).map((r) => JSON.stringify(r));
    const idempotency = (await db.selectFrom("idempotency_records").selectAll().execute()).map((r) => JSON.stringify(r));
    const places = { output: captured.join("\n"), answers: answers.join("\n"), audit: audit.join("\n"), usage: usage.join("\n"), idempotency: idempotency.join("\n") };
    expect(audit.length).toBeGreaterThan(0);
    expect(usage.length).toBeGreaterThan(0);
    const all = new Map([...secrets, ...mailed]);
    const found = [...all].flatMap(([name, value]) => Object.entries(places).flatMap(([where, text]) => (text.includes(value) ? [`${name} in ${where}`] : [])));
    expect(found).toEqual([]);
    // Each path above did write: the 500, the reporter's failure and the runner's lines are in the output.
    expect(places.output).toMatch(/the rate store is unreachable[\s\S]*reporting failed[\s\S]*claimed/);

    const mails = await readMailbox(mailbox.dir, 1000);
    for (const [name, value] of secrets) expect(mails.filter((m) => JSON.stringify(m).includes(value)).map((m) => `${name}: ${m.subject}`)).toEqual([]);
    for (const [name, value] of mailed) expect(mails.filter((m) => JSON.stringify(m).includes(value)), name).toHaveLength(1);
  });
});
