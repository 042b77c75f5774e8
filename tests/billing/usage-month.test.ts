import { describe, expect, it, vi } from "vitest";
import { findBillingAccount, setOrgPlan } from "@/db/queries/billing";
import { findOrgById } from "@/db/queries/orgs";
import { createKey } from "@/lib/api/key-service";
import { recordUsage } from "@/lib/api/metering";
import { METER_EVENT } from "@/lib/billing/catalogue";
import { reportUsageOnce } from "@/lib/billing/reporter";
import { billingStandInForThisFile, payOnPage } from "../helpers/billing";
import { consoleCall, makeConsoleOrg } from "../helpers/console";
import { until } from "../helpers/jobs";
import { rng } from "../helpers/rng";

vi.mock(import("@/lib/mail/send"), async (orig) => ({ ...(await orig()), sendMail: vi.fn(async () => {}) }));

/**
 * A month of usage from several keys, metered as calls are, reported to the stand-in and invoiced: the provider's
 * meter total equals the ledger, and the invoice's lines are Beacon's prices applied to it. Beacon's figures are
 * written out here from its published terms (the console's plan list): $39.00 a month, 40,000 units included,
 * then 2 cents a unit.
 */
const h = billingStandInForThisFile({ webhooks: true });
const BEACON = { fee: 3900, included: 40_000, perUnit: 2 };

describe("a month of usage across several keys", () => {
  it("reaches the provider unit for unit and is invoiced at the plan's prices", async () => {
    const fx = await makeConsoleOrg();
    await setOrgPlan(fx.db, fx.org.id, "lantern");
    const checkout = await consoleCall("POST", `/api/console/orgs/${fx.org.slug}/billing/checkout`, { cookie: fx.owner.cookie, body: { plan: "beacon" } });
    await payOnPage(checkout.body.url, "4242424242424242");
    await until(async () => (await findOrgById(fx.db, fx.org.id))!.plan, (p) => p === "beacon", 10_000);
    const org = (await findOrgById(fx.db, fx.org.id))!;

    const keys = await Promise.all(
      [
        ["ci", "live"],
        ["lab rig", "live"],
        ["night soak", "live"],
        ["sandbox", "test"],
      ].map(([name, mode]) => createKey(fx.db, { orgId: org.id, name: name!, mode: mode as "live" | "test", scopes: ["compute"] }, "system")),
    );
    // 500 calls spread over the month so far: units 50–200 on success, 0 for refusals (every tenth call), a quarter from the test key.
    const rand = rng(20261203);
    const now = Date.now();
    const monthStart = Date.UTC(new Date(now).getUTCFullYear(), new Date(now).getUTCMonth(), 1);
    for (let i = 0; i < 500; i++) {
      const k = keys[Math.floor(rand() * keys.length)]!.record;
      const at = new Date(monthStart + Math.floor(rand() * (now - 1000 - monthStart)));
      const status = i % 10 === 9 ? 422 : 200;
      await recordUsage(fx.db, { payer: { orgId: org.id, plan: org.plan, mode: k.mode }, keyId: k.id, endpoint: "encode", method: "POST", status, units: 50 + Math.floor(rand() * 151), durationMs: 1, requestId: `req_month_${i}`, at });
    }

    for (;;) {
      const pass = await reportUsageOnce(fx.db, h.stripe, { batch: 100 });
      expect(pass.failed).toBe(0);
      if (pass.sent + pass.duplicates === 0) break;
    }

    // The ledger, summed here by its own query: live rows of this org this month.
    const ledger = Number(
      (
        await fx.db
          .selectFrom("usage_events")
          .select((eb) => eb.fn.sum<number>("units").as("u"))
          .where("org_id", "=", org.id)
          .where("mode", "=", "live")
          .executeTakeFirstOrThrow()
      ).u,
    );
    expect(ledger).toBeGreaterThan(BEACON.included);
    const account = (await findBillingAccount(fx.db, org.id))!;
    const meter = (await h.stripe.billing.meters.list()).data.find((m) => m.event_name === METER_EVENT)!;
    const summaries = await h.stripe.billing.meters.listEventSummaries(meter.id, { customer: account.customer_id, start_time: Math.floor(monthStart / 1000), end_time: Math.ceil(now / 1000) + 1 });
    expect(summaries.data.reduce((s, x) => s + x.aggregated_value, 0)).toBe(ledger);

    await h.control(`subscriptions/${account.subscription_id}/close-period`);
    const [invoice] = (await h.stripe.invoices.list({ customer: account.customer_id })).data;
    const lines = await h.stripe.invoices.listLineItems(invoice!.id!, { limit: 100 });
    const amounts = lines.data.map((l) => [l.quantity, l.amount]);
    const overage = ledger - BEACON.included;
    expect(amounts).toEqual(expect.arrayContaining([[1, BEACON.fee], [BEACON.included, 0], [overage, overage * BEACON.perUnit]]));
    expect(invoice!.total).toBe(BEACON.fee + overage * BEACON.perUnit);
    await until(async () => (await h.stripe.invoices.retrieve(invoice!.id!)).status, (s) => s === "paid", 5000);

    // The console shows the same invoice, and its documents carry the same total.
    const base = `/api/console/orgs/${fx.org.slug}/billing/invoices`;
    const list = await consoleCall("GET", base, { cookie: fx.billing.cookie });
    expect(list.body.items.map((i: { id: string; total: number }) => [i.id, i.total])).toEqual([[invoice!.id, invoice!.total]]);
    const detail = (await consoleCall("GET", `${base}/${invoice!.id}`, { cookie: fx.billing.cookie })).body;
    expect(detail.lines.reduce((s: number, l: { amount: number }) => s + l.amount, 0)).toBe(invoice!.total);
    expect(detail.status).toBe("paid");
    const pdf = await consoleCall("GET", `${base}/${invoice!.id}/document?format=pdf`, { cookie: fx.billing.cookie }).buffer(true);
    expect(pdf.headers["content-type"]).toBe("application/pdf");
    expect(Buffer.from(pdf.body as Buffer).subarray(0, 5).toString()).toBe("%PDF-");
    const csv = await consoleCall("GET", `${base}/${invoice!.id}/document?format=csv`, { cookie: fx.billing.cookie });
    const dollars = `${Math.floor(invoice!.total / 100)}.${String(invoice!.total % 100).padStart(2, "0")}`;
    expect(csv.text).toContain(dollars);
  }, 120_000);
});
