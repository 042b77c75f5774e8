import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import Stripe from "stripe";
import { afterAll, describe, expect, it } from "vitest";
import { bootBilling, startReceiver, until } from "./billing-harness";

// The billing stand-in (fakes/billing.ts) driven through the provider's real SDK (stripe 23.1.0).

const secretKey = "stand-in-test-key";
const dir = mkdtempSync(join(tmpdir(), "paritas-billing-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
let files = 0;
const stateFile = () => join(dir, `state-${++files}.json`);

// Card numbers and outcomes from the provider's published test-mode card list.
const cards = { ok: "4242424242424242", declined: "4000000000000002", failsLater: "4000000000000341" };

/** Calendar months in UTC, computed here independently of the stand-in. */
const now = () => Math.floor(Date.now() / 1000);
const thisMonth = () => {
  const d = new Date();
  return Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), 1) / 1000;
};
const lastMonth = () => {
  const d = new Date();
  return Date.UTC(d.getUTCFullYear(), d.getUTCMonth() - 1, 1) / 1000;
};

/**
 * Reference for graduated tiered pricing, written from the definition: the units inside each tier are
 * charged at that tier's unit amount (plus its flat amount when the tier is reached).
 */
function graduated(tiers: { up_to: number | "inf"; unit_amount: number; flat_amount?: number }[], units: number) {
  const out: { quantity: number; amount: number }[] = [];
  let below = 0;
  for (const t of tiers) {
    const top = t.up_to === "inf" ? Infinity : t.up_to;
    const quantity = Math.max(0, Math.min(units, top) - below);
    if (quantity === 0 && out.length > 0) break;
    out.push({ quantity, amount: quantity * t.unit_amount + (quantity > 0 ? (t.flat_amount ?? 0) : 0) });
    below = top;
  }
  return out;
}

const computeTiers = [
  { up_to: 40000, unit_amount: 0 },
  { up_to: "inf" as const, unit_amount: 2 },
];

/** The catalogue Paritas sets up: a licensed base price and a graduated metered price on a compute-unit meter. */
async function catalogue(stripe: Stripe, tag: string) {
  const meter = await stripe.billing.meters.create({
    display_name: "Compute units",
    event_name: `compute_units_${tag}`,
    default_aggregation: { formula: "sum" },
    customer_mapping: { type: "by_id", event_payload_key: "stripe_customer_id" },
    value_settings: { event_payload_key: "value" },
  });
  const product = await stripe.products.create({ name: "Paritas Team", metadata: { plan: "team" } });
  const base = await stripe.prices.create({
    product: product.id,
    currency: "usd",
    unit_amount: 3900,
    nickname: "Team plan",
    lookup_key: `team_base_${tag}`,
    recurring: { interval: "month", usage_type: "licensed" },
  });
  const usage = await stripe.prices.create({
    product: product.id,
    currency: "usd",
    nickname: "Compute units",
    lookup_key: `team_usage_${tag}`,
    billing_scheme: "tiered",
    tiers_mode: "graduated",
    tiers: computeTiers,
    recurring: { interval: "month", usage_type: "metered", meter: meter.id },
  });
  return { meter, product, base, usage };
}

async function customerWithCard(stripe: Stripe, number: string) {
  const customer = await stripe.customers.create({ name: "Ada", email: `ada-${Math.random()}@example.test`, metadata: { org_id: "7" } });
  const pm = await stripe.paymentMethods.create({ type: "card", card: { number, exp_month: 12, exp_year: 2040, cvc: "123" } });
  await stripe.paymentMethods.attach(pm.id, { customer: customer.id });
  await stripe.customers.update(customer.id, { invoice_settings: { default_payment_method: pm.id } });
  return { customer, pm };
}

type Sub = Stripe.Subscription & { current_period_start: number; current_period_end: number };
type Inv = Stripe.Invoice & { subscription: string };

describe("billing stand-in: catalogue objects", () => {
  it("creates, reads, updates and pages through customers, products, prices and meters", async () => {
    const { billing, stripe } = await bootBilling({ stateFile: stateFile(), secretKey });
    try {
      const made: string[] = [];
      for (let i = 0; i < 13; i++) made.push((await stripe.customers.create({ name: `c${i}`, email: i % 2 ? "odd@example.test" : "even@example.test" })).id);
      for (const id of made) expect(id).toMatch(/^customer\.[a-z2-7]{12}$/);

      // Newest first, through the SDK's own auto-pagination over pages of 5.
      const all = await stripe.customers.list({ limit: 5 }).autoPagingToArray({ limit: 100 });
      expect(all.map((c) => c.id)).toEqual([...made].reverse());
      const odd = await stripe.customers.list({ email: "odd@example.test", limit: 100 });
      expect(odd.data).toHaveLength(6);
      const before = await stripe.customers.list({ limit: 3, ending_before: made[5] });
      expect(before.data.map((c) => c.id)).toEqual([made[8], made[7], made[6]]);
      expect(before.has_more).toBe(true);

      const c = await stripe.customers.update(made[0]!, { name: "Renamed", metadata: { org_id: "9" } });
      expect(c).toMatchObject({ object: "customer", name: "Renamed", metadata: { org_id: "9" }, livemode: false });
      expect((await stripe.customers.retrieve(made[0]!)) as Stripe.Customer).toMatchObject({ name: "Renamed", email: "even@example.test" });

      const product = await stripe.products.create({ id: "paritas-compute", name: "Compute", description: "Metered compute units" });
      expect(await stripe.products.retrieve("paritas-compute")).toMatchObject({ id: "paritas-compute", name: "Compute", object: "product" });
      expect((await stripe.products.list()).data.map((p) => p.id)).toEqual(["paritas-compute"]);

      const { meter, base, usage } = await catalogue(stripe, "a");
      expect(base).toMatchObject({ unit_amount: 3900, currency: "usd", recurring: { interval: "month", usage_type: "licensed" } });
      const fetched = await stripe.prices.retrieve(usage.id, { expand: ["tiers"] });
      expect(fetched).toMatchObject({ billing_scheme: "tiered", tiers_mode: "graduated", recurring: { usage_type: "metered", meter: meter.id } });
      expect(fetched.tiers?.map((t) => [t.up_to, t.unit_amount])).toEqual([
        [40000, 0],
        [null, 2],
      ]);
      expect((await stripe.prices.list({ lookup_keys: ["team_base_a"] })).data.map((p) => p.id)).toEqual([base.id]);
      expect((await stripe.prices.list({ product: product.id })).data).toEqual([]);

      // Amounts are integers in minor units: 39.5 is refused, not rounded.
      await expect(
        stripe.prices.create({ product: product.id, currency: "usd", unit_amount: 39.5, recurring: { interval: "month" } }),
      ).rejects.toMatchObject({ type: "StripeInvalidRequestError", param: "unit_amount" });

      await catalogue(stripe, "b");
      await catalogue(stripe, "c");
      const meters = await stripe.billing.meters.list({ limit: 1 }).autoPagingToArray({ limit: 10 });
      expect(meters.map((m) => m.event_name)).toEqual(["compute_units_c", "compute_units_b", "compute_units_a"]);
      expect(await stripe.billing.meters.retrieve(meter.id)).toMatchObject({ display_name: "Compute units", status: "active" });
    } finally {
      await billing.close();
    }
  });

  it("refuses a wrong key with the SDK's authentication error and an unknown path with a 404 error", async () => {
    const { billing } = await bootBilling({ stateFile: stateFile(), secretKey });
    try {
      const wrong = new Stripe("not-the-key", { host: "127.0.0.1", port: billing.port, protocol: "http", maxNetworkRetries: 2 });
      const err = await wrong.customers.list().catch((e: unknown) => e);
      expect(err).toBeInstanceOf(Stripe.errors.StripeAuthenticationError);
      expect(err).toMatchObject({ statusCode: 401, code: "api_key_invalid" });
      const res = await fetch(`${billing.url}/v1/nothing-here`, { headers: { authorization: `Bearer ${secretKey}` } });
      expect(res.status).toBe(404);
      expect(await res.json()).toMatchObject({ error: { type: "invalid_request_error" } });
      const odd = await fetch(`${billing.url}/v1/customers/%zz`, { headers: { authorization: `Bearer ${secretKey}` } });
      expect([odd.status, ((await odd.json()) as { error: { code: string } }).error.code]).toEqual([404, "resource_missing"]);
    } finally {
      await billing.close();
    }
  });
});

describe("billing stand-in: meter events and idempotency", () => {
  it("sums events per customer and window and counts an identifier once", async () => {
    const { billing, stripe } = await bootBilling({ stateFile: stateFile(), secretKey });
    try {
      const { meter } = await catalogue(stripe, "m");
      const a = await stripe.customers.create({ name: "A" });
      const b = await stripe.customers.create({ name: "B" });
      const t0 = now() - 3 * 86400;
      const send = (customer: string, value: number, identifier: string, timestamp: number) =>
        stripe.billing.meterEvents.create({ event_name: "compute_units_m", payload: { stripe_customer_id: customer, value: String(value) }, identifier, timestamp });
      await send(a.id, 100, "a-1", t0);
      await send(a.id, 250, "a-2", t0 + 86400);
      await send(b.id, 7, "b-1", t0);
      await send(a.id, 1000, "a-late", now() + 1000);

      const dup = await send(a.id, 100, "a-1", t0).catch((e: unknown) => e);
      expect(dup).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError);
      expect(dup).toMatchObject({ statusCode: 400, code: "meter_event_duplicate_identifier" });
      await expect(send("customer.aaaaaaaaaaaa", 5, "x-1", t0)).rejects.toMatchObject({ statusCode: 400, type: "StripeInvalidRequestError" });

      const summary = async (customer: string, start: number, end: number) =>
        (await stripe.billing.meters.listEventSummaries(meter.id, { customer, start_time: start, end_time: end })).data;
      // 100 + 250 for A (the duplicate not counted, the later event outside), 7 for B.
      expect(await summary(a.id, t0, now())).toEqual([expect.objectContaining({ object: "billing.meter_event_summary", aggregated_value: 350, start_time: t0, end_time: now(), meter: meter.id })]);
      expect((await summary(b.id, t0, now()))[0]?.aggregated_value).toBe(7);
      expect((await summary(a.id, t0 + 1, now()))[0]?.aggregated_value).toBe(250);
      const day = 86400;
      const dayStart = Math.floor(t0 / day) * day;
      const byDay = await stripe.billing.meters.listEventSummaries(meter.id, { customer: a.id, start_time: dayStart, end_time: dayStart + 3 * day, value_grouping_window: "day" }).autoPagingToArray({ limit: 10 });
      expect(byDay.map((s) => s.aggregated_value)).toEqual([0, 250, 100]);
    } finally {
      await billing.close();
    }
  });

  it("replays a request sent again with the same Idempotency-Key and refuses the key with another body", async () => {
    const { billing, stripe } = await bootBilling({ stateFile: stateFile(), secretKey });
    try {
      const first = await stripe.customers.create({ name: "Once" }, { idempotencyKey: "same-key" });
      const again = await stripe.customers.create({ name: "Once" }, { idempotencyKey: "same-key" });
      expect(again.id).toBe(first.id);
      expect((await stripe.customers.list()).data).toHaveLength(1);
      await expect(stripe.customers.create({ name: "Other" }, { idempotencyKey: "same-key" })).rejects.toMatchObject({
        statusCode: 400,
        code: "idempotency_key_in_use",
      });
    } finally {
      await billing.close();
    }
  });
});

describe("billing stand-in: checkout", () => {
  it("takes a payment on its hosted page and starts the subscription", async () => {
    const { billing, stripe } = await bootBilling({ stateFile: stateFile(), secretKey });
    try {
      const { base, usage } = await catalogue(stripe, "k");
      const customer = await stripe.customers.create({ email: "buyer@example.test" });
      const session = await stripe.checkout.sessions.create({
        mode: "subscription",
        customer: customer.id,
        line_items: [{ price: base.id, quantity: 1 }, { price: usage.id }],
        success_url: "http://app.test/billing/done?session={CHECKOUT_SESSION_ID}",
        cancel_url: "http://app.test/billing",
        client_reference_id: "org-7",
        metadata: { org_id: "7" },
        subscription_data: { metadata: { org_id: "7", plan: "team" } },
      });
      expect(session).toMatchObject({ object: "checkout.session", status: "open", payment_status: "unpaid", subscription: null, client_reference_id: "org-7" });
      expect(session.url).toBe(`${billing.url}/pay/${session.id}`);

      const page = await fetch(session.url!);
      expect(page.status).toBe(200);
      const html = await page.text();
      for (const part of ["Local billing stand-in — test payment", 'id="card-number"', 'id="card-expiry"', 'id="card-cvc"', 'id="pay"', "Team plan", cards.ok, 'href="http://app.test/billing"']) {
        expect(html).toContain(part);
      }

      const post = (number: string) =>
        fetch(session.url!, { method: "POST", redirect: "manual", headers: { "content-type": "application/x-www-form-urlencoded" }, body: new URLSearchParams({ number, expiry: "12/40", cvc: "123" }) });

      const refused = await post(cards.declined);
      expect(refused.status).toBe(402);
      expect(await refused.text()).toMatch(/id="payment-error"[^>]*>The card was declined\. Nothing was charged; try another card or go back\./);
      expect((await stripe.subscriptions.list({ customer: customer.id, status: "all" })).data).toEqual([]);
      expect((await stripe.customers.listPaymentMethods(customer.id)).data).toEqual([]);
      expect((await stripe.checkout.sessions.retrieve(session.id)).status).toBe("open");

      const paid = await post(cards.ok);
      expect(paid.status).toBe(303);
      expect(paid.headers.get("location")).toBe(`http://app.test/billing/done?session=${session.id}`);

      const done = await stripe.checkout.sessions.retrieve(session.id, { expand: ["subscription"] });
      expect(done).toMatchObject({ status: "complete", payment_status: "paid" });
      const sub = done.subscription as Sub;
      expect(sub).toMatchObject({ object: "subscription", status: "active", customer: customer.id, metadata: { org_id: "7", plan: "team" } });
      expect(sub.items.data.map((i) => i.price.id)).toEqual([base.id, usage.id]);
      expect(sub.current_period_start).toBe(thisMonth());
      const buyer = (await stripe.customers.retrieve(customer.id)) as Stripe.Customer;
      const pm = await stripe.paymentMethods.retrieve(buyer.invoice_settings.default_payment_method as string);
      expect(pm.card).toMatchObject({ brand: "visa", last4: "4242" });
      expect(JSON.stringify(pm)).not.toContain(cards.ok);

      const closed = await fetch(session.url!);
      expect(closed.status).toBe(410);
      expect(await closed.text()).toContain('href="http://app.test/billing"');
      const types = (await stripe.events.list({ limit: 100 })).data.map((e) => e.type).reverse();
      expect(types.slice(-2)).toEqual(["checkout.session.completed", "customer.subscription.created"]);
    } finally {
      await billing.close();
    }
  });
});

describe("billing stand-in: checkout sessions that end unpaid", () => {
  it("refuses a card that is not a test card and closes the page of an expired session", async () => {
    const { billing, stripe } = await bootBilling({ stateFile: stateFile(), secretKey });
    try {
      const { base } = await catalogue(stripe, "x");
      const customer = await stripe.customers.create({});
      const session = await stripe.checkout.sessions.create({ mode: "subscription", customer: customer.id, line_items: [{ price: base.id, quantity: 1 }], success_url: "http://app.test/ok", cancel_url: "http://app.test/back" });
      const unknown = await fetch(session.url!, { method: "POST", body: new URLSearchParams({ number: "4111111111111111", expiry: "12/40", cvc: "123" }) });
      expect(unknown.status).toBe(402);
      expect(await unknown.text()).toContain('id="payment-error"');
      expect(await stripe.checkout.sessions.expire(session.id)).toMatchObject({ status: "expired" });
      const gone = await fetch(session.url!);
      expect(gone.status).toBe(410);
      expect(await gone.text()).toMatch(/expired[\s\S]*href="http:\/\/app.test\/back"/);
      await expect(stripe.checkout.sessions.expire(session.id)).rejects.toMatchObject({ statusCode: 400 });
      expect((await stripe.subscriptions.list({ customer: customer.id, status: "all" })).data).toEqual([]);
    } finally {
      await billing.close();
    }
  });
});

describe("billing stand-in: webhooks", () => {
  it("signs every delivery as the SDK verifies it, retries failures and redelivers on request", async () => {
    const receiver = await startReceiver([500, 500]);
    const webhookSecret = "whsec-stand-in-test";
    const { billing, stripe } = await bootBilling({ stateFile: stateFile(), secretKey, webhookUrl: receiver.url, webhookSecret, retryBaseMs: 20 });
    try {
      const { base } = await catalogue(stripe, "w");
      const customer = await stripe.customers.create({ name: "Hooked" });
      const sub = await stripe.subscriptions.create({ customer: customer.id, items: [{ price: base.id }] });

      await until(() => receiver.received.some((r) => r.status === 200));
      expect(receiver.received.map((r) => r.status)).toEqual([500, 500, 200]);
      const events = receiver.received.map((r) => stripe.webhooks.constructEvent(r.body, r.signature, webhookSecret));
      expect(new Set(events.map((e) => e.id)).size).toBe(1);
      // The event speaks the API version the SDK asked for in its Stripe-Version header.
      expect(events[2]).toMatchObject({ type: "customer.subscription.created", api_version: Stripe.API_VERSION, data: { object: { id: sub.id } } });
      expect(() => stripe.webhooks.constructEvent(receiver.received[2]!.body, receiver.received[2]!.signature, "whsec-wrong")).toThrow(Stripe.errors.StripeSignatureVerificationError);

      const redo = await fetch(`${billing.url}/_stand-in/events/${events[2]!.id}/redeliver`, { method: "POST", headers: { authorization: `Bearer ${secretKey}` } });
      expect(redo.status).toBe(200);
      await until(() => receiver.received.length === 4);
      expect(stripe.webhooks.constructEvent(receiver.received[3]!.body, receiver.received[3]!.signature, webhookSecret).id).toBe(events[2]!.id);

      const log = (await (await fetch(`${billing.url}/_stand-in/deliveries`, { headers: { authorization: `Bearer ${secretKey}` } })).json()) as { data: { event: string; attempt: number; status: number }[] };
      expect(log.data.map((d) => [d.attempt, d.status]).reverse()).toEqual([
        [1, 500],
        [2, 500],
        [3, 200],
        [1, 200],
      ]);
    } finally {
      await billing.close();
      await receiver.close();
    }
  });
});

describe("billing stand-in: webhook retries", () => {
  it("stops after 8 failed attempts", async () => {
    const receiver = await startReceiver(Array(20).fill(500));
    const { billing, stripe } = await bootBilling({ stateFile: stateFile(), secretKey, webhookUrl: receiver.url, webhookSecret: "whsec-x", retryBaseMs: 1 });
    try {
      const { base } = await catalogue(stripe, "r");
      const customer = await stripe.customers.create({ name: "Unreachable" });
      await stripe.subscriptions.create({ customer: customer.id, items: [{ price: base.id }] });
      await until(() => receiver.received.length >= 8);
      // Backoff 2, 4, …, 128 ms between the attempts: well past it, no ninth attempt has come.
      await new Promise((r) => setTimeout(r, 400));
      expect(receiver.received).toHaveLength(8);
      const log = (await (await fetch(`${billing.url}/_stand-in/deliveries`, { headers: { authorization: `Bearer ${secretKey}` } })).json()) as { pending: unknown[] };
      expect(log.pending).toEqual([]);
    } finally {
      await billing.close();
      await receiver.close();
    }
  });
});

describe("billing stand-in: invoicing", () => {
  const units = [20000, 20000, 5123]; // 45,123 compute units in last month

  async function backdated(stripe: Stripe, tag: string, card: string) {
    const cat = await catalogue(stripe, tag);
    const { customer, pm } = await customerWithCard(stripe, card);
    const sub = (await stripe.subscriptions.create({
      customer: customer.id,
      items: [{ price: cat.base.id, quantity: 1 }, { price: cat.usage.id }],
      default_payment_method: pm.id,
      metadata: { org_id: "7" },
      backdate_start_date: lastMonth() + 5 * 86400,
    })) as unknown as Sub;
    let i = 0;
    for (const value of units) {
      await stripe.billing.meterEvents.create({ event_name: `compute_units_${tag}`, payload: { stripe_customer_id: customer.id, value: String(value) }, identifier: `${tag}-${i}`, timestamp: lastMonth() + 3600 * ++i });
    }
    // Usage of this month belongs to the next invoice.
    await stripe.billing.meterEvents.create({ event_name: `compute_units_${tag}`, payload: { stripe_customer_id: customer.id, value: "999" }, identifier: `${tag}-now`, timestamp: thisMonth() });
    return { ...cat, customer, sub };
  }

  const closePeriod = async (url: string, sub: string) => {
    const res = await fetch(`${url}/_stand-in/subscriptions/${sub}/close-period`, { method: "POST", headers: { authorization: `Bearer ${secretKey}` } });
    expect(res.status).toBe(200);
    return (await res.json()) as Inv;
  };

  it("invoices a closed month: the base fee plus graduated usage, paid with the default card", async () => {
    const { billing, stripe } = await bootBilling({ stateFile: stateFile(), secretKey });
    try {
      const { sub, customer } = await backdated(stripe, "i", cards.ok);
      expect([sub.current_period_start, sub.current_period_end]).toEqual([lastMonth(), thisMonth()]);

      const made = await closePeriod(billing.url, sub.id);
      const invoice = (await stripe.invoices.retrieve(made.id)) as unknown as Inv;
      const used = units.reduce((a, b) => a + b, 0);
      const usageLines = graduated(computeTiers, used);
      expect(usageLines).toEqual([
        { quantity: 40000, amount: 0 },
        { quantity: 5123, amount: 10246 },
      ]);
      const lines = await stripe.invoices.listLineItems(invoice.id).autoPagingToArray({ limit: 10 });
      expect(lines.map((l) => [l.quantity, l.amount])).toEqual([[1, 3900], ...usageLines.map((l) => [l.quantity, l.amount])]);
      const total = 3900 + usageLines.reduce((a, l) => a + l.amount, 0);
      expect(total).toBe(14146);
      expect(invoice).toMatchObject({
        object: "invoice",
        customer: customer.id,
        subscription: sub.id,
        status: "paid",
        currency: "usd",
        period_start: lastMonth(),
        period_end: thisMonth(),
        subtotal: total,
        total,
        amount_due: total,
        amount_paid: total,
        amount_remaining: 0,
        attempt_count: 1,
      });
      expect(invoice.number).toMatch(/^LBS-\d{4}$/);
      expect(invoice.status_transitions.paid_at).toBeGreaterThan(0);
      const paidEvents = await stripe.events.list({ type: "invoice.paid" });
      expect(paidEvents.data.map((e) => (e.data.object as Stripe.Invoice).id)).toEqual([invoice.id]);

      const next = (await stripe.subscriptions.retrieve(sub.id)) as unknown as Sub;
      expect([next.current_period_start, next.current_period_end, next.latest_invoice]).toEqual([thisMonth(), expect.any(Number), invoice.id]);

      // Cancelling now invoices this month's usage so far (999 units, inside the included tier).
      const canceled = await stripe.subscriptions.cancel(sub.id);
      expect(canceled).toMatchObject({ status: "canceled" });
      const last = (await stripe.invoices.list({ subscription: sub.id, limit: 1 })).data[0] as Inv;
      expect(last.period_start).toBe(thisMonth());
      expect((await stripe.invoices.listLineItems(last.id)).data.map((l) => [l.quantity, l.amount])).toEqual(graduated(computeTiers, 999).map((l) => [l.quantity, l.amount]));
    } finally {
      await billing.close();
    }
  });

  it("marks the subscription past due when the card fails, and active again once paid with another card", async () => {
    const { billing, stripe } = await bootBilling({ stateFile: stateFile(), secretKey });
    try {
      const { sub, customer } = await backdated(stripe, "f", cards.failsLater);
      const invoice = await closePeriod(billing.url, sub.id);
      expect(invoice).toMatchObject({ status: "open", attempt_count: 1, amount_due: 14146, amount_paid: 0 });
      expect((await stripe.subscriptions.retrieve(sub.id)).status).toBe("past_due");
      const failed = await stripe.events.list({ type: "invoice.payment_failed" });
      expect(failed.data.map((e) => (e.data.object as Stripe.Invoice).id)).toEqual([invoice.id]);

      await expect(stripe.invoices.pay(invoice.id)).rejects.toBeInstanceOf(Stripe.errors.StripeCardError);
      expect((await stripe.invoices.retrieve(invoice.id)).attempt_count).toBe(2);

      const good = await stripe.paymentMethods.create({ type: "card", card: { number: cards.ok, exp_month: 1, exp_year: 2041, cvc: "999" } });
      await stripe.paymentMethods.attach(good.id, { customer: customer.id });
      await stripe.customers.update(customer.id, { invoice_settings: { default_payment_method: good.id } });
      const paid = await stripe.invoices.pay(invoice.id);
      expect(paid).toMatchObject({ status: "paid", amount_paid: 14146 });
      expect((await stripe.subscriptions.retrieve(sub.id)).status).toBe("active");
    } finally {
      await billing.close();
    }
  });

  it("closes an ended month on its own once the close delay has passed", async () => {
    const { billing, stripe } = await bootBilling({ stateFile: stateFile(), secretKey, closeDelayMs: 0 });
    try {
      const { sub } = await backdated(stripe, "t", cards.ok);
      const deadline = Date.now() + 5000;
      let invoices: Stripe.Invoice[] = [];
      while (invoices.length === 0 && Date.now() < deadline) {
        await new Promise((r) => setTimeout(r, 100));
        invoices = (await stripe.invoices.list({ subscription: sub.id })).data;
      }
      expect(invoices.map((i) => [i.period_start, i.period_end, i.total, i.status])).toEqual([[lastMonth(), thisMonth(), 14146, "paid"]]);
    } finally {
      await billing.close();
    }
  });

  it("ends a subscription set to cancel at period end when its period closes", async () => {
    const { billing, stripe } = await bootBilling({ stateFile: stateFile(), secretKey });
    try {
      const { sub, customer } = await backdated(stripe, "e", cards.ok);
      expect(await stripe.subscriptions.update(sub.id, { cancel_at_period_end: true, metadata: { note: "leaving" } })).toMatchObject({ cancel_at_period_end: true, metadata: { org_id: "7", note: "leaving" } });
      await closePeriod(billing.url, sub.id);
      expect(await stripe.subscriptions.retrieve(sub.id)).toMatchObject({ status: "canceled", ended_at: thisMonth() });
      expect((await stripe.subscriptions.list({ customer: customer.id })).data).toEqual([]);
      expect((await stripe.subscriptions.list({ customer: customer.id, status: "all" })).data.map((x) => x.id)).toEqual([sub.id]);
      const deleted = await stripe.events.list({ type: "customer.subscription.deleted" });
      expect(deleted.data.map((e) => (e.data.object as Stripe.Subscription).id)).toEqual([sub.id]);
    } finally {
      await billing.close();
    }
  });

  it("refuses the always-declined card when it is attached", async () => {
    const { billing, stripe } = await bootBilling({ stateFile: stateFile(), secretKey });
    try {
      const customer = await stripe.customers.create({ name: "D" });
      const pm = await stripe.paymentMethods.create({ type: "card", card: { number: cards.declined, exp_month: 12, exp_year: 2040, cvc: "123" } });
      await expect(stripe.paymentMethods.attach(pm.id, { customer: customer.id })).rejects.toMatchObject({ type: "StripeCardError", code: "card_declined", decline_code: "generic_decline" });
      await expect(stripe.paymentMethods.create({ type: "card", card: { number: "4111111111111111", exp_month: 12, exp_year: 2040, cvc: "123" } })).rejects.toMatchObject({
        type: "StripeCardError",
        code: "incorrect_number",
      });
    } finally {
      await billing.close();
    }
  });
});

describe("billing stand-in: persistence", () => {
  it("sends after a restart an event whose delivery was cut short by the stop", async () => {
    const file = stateFile();
    const silent = await startReceiver([0]);
    const first = await bootBilling({ stateFile: file, secretKey, webhookUrl: silent.url, webhookSecret: "whsec-p", retryBaseMs: 1 });
    const { base } = await catalogue(first.stripe, "q");
    const customer = await first.stripe.customers.create({ name: "Q" });
    await first.stripe.subscriptions.create({ customer: customer.id, items: [{ price: base.id }] });
    await until(() => silent.received.length === 1);
    await first.billing.close();
    await silent.close();

    const receiver = await startReceiver();
    const { billing, stripe } = await bootBilling({ stateFile: file, secretKey, webhookUrl: receiver.url, webhookSecret: "whsec-p", retryBaseMs: 1 });
    try {
      await until(() => receiver.received.length === 1);
      const sent = stripe.webhooks.constructEvent(receiver.received[0]!.body, receiver.received[0]!.signature, "whsec-p");
      expect(sent.id).toBe((JSON.parse(silent.received[0]!.body) as { id: string }).id);
      expect(sent.type).toBe("customer.subscription.created");
    } finally {
      await billing.close();
      await receiver.close();
    }
  });

  it("keeps customers, usage, invoices and seen identifiers across a restart", async () => {
    const file = stateFile();
    const first = await bootBilling({ stateFile: file, secretKey });
    const { meter, customer, invoiceId } = await (async () => {
      const { stripe } = first;
      const cat = await catalogue(stripe, "p");
      const { customer } = await customerWithCard(stripe, cards.ok);
      const sub = await stripe.subscriptions.create({ customer: customer.id, items: [{ price: cat.base.id }, { price: cat.usage.id }], backdate_start_date: lastMonth() });
      await stripe.billing.meterEvents.create({ event_name: "compute_units_p", payload: { stripe_customer_id: customer.id, value: "41000" }, identifier: "p-1", timestamp: lastMonth() + 60 });
      await stripe.customers.create({ name: "Keyed" }, { idempotencyKey: "persisted-key" });
      const res = await fetch(`${first.billing.url}/_stand-in/close-due`, { method: "POST", headers: { authorization: `Bearer ${secretKey}` } });
      const made = (await res.json()) as { data: Inv[] };
      expect(made.data.map((i) => [i.subscription, i.total])).toEqual([[sub.id, 3900 + 1000 * 2]]);
      return { meter: cat.meter, customer, invoiceId: made.data[0]!.id };
    })();
    await first.billing.close();

    const { billing, stripe } = await bootBilling({ stateFile: file, secretKey });
    try {
      expect(((await stripe.customers.retrieve(customer.id)) as Stripe.Customer).email).toBe(customer.email);
      const summary = await stripe.billing.meters.listEventSummaries(meter.id, { customer: customer.id, start_time: lastMonth(), end_time: thisMonth() });
      expect(summary.data[0]?.aggregated_value).toBe(41000);
      expect((await stripe.invoices.list({ customer: customer.id })).data.map((i) => [i.id, i.status])).toEqual([[invoiceId, "paid"]]);
      await expect(
        stripe.billing.meterEvents.create({ event_name: "compute_units_p", payload: { stripe_customer_id: customer.id, value: "5" }, identifier: "p-1" }),
      ).rejects.toMatchObject({ code: "meter_event_duplicate_identifier" });
      await expect(stripe.customers.create({ name: "Not keyed" }, { idempotencyKey: "persisted-key" })).rejects.toMatchObject({ code: "idempotency_key_in_use" });
    } finally {
      await billing.close();
    }
  });
});
