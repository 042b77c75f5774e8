import { spawn, spawnSync } from "node:child_process";
import { closeDb, databaseFile, getDb } from "@/db";
import { createKey, revokeKey } from "@/lib/api/key-service";
import { allScopes } from "@/lib/api/scopes";
import { DEMO_ORG, seedDemo } from "@/db/seed/demo";

/** Migrate, seed the demo org, mint a fresh demo key, build, start, and print how to call the API. */
const port = Number(process.env.PORT ?? 3000);
const db = await getDb();
const orgId = await seedDemo(db);
// One demo key at a time: the previous run's key is revoked (its plaintext was never stored).
const old = await db.selectFrom("api_keys").select("id").where("org_id", "=", orgId).where("name", "=", "demo key").where("revoked_at", "is", null).execute();
for (const k of old) await revokeKey(db, orgId, k.id, "demo");
const { key } = await createKey(db, { orgId, name: "demo key", mode: "test", scopes: allScopes }, "demo");
await closeDb();

if (process.env.PARITAS_DEMO_SKIP_BUILD !== "1") {
  const build = spawnSync("npm", ["run", "build"], { stdio: "inherit" });
  if (build.status !== 0) process.exit(build.status ?? 1);
}

// Its own process group, so that stopping the demo stops next-server too.
const server = spawn("node_modules/.bin/next", ["start", "-p", String(port)], { stdio: "inherit", detached: true, env: { ...process.env, PARITAS_DB_FILE: databaseFile() } });
for (const sig of ["SIGINT", "SIGTERM"] as const) {
  process.on(sig, () => {
    try {
      process.kill(-server.pid!, sig);
    } catch {
      // already stopped
    }
  });
}
server.on("exit", (code) => process.exit(code ?? 0));

const base = `http://localhost:${port}`;
for (let i = 0; i < 120; i++) {
  try {
    if ((await fetch(`${base}/api/health`)).ok) break;
  } catch {
    // not up yet
  }
  await new Promise((r) => setTimeout(r, 500));
}
const body = JSON.stringify({ channel: "bsc", p: 0.11 });
console.log(`
Paritas is running at ${base} with the demo org "${DEMO_ORG.name}" (database ${databaseFile()}).
API reference: ${base}/docs

Demo API key (shown once; a new one is made on every start):
Authorization: Bearer ${key}

curl -s ${base}/api/v1/capacity -H 'Authorization: Bearer ${key}' -H 'Content-Type: application/json' -d '${body}'
`);
