import { spawn, spawnSync } from "node:child_process";
import { randomBytes } from "node:crypto";
import { existsSync, readFileSync, writeFileSync } from "node:fs";
import { basename, dirname, join, resolve } from "node:path";
import { closeDb, databaseFile, getDb } from "@/db";
import { createKey, revokeKey } from "@/lib/api/key-service";
import { allScopes } from "@/lib/api/scopes";
import { DEMO_ORG, DEMO_PASSWORD, DEMO_USERS, seedDemo } from "@/db/seed/demo";
import { startFakeSmtp } from "@/fakes/smtp";
import { startFakeBilling } from "@/fakes/billing";
import { seedDemoBilling } from "@/db/seed/demo-billing";
import { unreportedUsage } from "@/db/queries/billing";
import { findOrgById } from "@/db/queries/orgs";
import { clientFor } from "@/lib/billing/provider";

/** Migrate, seed the demo org, mint a fresh demo key, build, start, and print how to call the API. */
const port = Number(process.env.PORT ?? 3000);
const db = await getDb();
const orgId = await seedDemo(db);
// One demo key at a time: the previous run's key is revoked (its plaintext was never stored).
const old = await db.selectFrom("api_keys").select("id").where("org_id", "=", orgId).where("name", "=", "demo key").where("revoked_at", "is", null).execute();
for (const k of old) await revokeKey(db, orgId, k.id, "cli");
const { key } = await createKey(db, { orgId, name: "demo key", mode: "test", scopes: allScopes }, "cli");

const base = `http://localhost:${port}`;
const dataDir = dirname(resolve(databaseFile()));

// The billing provider's local stand-in, in this process, its state in a file beside the database. Its webhooks go
// to the server (retried until the server is up); the server, the runner and the reporter reach it by settings alone.
const billingSecrets = join(dataDir, ".billing-secrets.json");
if (!existsSync(billingSecrets)) writeFileSync(billingSecrets, JSON.stringify({ apiKey: `local-${randomBytes(12).toString("hex")}`, webhook: `local-${randomBytes(24).toString("hex")}` }), { mode: 0o600 });
const secrets = JSON.parse(readFileSync(billingSecrets, "utf8")) as { apiKey: string; webhook: string };
// Named after the database too: two demo databases in one folder must not share the provider's state (its meter
// events are keyed by usage row ids, which a fresh database hands out again).
const standInOptions = { stateFile: join(dataDir, `${basename(databaseFile()).replace(/\.db$/, "")}.billing-stand-in.json`), secretKey: secrets.apiKey, webhookUrl: `${base}/api/webhooks/billing`, webhookSecret: secrets.webhook, closeDelayMs: 60_000 };
const standIn = await startFakeBilling({ port: Number(process.env.PARITAS_BILLING_PORT ?? 12111), ...standInOptions }).catch((e: NodeJS.ErrnoException) =>
  e.code === "EADDRINUSE" ? startFakeBilling({ port: 0, ...standInOptions }) : Promise.reject(e),
);
const billingEnv = {
  PARITAS_BILLING_SECRET_KEY: secrets.apiKey,
  PARITAS_BILLING_HOST: "127.0.0.1",
  PARITAS_BILLING_PORT: String(standIn.port),
  PARITAS_BILLING_PROTOCOL: "http",
  PARITAS_BILLING_WEBHOOK_SECRET: secrets.webhook,
};
await closeDb();

if (process.env.PARITAS_DEMO_SKIP_BUILD !== "1") {
  const build = spawnSync("npm", ["run", "build"], { stdio: "inherit" });
  if (build.status !== 0) process.exit(build.status ?? 1);
}

// Mail goes to a fake SMTP server in this process (port 2525, or any free one if that is taken);
// the console shows what it received at /console/dev/mailbox.
const smtp = await startFakeSmtp().catch((e: NodeJS.ErrnoException) => (e.code === "EADDRINUSE" ? startFakeSmtp({ port: 0 }) : Promise.reject(e)));

// Sessions are signed with a secret kept beside the database, so they survive a restart of the demo.
const secretFile = join(dirname(resolve(databaseFile())), ".auth-secret");
if (!process.env.PARITAS_AUTH_SECRET && !existsSync(secretFile)) writeFileSync(secretFile, randomBytes(32).toString("base64url"), { mode: 0o600 });
const authSecret = process.env.PARITAS_AUTH_SECRET ?? readFileSync(secretFile, "utf8").trim();

// Its own process group, so that stopping the demo stops next-server too.
const server = spawn("node_modules/.bin/next", ["start", "-p", String(port)], {
  stdio: "inherit",
  detached: true,
  env: {
    ...process.env,
    PARITAS_DB_FILE: databaseFile(),
    PARITAS_SMTP_URL: `smtp://127.0.0.1:${smtp.port}`,
    PARITAS_MAILBOX_DIR: smtp.dir,
    PARITAS_DEV_MAILBOX: "1",
    PARITAS_AUTH_SECRET: authSecret,
    NEXTAUTH_URL: process.env.NEXTAUTH_URL ?? base,
    ...billingEnv,
  },
});
// Beside the server, on the same database: the job runner (simulations, simulated claims) and the usage reporter
// (live usage to the billing provider; grace periods); both send mail (allowance and payment notices).
const sideEnv = { ...process.env, PARITAS_DB_FILE: databaseFile(), PARITAS_SMTP_URL: `smtp://127.0.0.1:${smtp.port}`, ...billingEnv };
const runner = spawn("node_modules/.bin/tsx", ["scripts/worker.ts"], { stdio: "inherit", detached: true, env: sideEnv });
const reporter = spawn("node_modules/.bin/tsx", ["scripts/billing-reporter.ts"], { stdio: "inherit", detached: true, env: sideEnv });
for (const sig of ["SIGINT", "SIGTERM"] as const) {
  process.on(sig, () => {
    void standIn.close();
    for (const child of [server, runner, reporter]) {
      try {
        process.kill(-child.pid!, sig);
      } catch {
        // already stopped
      }
    }
  });
}
server.on("exit", (code) => {
  for (const child of [runner, reporter]) {
    try {
      process.kill(-child.pid!, "SIGTERM");
    } catch {
      // already stopped
    }
  }
  process.exit(code ?? 0);
});
runner.on("exit", (code, signal) => {
  if (signal !== "SIGTERM" && signal !== "SIGINT") console.error(`the job runner stopped (${code ?? signal}); simulations wait until \`npm run worker\` runs again`);
});
reporter.on("exit", (code, signal) => {
  if (signal !== "SIGTERM" && signal !== "SIGINT") console.error(`the usage reporter stopped (${code ?? signal}); usage waits in the outbox until \`npm run billing:report\` runs again`);
});

for (let i = 0; i < 120; i++) {
  try {
    if ((await fetch(`${base}/api/health`)).ok) break;
  } catch {
    // not up yet
  }
  await new Promise((r) => setTimeout(r, 500));
}
const body = JSON.stringify({ channel: "bsc", p: 0.11 });
const claim = JSON.stringify({ label: "demo/fw-1.0.0", target: { metric: "fer", atMost: 1e-2 }, evidence: { mode: "simulated", code: { family: "hamming", r: 3 }, channel: { type: "bsc" }, at: 0.01 } });
console.log(`
Paritas is running at ${base} with the demo org "${DEMO_ORG.name}" (database ${databaseFile()}).
API reference: ${base}/docs

Console sign-in: ${base}/signin, password ${DEMO_PASSWORD} for
${DEMO_USERS.map((u) => `  ${u.email} (${u.role})`).join("\n")}
Mail from the console (sign-in and reset links) lands at ${base}/console/dev/mailbox
(fake SMTP on 127.0.0.1:${smtp.port}, messages in ${smtp.dir}).

Demo API key (shown once; a new one is made on every start):
Authorization: Bearer ${key}

curl -s ${base}/api/v1/capacity -H 'Authorization: Bearer ${key}' -H 'Content-Type: application/json' -d '${body}'

A claim decided by simulation (the job runner runs beside the server):
curl -s ${base}/api/v1/claims -H 'Authorization: Bearer ${key}' -H 'Content-Type: application/json' -d '${claim}'

Billing runs against a local stand-in of the billing provider at ${standIn.url} (state in ${standInOptions.stateFile}):
the usage reporter sends live usage to it, and last month's invoice appears on the console's Billing page once that
usage is in. Test cards on its payment page: 4242 4242 4242 4242 pays, 4000 0000 0000 0002 is declined.
`);

// The demo org's subscription since last month is made once the seeded usage has reached the stand-in (the reporter
// sends it within seconds), so that last month, which has ended, closes at once into an invoice that holds its usage.
void (async () => {
  const db = await getDb();
  for (let i = 0; i < 120; i++) {
    if ((await unreportedUsage(db, 1)).length === 0) break;
    await new Promise((r) => setTimeout(r, 1000));
  }
  await seedDemoBilling(db, clientFor({ secretKey: secrets.apiKey, host: "127.0.0.1", port: standIn.port, protocol: "http" }), (await findOrgById(db, orgId))!);
  await fetch(`${standIn.url}/_stand-in/close-due`, { method: "POST", headers: { authorization: `Bearer ${secrets.apiKey}` } }).catch(() => undefined);
  await closeDb();
})().catch((e: unknown) => console.error("setting up the demo's subscription failed", e));
