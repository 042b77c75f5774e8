import { describe, expect, it, vi } from "vitest";
import { findBillingAccount, setOrgPlan } from "@/db/queries/billing";
import { findOrgById } from "@/db/queries/orgs";
import { sweepGrace } from "@/lib/billing/accounts";
import { GRACE_DAYS } from "@/lib/billing/plans";
import { expectProblem } from "../helpers/api";
import { billingStandInForThisFile, payOnPage, TEST_WEBHOOK_SECRET } from "../helpers/billing";
import { consoleCall, makeConsoleOrg, sentMails, type ConsoleFixture } from "../helpers/console";
import { until } from "../helpers/jobs";

vi.mock(import("@/lib/mail/send"), async (orig) => ({ ...(await orig()), sendMail: vi.fn(async () => {}) }));

// Each test waits on webhooks delivered over loopback; on a loaded CI machine they can take seconds.
vi.setConfig({ testTimeout: 60_000 });

/**
 * Plan changes end to end: the console starts a checkout, the person pays on the stand-in's page, the stand-in
 * sends its signed events to /api/webhooks/billing on a real local port, and the plan changes. Then repeated,
 * reordered and forged deliveries, and a failed payment through its grace period to the free plan.
 */
const h = billingStandInForThisFile({ webhooks: true });

const billingPath = (fx: ConsoleFixture) => `/api/console/orgs/${fx.org.slug}/billing`;
const planOf = async (fx: ConsoleFixture) => (await findOrgById(fx.db, fx.org.id))!.plan;
const events = async (fx: ConsoleFixture) => (await fx.db.selectFrom("billing_events").selectAll().execute()).length;
const planChanges = async (fx: ConsoleFixture) => (await fx.db.selectFrom("audit_log").select("details").where("org_id", "=", fx.org.id).where("action", "=", "billing.plan_changed").execute()).map((r) => JSON.parse(r.details) as { from: string; to: string; reason: string });

async function checkout(fx: ConsoleFixture, plan: string, as = fx.billing): Promise<string> {
  const res = await consoleCall("POST", `${billingPath(fx)}/checkout`, { cookie: as.cookie, body: { plan } });
  expect(res.status, res.text).toBe(201);
  return (res.body as { url: string }).url;
}

async function freeOrg(): Promise<ConsoleFixture> {
  const fx = await makeConsoleOrg();
  await setOrgPlan(fx.db, fx.org.id, "lantern");
  return fx;
}

/** Post an event to the webhook route as the provider would, signed with `secret` (the SDK's own test signer). */
function deliver(payload: string, secret = TEST_WEBHOOK_SECRET, signature?: string) {
  const header = signature ?? h.stripe.webhooks.generateTestHeaderString({ payload, secret });
  return fetch(`${h.appUrl}/api/webhooks/billing`, { method: "POST", body: payload, headers: { "content-type": "application/json", ...(header ? { "stripe-signature": header } : {}) } });
}

describe("moving to a paid plan through checkout", () => {
  it("a billing admin pays with the success card: the plan changes when the provider's event arrives, with the card on file, audited and announced", async () => {
    const fx = await freeOrg();
    const url = await checkout(fx, "beacon");
    expect(url).toMatch(new RegExp(`^${h.standIn.url}/pay/`));
    const paid = await payOnPage(url, "4242424242424242");
    expect(paid.status).toBe(303);
    expect(paid.location).toMatch(new RegExp(`/console/${fx.org.slug}/billing\\?checkout=done&session=`));

    await until(() => planOf(fx), (p) => p === "beacon", 10_000);
    const overview = (await consoleCall("GET", billingPath(fx), { cookie: fx.owner.cookie })).body;
    expect(overview.plan.id).toBe("beacon");
    expect(overview.payment).toEqual({ state: "ok", card: { brand: "visa", last4: "4242", expMonth: 4, expYear: 2030 }, graceUntil: null });
    expect(overview.subscriptionStatus).toBe("active");
    expect(await planChanges(fx)).toEqual([{ from: "lantern", to: "beacon", reason: "checkout" }]);
    await until(async () => sentMails().filter((m) => m.subject.includes(`${fx.org.name} is now on the Beacon plan`)).map((m) => m.to).sort(), (to) => to.length === 3, 5000);
    const told = sentMails().filter((m) => m.subject.includes(`${fx.org.name} is now on the Beacon plan`)).map((m) => m.to);
    expect(told.sort()).toEqual([fx.owner.email, fx.coOwner.email, fx.billing.email].sort());
  });

  it("the declined card changes nothing: the page says so, no subscription is made, the plan stays", async () => {
    const fx = await freeOrg();
    const url = await checkout(fx, "lighthouse", fx.owner);
    const declined = await payOnPage(url, "4000000000000002");
    expect(declined.status).toBe(402);
    expect(declined.text).toMatch(/id="payment-error"[^>]*>[^<]*declined/);
    const account = (await findBillingAccount(fx.db, fx.org.id))!;
    expect((await h.stripe.subscriptions.list({ customer: account.customer_id, status: "all" })).data).toEqual([]);
    expect(await planOf(fx)).toBe("lantern");
    expect(account.subscription_id).toBeNull();
  });

  it("moving between paid plans keeps one subscription: the newer one wins and the older one is cancelled", async () => {
    const fx = await freeOrg();
    await payOnPage(await checkout(fx, "beacon"), "4242424242424242");
    await until(() => planOf(fx), (p) => p === "beacon", 10_000);
    const first = (await findBillingAccount(fx.db, fx.org.id))!.subscription_id!;
    await payOnPage(await checkout(fx, "lighthouse"), "4242424242424242");
    await until(() => planOf(fx), (p) => p === "lighthouse", 10_000);
    const account = (await findBillingAccount(fx.db, fx.org.id))!;
    expect(account.subscription_id).not.toBe(first);
    await until(async () => (await h.stripe.subscriptions.retrieve(first)).status, (s) => s === "canceled", 5000);
    const live = (await h.stripe.subscriptions.list({ customer: account.customer_id })).data.filter((s) => s.status === "active");
    expect(live.map((s) => s.id)).toEqual([account.subscription_id]);
  });

  it("the checkout refuses the plan the org is on and the free plan, with a pointer to the field", async () => {
    const fx = await freeOrg();
    await setOrgPlan(fx.db, fx.org.id, "beacon");
    const same = await consoleCall("POST", `${billingPath(fx)}/checkout`, { cookie: fx.owner.cookie, body: { plan: "beacon" } });
    expect(expectProblem(same, 422, "validation-failed").errors?.[0]?.pointer).toBe("/plan");
    const free = await consoleCall("POST", `${billingPath(fx)}/checkout`, { cookie: fx.owner.cookie, body: { plan: "lantern" } });
    expect(expectProblem(free, 422, "validation-failed").errors?.[0]?.pointer).toBe("/plan");
  });
});

describe("webhook deliveries", () => {
  it("a missing or wrong signature is refused with 400 and changes nothing", async () => {
    const fx = await freeOrg();
    await payOnPage(await checkout(fx, "beacon"), "4242424242424242");
    await until(() => planOf(fx), (p) => p === "beacon", 10_000);
    const [event] = (await h.stripe.events.list({ type: "checkout.session.completed", limit: 1 })).data;
    const payload = JSON.stringify({ ...event, id: "event.forged0000001" });
    const before = await events(fx);
    await setOrgPlan(fx.db, fx.org.id, "lantern");

    for (const res of [await deliver(payload, "someone-elses-secret"), await deliver(payload, TEST_WEBHOOK_SECRET, ""), await deliver(payload, TEST_WEBHOOK_SECRET, "t=1,v1=00")]) {
      expect(res.status).toBe(400);
      expect(res.headers.get("content-type")).toMatch(/^application\/problem\+json/);
      expect(((await res.json()) as { detail: string }).detail).toMatch(/Stripe-Signature|signature/);
    }
    // A body changed after signing fails too.
    const signed = h.stripe.webhooks.generateTestHeaderString({ payload, secret: TEST_WEBHOOK_SECRET });
    expect((await deliver(payload.replace("checkout.session.completed", "invoice.paid"), TEST_WEBHOOK_SECRET, signed)).status).toBe(400);
    expect(await events(fx)).toBe(before);
    expect(await planOf(fx)).toBe("lantern");
  });

  it("a repeated delivery is acknowledged and processed once; the stand-in's own redelivery too", async () => {
    const fx = await freeOrg();
    await payOnPage(await checkout(fx, "beacon"), "4242424242424242");
    await until(() => planOf(fx), (p) => p === "beacon", 10_000);
    const account = (await findBillingAccount(fx.db, fx.org.id))!;
    const [event] = (await h.stripe.events.list({ type: "checkout.session.completed", limit: 10 })).data.filter((e) => (e.data.object as { customer?: string }).customer === account.customer_id);
    const payload = JSON.stringify(event);

    const again = await deliver(payload);
    expect(again.status).toBe(200);
    expect(await again.json()).toMatchObject({ received: event!.id, duplicate: true });

    await h.control(`events/${event!.id}/redeliver`);
    const deliveries = async () => ((await (await fetch(`${h.standIn.url}/_stand-in/deliveries`, { headers: { authorization: `Bearer ${process.env.PARITAS_BILLING_SECRET_KEY}` } })).json()) as { data: { event: string; status?: number }[] }).data;
    await until(deliveries, (d) => d.filter((x) => x.event === event!.id && x.status === 200).length >= 2, 5000);

    const rows = await fx.db.selectFrom("billing_events").select("event_id").where("event_id", "=", event!.id).execute();
    expect(rows).toHaveLength(1);
    expect(await planChanges(fx)).toHaveLength(1);
  });

  it("an event that arrives late, about a subscription no longer the org's, changes nothing (each event's object is read fresh)", async () => {
    const fx = await freeOrg();
    await payOnPage(await checkout(fx, "beacon"), "4242424242424242");
    await until(() => planOf(fx), (p) => p === "beacon", 10_000);
    const old = (await findBillingAccount(fx.db, fx.org.id))!.subscription_id!;
    const oldSnapshot = await h.stripe.subscriptions.retrieve(old);
    await payOnPage(await checkout(fx, "lighthouse"), "4242424242424242");
    await until(() => planOf(fx), (p) => p === "lighthouse", 10_000);
    await until(async () => (await h.stripe.subscriptions.retrieve(old)).status, (s) => s === "canceled", 5000);

    // The old subscription's "updated" event, delivered after everything else, still showing it active.
    const late = JSON.stringify({ id: "event.late00000000001", object: "event", type: "customer.subscription.updated", created: oldSnapshot.created, livemode: false, data: { object: oldSnapshot } });
    const res = await deliver(late);
    expect(res.status).toBe(200);
    expect(await res.json()).toMatchObject({ duplicate: false });
    expect(await planOf(fx)).toBe("lighthouse");
    expect((await findBillingAccount(fx.db, fx.org.id))!.subscription_id).not.toBe(old);
  });
});

describe("a failed payment", () => {
  it("starts a grace period with a notice; when it ends unpaid the org moves to the free plan, its subscription cancelled, with a notice", async () => {
    const fx = await freeOrg();
    // 4000 0000 0000 0341 is accepted at checkout and declined on every later charge.
    await payOnPage(await checkout(fx, "beacon"), "4000000000000341");
    await until(() => planOf(fx), (p) => p === "beacon", 10_000);
    const sub = (await findBillingAccount(fx.db, fx.org.id))!.subscription_id!;

    const closedAt = Date.now();
    await h.control(`subscriptions/${sub}/close-period`);
    const failing = await until(() => findBillingAccount(fx.db, fx.org.id), (a) => a?.payment_failed_at != null, 10_000);
    const grace = Date.parse(failing!.grace_until!);
    expect(grace).toBeGreaterThanOrEqual(closedAt + GRACE_DAYS * 86_400_000);
    expect(grace).toBeLessThan(Date.now() + GRACE_DAYS * 86_400_000 + 1000);
    expect(await planOf(fx)).toBe("beacon");
    const overview = (await consoleCall("GET", billingPath(fx), { cookie: fx.billing.cookie })).body;
    expect(overview.payment.state).toBe("failed");
    expect(overview.payment.graceUntil).toBe(failing!.grace_until);
    await until(async () => sentMails().filter((m) => m.subject === `Paritas: a payment for ${fx.org.name} failed`).length, (n) => n === 3, 5000);

    // The day before the end nothing happens; after it, the free plan.
    expect(await sweepGrace(fx.db, h.stripe, new Date(grace - 86_400_000))).toBe(0);
    expect(await planOf(fx)).toBe("beacon");
    expect(await sweepGrace(fx.db, h.stripe, new Date(grace + 1000))).toBe(1);
    expect(await planOf(fx)).toBe("lantern");
    expect((await h.stripe.subscriptions.retrieve(sub)).status).toBe("canceled");
    expect((await findBillingAccount(fx.db, fx.org.id))!).toMatchObject({ subscription_id: null, payment_failed_at: null, grace_until: null });
    expect((await planChanges(fx)).at(-1)).toEqual({ from: "beacon", to: "lantern", reason: "grace-ended" });
    expect(sentMails().filter((m) => m.subject === `Paritas: ${fx.org.name} is now on the Lantern plan`).map((m) => m.text)[0]).toMatch(/grace period after a failed payment ended/);
  });

  it("paying during the grace period ends it, with a notice", async () => {
    const fx = await freeOrg();
    await payOnPage(await checkout(fx, "beacon"), "4000000000000341");
    await until(() => planOf(fx), (p) => p === "beacon", 10_000);
    const account = (await findBillingAccount(fx.db, fx.org.id))!;
    await h.control(`subscriptions/${account.subscription_id}/close-period`);
    await until(() => findBillingAccount(fx.db, fx.org.id), (a) => a?.payment_failed_at != null, 10_000);

    const card = await h.stripe.paymentMethods.create({ type: "card", card: { number: "4242424242424242", exp_month: 1, exp_year: 2031, cvc: "123" } } as Parameters<typeof h.stripe.paymentMethods.create>[0]);
    await h.stripe.paymentMethods.attach(card.id, { customer: account.customer_id });
    await h.stripe.customers.update(account.customer_id, { invoice_settings: { default_payment_method: card.id } });
    const [invoice] = (await h.stripe.invoices.list({ customer: account.customer_id, status: "open" })).data;
    await h.stripe.invoices.pay(invoice!.id!);

    await until(() => findBillingAccount(fx.db, fx.org.id), (a) => a?.payment_failed_at == null, 10_000);
    expect((await findBillingAccount(fx.db, fx.org.id))!.grace_until).toBeNull();
    expect(await planOf(fx)).toBe("beacon");
    await until(async () => sentMails().filter((m) => m.subject === `Paritas: payment received for ${fx.org.name}`).length, (n) => n === 3, 5000);
  });
});

describe("a new card through checkout during the grace period", () => {
  it("choosing the same plan again with a good card replaces the failing subscription and ends the grace period", async () => {
    const fx = await freeOrg();
    await payOnPage(await checkout(fx, "beacon"), "4000000000000341");
    await until(() => planOf(fx), (p) => p === "beacon", 10_000);
    const failing = (await findBillingAccount(fx.db, fx.org.id))!.subscription_id!;
    await h.control(`subscriptions/${failing}/close-period`);
    await until(() => findBillingAccount(fx.db, fx.org.id), (a) => a?.payment_failed_at != null, 10_000);

    await payOnPage(await checkout(fx, "beacon"), "4242424242424242");
    const account = await until(() => findBillingAccount(fx.db, fx.org.id), (a) => a?.subscription_id !== failing, 10_000);
    expect(account).toMatchObject({ payment_failed_at: null, grace_until: null, card_last4: "4242" });
    await until(async () => (await h.stripe.subscriptions.retrieve(failing)).status, (s) => s === "canceled", 5000);
    expect(await sweepGrace(fx.db, h.stripe, new Date(Date.now() + (GRACE_DAYS + 1) * 86_400_000))).toBe(0);
    expect(await planOf(fx)).toBe("beacon");
  });
});

describe("moving to the free plan", () => {
  it("cancels the subscription at the provider, which invoices the month so far; the plan changes at once", async () => {
    const fx = await freeOrg();
    await payOnPage(await checkout(fx, "beacon"), "4242424242424242");
    await until(() => planOf(fx), (p) => p === "beacon", 10_000);
    const sub = (await findBillingAccount(fx.db, fx.org.id))!.subscription_id!;
    const res = await consoleCall("POST", `${billingPath(fx)}/downgrade`, { cookie: fx.billing.cookie });
    expect(res.status, res.text).toBe(200);
    expect(res.body.plan.id).toBe("lantern");
    expect(await planOf(fx)).toBe("lantern");
    expect((await h.stripe.subscriptions.retrieve(sub)).status).toBe("canceled");
    expect((await planChanges(fx)).at(-1)).toEqual({ from: "beacon", to: "lantern", reason: "requested" });
    // The provider's own "deleted" event arrives afterwards and finds nothing left to change.
    await until(async () => (await fx.db.selectFrom("billing_events").select("outcome").where("type", "=", "customer.subscription.deleted").execute()).length, (n) => n >= 1, 5000);
    expect(await planChanges(fx)).toHaveLength(2);
    const again = await consoleCall("POST", `${billingPath(fx)}/downgrade`, { cookie: fx.billing.cookie });
    expectProblem(again, 422, "validation-failed");
  });
});
