import { rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import Stripe from "stripe";
import { migrate, openDb } from "@/db";
import { insertOrg } from "@/db/queries/orgs";
import { insertUsageEvent } from "@/db/queries/usage";
import { startFakeBilling } from "@/fakes/billing";
import { recordUsage } from "@/lib/api/metering";
import { reserveQuota } from "@/lib/api/quota";
import { reportUsageOnce } from "@/lib/billing/reporter";

/**
 * Billing's costs, in process on scratch databases: (1) metering a call with its quota (reserve before, then the
 * usage row and the settlement in one transaction) against the plain usage-row insert it replaced, per call;
 * (2) the usage reporter's throughput against the local billing stand-in (meter events accepted per second).
 */
export async function runBillingBench(): Promise<void> {
  const file = join(tmpdir(), `paritas-bench-billing-${process.pid}.db`);
  const db = openDb(file);
  await migrate(db);
  const org = await insertOrg(db, { slug: "bench-billing", name: "Bench billing", plan: "beacon" });
  const payer = { orgId: org.id, plan: org.plan, mode: "live" as const };
  const calls = 5_000;
  const row = (i: number, at: Date) => ({ org_id: org.id, api_key_id: null, endpoint: "distance", method: "POST", status: 200, units: 1, duration_ms: 1, request_id: `req_b${i}`, created_at: at.toISOString(), reported_at: null });

  const t0 = performance.now();
  for (let i = 0; i < calls; i++) await insertUsageEvent(db, row(i, new Date()));
  const plain = (performance.now() - t0) / calls;
  const t1 = performance.now();
  for (let i = 0; i < calls; i++) {
    const at = new Date();
    const held = await reserveQuota(db, payer, 1, at);
    await recordUsage(db, { payer, keyId: null, endpoint: "distance", method: "POST", status: 200, units: 1, durationMs: 1, requestId: `req_q${i}`, at }, held);
  }
  const withQuota = (performance.now() - t1) / calls;
  console.log(`\nmetering per call (${calls} calls, SQLite WAL): usage row alone ${(plain * 1000).toFixed(0)} µs; with quota reserve + settle ${(withQuota * 1000).toFixed(0)} µs (${(withQuota / plain).toFixed(2)}×)`);

  const stateFile = join(tmpdir(), `paritas-bench-stand-in-${process.pid}.json`);
  const standIn = await startFakeBilling({ port: 0, stateFile, secretKey: "bench-secret" });
  const stripe = new Stripe("bench-secret", { host: "127.0.0.1", port: standIn.port, protocol: "http", maxNetworkRetries: 2 });
  const rows = await db.selectFrom("usage_events").select((eb) => eb.fn.countAll<number>().as("n")).where("reported_at", "is", null).executeTakeFirstOrThrow();
  const t2 = performance.now();
  let sent = 0;
  for (;;) {
    const pass = await reportUsageOnce(db, stripe, { batch: 200 });
    sent += pass.sent;
    if (pass.sent + pass.duplicates + pass.failed === 0) break;
  }
  const secs = (performance.now() - t2) / 1000;
  console.log(`usage reporter against the local stand-in: ${sent} of ${rows.n} rows in ${secs.toFixed(1)} s = ${(sent / secs).toFixed(0)} meter events/s (8 in flight)`);
  await standIn.close();
  await db.destroy();
  for (const f of [file, `${file}-wal`, `${file}-shm`, stateFile, `${stateFile}.meter-events.jsonl`, `${stateFile}.idempotency.jsonl`]) rmSync(f, { force: true });
}
