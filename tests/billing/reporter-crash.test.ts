import { spawn, type ChildProcess } from "node:child_process";
import { describe, expect, it } from "vitest";
import { sql } from "kysely";
import { findBillingAccount } from "@/db/queries/billing";
import { insertUsageEvent } from "@/db/queries/usage";
import { createKey } from "@/lib/api/key-service";
import { METER_EVENT } from "@/lib/billing/catalogue";
import { billingStandInForThisFile } from "../helpers/billing";
import { makeOrgWithKey } from "../helpers/fixtures";
import { until } from "../helpers/jobs";
import { rng } from "../helpers/rng";

/**
 * The usage reporter killed with SIGKILL in the middle of its work, then started again: the provider's meter totals
 * equal the ledger, org by org — nothing lost, nothing counted twice.
 */
const h = billingStandInForThisFile();

// One process, with tsx as a loader: through the tsx command the script runs in a child of it, and a kill reached only
// the wrapper, leaving the reporter itself running on, orphaned — the crash was no crash.
const startReporter = (): ChildProcess =>
  spawn(process.execPath, ["--import", "tsx", "scripts/billing-reporter.ts"], { env: { ...process.env, PARITAS_REPORTER_IDLE_MS: "200" }, stdio: ["ignore", "pipe", "pipe"] });

describe("a reporter killed mid-batch", () => {
  it("loses and duplicates nothing: after kill -9 and a restart the provider's totals equal the ledger", async () => {
    const a = await makeOrgWithKey({ mode: "live", plan: "beacon" });
    const b = await makeOrgWithKey({ mode: "live", plan: "lighthouse" });
    const db = a.db;
    const second = await createKey(db, { orgId: a.org.id, name: "second", mode: "live", scopes: ["compute"] }, "system");
    const testKey = await createKey(db, { orgId: b.org.id, name: "sandbox", mode: "test", scopes: ["compute"] }, "system");
    const keys = [
      { org: a.org.id, key: a.keyId, mode: "live" as const },
      { org: a.org.id, key: second.record.id, mode: "live" as const },
      { org: b.org.id, key: b.keyId, mode: "live" as const },
      { org: b.org.id, key: testKey.record.id, mode: "test" as const },
    ];
    const rand = rng(7);
    const start = Date.now() - 3_600_000;
    for (let i = 0; i < 1500; i++) {
      const k = keys[i % keys.length]!;
      await insertUsageEvent(db, { org_id: k.org, api_key_id: k.key, endpoint: "decode", method: "POST", status: 200, units: 1 + Math.floor(rand() * 40), duration_ms: 1, request_id: `req_outbox_${i}`, created_at: new Date(start + i * 1000).toISOString(), reported_at: null, mode: k.mode });
    }
    const reportable = async () => Number((await db.selectFrom("usage_events").select((eb) => eb.fn.countAll<number>().as("n")).where("mode", "=", "live").where("units", ">", 0).executeTakeFirstOrThrow()).n);
    const reported = async () => Number((await db.selectFrom("usage_events").select((eb) => eb.fn.countAll<number>().as("n")).where("reported_at", "is not", null).executeTakeFirstOrThrow()).n);
    const total = await reportable();

    let child = startReporter();
    await until(reported, (n) => n >= 150, 60_000);
    child.kill("SIGKILL");
    await new Promise((r) => child.once("exit", r));
    const before = await reported();
    expect(before).toBeGreaterThan(0);
    expect(before).toBeLessThan(total);
    // The other half of a kill mid-batch: events the provider accepted whose rows were not yet marked. Unmark the
    // latest 40 marked rows to be sure such rows exist; the restarted reporter sends them again, and the provider's
    // refusal of a known identifier must not count them twice.
    await sql`update usage_events set reported_at = null where id in (select id from usage_events where reported_at is not null order by id desc limit 40)`.execute(db);

    child = startReporter();
    await until(reported, (n) => n === total, 60_000);
    child.kill("SIGTERM");
    await new Promise((r) => child.once("exit", r));

    const meter = (await h.stripe.billing.meters.list()).data.find((m) => m.event_name === METER_EVENT)!;
    for (const org of [a.org.id, b.org.id]) {
      const ledger = Number((await db.selectFrom("usage_events").select((eb) => eb.fn.sum<number>("units").as("u")).where("org_id", "=", org).where("mode", "=", "live").executeTakeFirstOrThrow()).u);
      const customer = (await findBillingAccount(db, org))!.customer_id;
      const summaries = await h.stripe.billing.meters.listEventSummaries(meter.id, { customer, start_time: Math.floor(start / 1000) - 60, end_time: Math.ceil(Date.now() / 1000) + 60 });
      expect(summaries.data.reduce((s, x) => s + x.aggregated_value, 0)).toBe(ledger);
    }
    // Test-key usage never reaches the provider.
    expect(Number((await db.selectFrom("usage_events").select((eb) => eb.fn.countAll<number>().as("n")).where("mode", "=", "test").where("reported_at", "is not", null).executeTakeFirstOrThrow()).n)).toBe(0);
  }, 180_000);
});
