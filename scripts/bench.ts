import autocannon, { type Result } from "autocannon";
import { spawn, spawnSync } from "node:child_process";
import { rmSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { closeDb, getDb } from "@/db";
import { insertOrg } from "@/db/queries/orgs";
import { createKey } from "@/lib/api/key-service";
import { allScopes } from "@/lib/api/scopes";
import { runCodecBench, runCrcBench } from "@/bench/codecs";
import { heavyRequests, runPoolBench } from "@/bench/compute";
import { runJobsBench } from "@/bench/jobs";
import { runSimBench } from "@/bench/sim";
import { runBillingBench } from "@/bench/billing";
import { runSecurityBench } from "@/bench/security";

/**
 * HTTP benchmark on a production build over loopback: POST /api/v1/distance (auth, rate limit,
 * validation, metering write, math) beside GET /api/health (a bare handler returning a constant),
 * both measured in this run, and their ratio. PARITAS_BENCH_SECONDS sets the duration (default 10).
 * First the block codecs and the CRC engines in process (bench/codecs.ts; PARITAS_BENCH_ONLY=codecs stops after them),
 * then the Monte Carlo engine in process (bench/sim.ts; PARITAS_BENCH_ONLY=sim runs only that),
 * then the worker pool's throughput with 1 and 2 threads (bench/compute.ts; PARITAS_BENCH_ONLY=compute runs only that),
 * then simulation jobs through the runner with 1 and 2 threads and a simulated claim's decision time (bench/jobs.ts; PARITAS_BENCH_ONLY=jobs),
 * then metering with quotas and the usage reporter's throughput (bench/billing.ts; PARITAS_BENCH_ONLY=billing),
 * then the session, redaction and page-policy costs (bench/security.ts; PARITAS_BENCH_ONLY=security);
 * over HTTP, last, a cheap call's latency alone and while every endpoint's heaviest allowed request runs.
 */
const seconds = Number(process.env.PARITAS_BENCH_SECONDS ?? 10);

const only = process.env.PARITAS_BENCH_ONLY;
if (only === "security") {
  await runSecurityBench();
  process.exit(0);
}
if (only !== "compute" && only !== "sim" && only !== "jobs" && only !== "billing") {
  runCodecBench();
  runCrcBench();
}
if (only === "codecs") process.exit(0);
if (only !== "compute" && only !== "jobs" && only !== "billing") runSimBench();
if (only === "sim") process.exit(0);
if (only === "billing") {
  await runBillingBench();
  process.exit(0);
}
spawnSync(process.execPath, ["scripts/build-worker.mjs"], { stdio: "inherit" });
if (only !== "jobs") await runPoolBench();
if (only === "compute") process.exit(0);
await runJobsBench();
if (only === "jobs") process.exit(0);
await runBillingBench();
await runSecurityBench();

async function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const s = createServer().listen(0, "127.0.0.1", () => {
      const { port } = s.address() as { port: number };
      s.close(() => resolve(port));
    });
  });
}

if (process.env.PARITAS_BENCH_SKIP_BUILD !== "1") {
  const b = spawnSync("npm", ["run", "build"], { stdio: ["ignore", "ignore", "inherit"] });
  if (b.status !== 0) process.exit(b.status ?? 1);
}

const dbFile = join(tmpdir(), `paritas-bench-${process.pid}.db`);
process.env.PARITAS_DB_FILE = dbFile;
const db = await getDb();
// A live key on the largest plan: live keys on a paid plan never stop at the allowance, so every call is served and metered.
const org = await insertOrg(db, { slug: "bench", name: "Bench", plan: "lighthouse" });
const { key } = await createKey(db, { orgId: org.id, name: "bench", mode: "live", scopes: allScopes }, "bench");
await closeDb();

const port = await freePort();
const server = spawn("node_modules/.bin/next", ["start", "-H", "127.0.0.1", "-p", String(port)], {
  stdio: "ignore",
  env: { ...process.env, PARITAS_DB_FILE: dbFile, PARITAS_RATE_LIMIT_PER_MINUTE: "1000000000" },
  detached: true,
});
const base = `http://127.0.0.1:${port}`;
try {
  for (let i = 0; ; i++) {
    try {
      if ((await fetch(`${base}/api/health`)).ok) break;
    } catch {
      if (i > 120) throw new Error("server did not start");
    }
    await new Promise((r) => setTimeout(r, 250));
  }

  const distanceBody = JSON.stringify({ a: "1011 0010 1110 0001 0101 1100 0011 1010", b: "1001 0110 1110 0101 0101 1000 0011 1110" });
  const check = await fetch(`${base}/api/v1/distance`, { method: "POST", headers: { authorization: `Bearer ${key}`, "content-type": "application/json" }, body: distanceBody });
  if (check.status !== 200) throw new Error(`distance answered ${check.status}: ${await check.text()}`);

  const run = (title: string, opts: Partial<autocannon.Options>) =>
    autocannon({ url: base, connections: 10, duration: seconds, title, ...opts }) as unknown as Promise<Result>;

  // Warm both paths so JIT and caches are comparable, then measure.
  await run("warm", { duration: 2, url: `${base}/api/health` });
  const baseline = await run("GET /api/health (constant)", { url: `${base}/api/health` });
  await run("warm", { duration: 2, url: `${base}/api/v1/distance`, method: "POST", headers: { authorization: `Bearer ${key}`, "content-type": "application/json" }, body: distanceBody });
  const distance = await run("POST /api/v1/distance", {
    url: `${base}/api/v1/distance`,
    method: "POST",
    headers: { authorization: `Bearer ${key}`, "content-type": "application/json" },
    body: distanceBody,
  });

  const row = (r: Result) => ({
    "req/s": Math.round(r.requests.average),
    "p50 ms": r.latency.p50,
    "p99 ms": r.latency.p99,
    non2xx: r.non2xx,
    errors: r.errors,
  });
  console.log(`\nHTTP over loopback, production build, 10 connections, ${seconds} s each`);
  console.table({ [baseline.title!]: row(baseline), [distance.title!]: row(distance) });
  console.log(
    `ratio distance / constant: throughput ${(distance.requests.average / baseline.requests.average).toFixed(3)}, ` +
      `p50 latency ${(distance.latency.p50 / Math.max(baseline.latency.p50, 0.001)).toFixed(2)}×, p99 latency ${(distance.latency.p99 / Math.max(baseline.latency.p99, 0.001)).toFixed(2)}×`,
  );

  // A cheap authenticated call on one connection, alone and then while every endpoint's heaviest allowed request runs in a loop.
  const cheap = { url: `${base}/api/v1/distance`, method: "POST" as const, headers: { authorization: `Bearer ${key}`, "content-type": "application/json" }, body: distanceBody, connections: 1 };
  const alone = await run("cheap call alone", cheap);
  const load = heavyRequests.map((h) =>
    autocannon({ url: `${base}${h.path}`, method: "POST", headers: cheap.headers, body: JSON.stringify(h.body), connections: 1, duration: seconds + 2, title: h.path }) as unknown as Promise<Result>,
  );
  await new Promise((r) => setTimeout(r, 1000));
  const loaded = await run("cheap call under heavy load", cheap);
  const heavy = await Promise.all(load);
  console.log(`\nA cheap call (POST /api/v1/distance, one connection) alone and while each endpoint's heaviest allowed request loops on its own connection, ${seconds} s`);
  console.table({ [alone.title!]: row(alone), [loaded.title!]: row(loaded) });
  console.table(
    Object.fromEntries(heavy.map((h) => [h.title!, { "req/s": Math.round(h.requests.average * 10) / 10, "p50 ms": h.latency.p50, "p99 ms": h.latency.p99, "2xx": h["2xx"], non2xx: h.non2xx, "timeouts (10 s)": h.timeouts }])),
  );
  console.log(`ratio loaded / alone: p50 latency ${(loaded.latency.p50 / Math.max(alone.latency.p50, 0.001)).toFixed(2)}×, p99 latency ${(loaded.latency.p99 / Math.max(alone.latency.p99, 0.001)).toFixed(2)}× (aim: p99 within 2×)`);
} finally {
  try {
    process.kill(-server.pid!, "SIGTERM");
  } catch {
    // already gone
  }
  for (const s of ["", "-wal", "-shm"]) rmSync(dbFile + s, { force: true });
}
