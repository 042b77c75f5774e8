import { spawn, spawnSync } from "node:child_process";
import { randomBytes } from "node:crypto";
import { existsSync, readFileSync, writeFileSync } from "node:fs";
import { dirname, join, resolve } from "node:path";
import { closeDb, databaseFile, getDb } from "@/db";
import { createKey, revokeKey } from "@/lib/api/key-service";
import { allScopes } from "@/lib/api/scopes";
import { DEMO_ORG, DEMO_PASSWORD, DEMO_USERS, seedDemo } from "@/db/seed/demo";
import { startFakeSmtp } from "@/fakes/smtp";

/** Migrate, seed the demo org, mint a fresh demo key, build, start, and print how to call the API. */
const port = Number(process.env.PORT ?? 3000);
const db = await getDb();
const orgId = await seedDemo(db);
// One demo key at a time: the previous run's key is revoked (its plaintext was never stored).
const old = await db.selectFrom("api_keys").select("id").where("org_id", "=", orgId).where("name", "=", "demo key").where("revoked_at", "is", null).execute();
for (const k of old) await revokeKey(db, orgId, k.id, "cli");
const { key } = await createKey(db, { orgId, name: "demo key", mode: "test", scopes: allScopes }, "cli");
await closeDb();

if (process.env.PARITAS_DEMO_SKIP_BUILD !== "1") {
  const build = spawnSync("npm", ["run", "build"], { stdio: "inherit" });
  if (build.status !== 0) process.exit(build.status ?? 1);
}

const base = `http://localhost:${port}`;

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
  },
});
// The job runner (simulations, simulated claims): its own process on the same database.
const runner = spawn("node_modules/.bin/tsx", ["scripts/worker.ts"], { stdio: "inherit", detached: true, env: { ...process.env, PARITAS_DB_FILE: databaseFile() } });
for (const sig of ["SIGINT", "SIGTERM"] as const) {
  process.on(sig, () => {
    for (const child of [server, runner]) {
      try {
        process.kill(-child.pid!, sig);
      } catch {
        // already stopped
      }
    }
  });
}
server.on("exit", (code) => {
  try {
    process.kill(-runner.pid!, "SIGTERM");
  } catch {
    // already stopped
  }
  process.exit(code ?? 0);
});
runner.on("exit", (code, signal) => {
  if (signal !== "SIGTERM" && signal !== "SIGINT") console.error(`the job runner stopped (${code ?? signal}); simulations wait until \`npm run worker\` runs again`);
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
`);
