import type Stripe from "stripe";
import { inTransaction, type Db } from "@/db";
import { insertAudit } from "@/db/queries/audit";
import { billingEventOutcome, findAccountByCustomer, findBillingAccount, graceExpired, insertBillingAccount, recordBillingEvent, setOrgPlan, updateBillingAccount, type AccountChange } from "@/db/queries/billing";
import { listBillingEmails } from "@/db/queries/members";
import { findOrgById } from "@/db/queries/orgs";
import type { BillingAccount, Org } from "@/db/schema";
import { ApiError } from "@/lib/api/errors";
import { providerCatalogue } from "./catalogue";
import { sendBillingNotice, type BillingNotice } from "./notices";
import { FREE_PLAN, GRACE_DAYS, isPaid, isPlanId, planOf, type PlanId } from "./plans";
import { logError } from "@/lib/api/redact";

/**
 * An organisation's standing at the billing provider: its customer, the checkout that starts or changes a paid
 * plan, the move back to the free plan, and the reconciliation of the provider's events. Events are never
 * trusted for state: each one names an object, which is fetched fresh, so repeated and out-of-order deliveries
 * converge on the provider's current state.
 */

const DAY_MS = 86_400_000;
const iso = (d: Date) => d.toISOString();
const idOf = (x: string | { id: string } | null | undefined) => (x == null ? null : typeof x === "string" ? x : x.id);

/** The org's customer at the provider, made the first time (with an idempotency key, so a crash between the call and the row makes no second one). */
export async function ensureCustomer(db: Db, stripe: Stripe, org: Pick<Org, "id" | "name" | "slug">): Promise<BillingAccount> {
  const known = await findBillingAccount(db, org.id);
  if (known) return known;
  const emails = await listBillingEmails(db, org.id);
  const customer = await stripe.customers.create({ name: org.name, email: emails[0], metadata: { org_id: String(org.id), org_slug: org.slug } }, { idempotencyKey: `paritas-customer-org-${org.id}` });
  return insertBillingAccount(db, org.id, customer.id, iso(new Date()));
}

/** A checkout session for a paid plan: the hosted page where the person pays; the plan changes when the provider confirms. */
export async function startCheckout(db: Db, stripe: Stripe, org: Org, plan: PlanId, returnTo: string, actor: string): Promise<string> {
  if (!isPaid(planOf(plan))) throw new ApiError("validation-failed", "/plan: The free plan needs no checkout; move to it with the downgrade action.", { errors: [{ pointer: "/plan", message: "Choose a paid plan." }] });
  if (org.plan === plan) {
    const account = await findBillingAccount(db, org.id);
    if (!account?.payment_failed_at) throw new ApiError("validation-failed", `/plan: The organisation is already on ${planOf(plan).name}.`, { errors: [{ pointer: "/plan", message: "Already the current plan." }] });
  }
  const account = await ensureCustomer(db, stripe, org);
  const { prices } = await providerCatalogue(stripe);
  const price = prices[plan]!;
  const session = await stripe.checkout.sessions.create({
    mode: "subscription",
    customer: account.customer_id,
    line_items: [{ price: price.fee, quantity: 1 }, { price: price.units }],
    success_url: `${returnTo}?checkout=done&session={CHECKOUT_SESSION_ID}`,
    cancel_url: `${returnTo}?checkout=cancelled`,
    client_reference_id: String(org.id),
    metadata: { org_id: String(org.id), plan },
    subscription_data: { metadata: { org_id: String(org.id), plan } },
  });
  await insertAudit(db, { orgId: org.id, actor, action: "billing.checkout_started", targetType: "org", targetId: org.id, details: { plan } });
  if (!session.url) throw new Error("the billing provider returned a checkout session without a payment page");
  return session.url;
}

/** Effects to announce once the transaction that made them has committed. */
type Outcome = { words: string; notices: { orgId: number; notice: BillingNotice }[] };

/** Set the org's plan, audited (as the person who asked, or "system" for the provider's events) and announced once committed. */
async function changePlan(tx: Db, org: Org, to: PlanId, reason: "checkout" | "grace-ended" | "requested" | "subscription-ended", out: Outcome, actor = "system"): Promise<void> {
  if (org.plan === to) return;
  const from = planOf(org.plan);
  await setOrgPlan(tx, org.id, to);
  await insertAudit(tx, { orgId: org.id, actor, action: "billing.plan_changed", targetType: "org", targetId: org.id, details: { from: from.id, to, reason } });
  out.notices.push({ orgId: org.id, notice: reason === "checkout" ? { kind: "plan-changed", from, to: planOf(to) } : { kind: "downgraded", from, to: planOf(to), reason } });
  out.words += ` plan ${from.id} → ${to};`;
}

const cardOf = async (stripe: Stripe, pm: string | Stripe.PaymentMethod | null | undefined): Promise<AccountChange> => {
  const id = idOf(pm);
  if (!id) return {};
  const method = typeof pm === "object" && pm ? pm : await stripe.paymentMethods.retrieve(id);
  const card = method.card;
  return card ? { card_brand: card.brand, card_last4: card.last4, card_exp_month: card.exp_month, card_exp_year: card.exp_year } : {};
};

const LIVE = new Set(["active", "trialing", "past_due"]);

/**
 * Bring the org in line with one of its subscriptions as the provider has it now: a live subscription with a plan
 * in its metadata becomes the org's plan (a newer one replaces an older one, which is cancelled); the org's own
 * subscription ending moves it to the free plan.
 */
async function reconcileSubscription(db: Db, stripe: Stripe, sub: Stripe.Subscription, reason: "checkout" | "subscription-ended", out: Outcome): Promise<void> {
  const account = await findAccountByCustomer(db, idOf(sub.customer)!);
  if (!account) {
    out.words += " no organisation has this customer;";
    return;
  }
  const planId = sub.metadata?.plan;
  const card = LIVE.has(sub.status) ? await cardOf(stripe, sub.default_payment_method) : {};
  let replaced: string | null = null;
  await inTransaction(db, async (tx) => {
    const org = (await findOrgById(tx, account.org_id))!;
    const current = (await findBillingAccount(tx, org.id))!;
    if (LIVE.has(sub.status) && planId && isPlanId(planId)) {
      if (current.subscription_id && current.subscription_id !== sub.id) {
        // Two live subscriptions: the newer one wins and the other ends, so an org never pays twice.
        const other = await stripe.subscriptions.retrieve(current.subscription_id).catch(() => null);
        if (other && LIVE.has(other.status) && other.created > sub.created) {
          out.words += ` older subscription ${sub.id} ignored;`;
          replaced = sub.id;
          return;
        }
        replaced = current.subscription_id;
      }
      // A new subscription paid through checkout settles a failed payment of the one it replaces (which is cancelled).
      const fresh = current.subscription_id !== sub.id && sub.status === "active" ? { payment_failed_at: null, grace_until: null } : {};
      await updateBillingAccount(tx, org.id, { subscription_id: sub.id, subscription_status: sub.status, ...card, ...fresh, updated_at: iso(new Date()) });
      await changePlan(tx, org, planId, "checkout", out);
    } else if (current.subscription_id === sub.id) {
      await updateBillingAccount(tx, org.id, { subscription_id: null, subscription_status: sub.status, payment_failed_at: null, grace_until: null, updated_at: iso(new Date()) });
      await changePlan(tx, org, FREE_PLAN, reason === "checkout" ? "subscription-ended" : reason, out);
    } else out.words += ` subscription ${sub.id} is not the organisation's;`;
  });
  if (replaced) {
    await stripe.subscriptions.cancel(replaced).catch((e: unknown) => logError(`cancelling the replaced subscription ${replaced} failed`, e));
    out.words += ` cancelled ${replaced};`;
  }
}

/** The subscription an invoice belongs to (a top-level field, or under `parent` in newer API versions). */
const invoiceSubscription = (inv: Stripe.Invoice): string | null => {
  const loose = inv as unknown as { subscription?: string | { id: string } | null; parent?: { subscription_details?: { subscription?: string | { id: string } | null } | null } | null };
  return idOf(loose.subscription ?? loose.parent?.subscription_details?.subscription ?? null);
};

/** A paid invoice ends a failed-payment state; an open one that failed to charge starts the grace period (once). */
async function reconcileInvoice(db: Db, inv: Stripe.Invoice, now: Date, out: Outcome): Promise<void> {
  const account = await findAccountByCustomer(db, idOf(inv.customer)!);
  if (!account) {
    out.words += " no organisation has this customer;";
    return;
  }
  const sub = invoiceSubscription(inv);
  if (sub !== account.subscription_id) {
    out.words += ` invoice of another subscription (${sub});`;
    return;
  }
  const org = (await findOrgById(db, account.org_id))!;
  await inTransaction(db, async (tx) => {
    const current = (await findBillingAccount(tx, org.id))!;
    if (inv.status === "paid" && current.payment_failed_at) {
      await updateBillingAccount(tx, org.id, { payment_failed_at: null, grace_until: null, updated_at: iso(now) });
      await insertAudit(tx, { orgId: org.id, actor: "system", action: "billing.payment_recovered", targetType: "invoice", targetId: inv.id!, details: { amount: inv.amount_paid } });
      out.notices.push({ orgId: org.id, notice: { kind: "payment-recovered", amount: inv.amount_paid, plan: planOf(org.plan) } });
      out.words += " payment recovered;";
    } else if (inv.status === "open" && (inv.attempt_count ?? 0) > 0 && !current.payment_failed_at) {
      const graceUntil = iso(new Date(now.getTime() + GRACE_DAYS * DAY_MS));
      await updateBillingAccount(tx, org.id, { payment_failed_at: iso(now), grace_until: graceUntil, updated_at: iso(now) });
      await insertAudit(tx, { orgId: org.id, actor: "system", action: "billing.payment_failed", targetType: "invoice", targetId: inv.id!, details: { amount: inv.amount_due, graceUntil } });
      out.notices.push({ orgId: org.id, notice: { kind: "payment-failed", amount: inv.amount_due, graceUntil, plan: planOf(org.plan) } });
      out.words += ` payment failed, grace until ${graceUntil};`;
    } else out.words += ` invoice ${inv.status}, nothing to change;`;
  });
}

/**
 * Process one verified provider event, once: a repeated delivery (the event id already recorded) is acknowledged
 * and changes nothing. Returns what was done, in words.
 */
export async function processBillingEvent(db: Db, stripe: Stripe, event: Stripe.Event, now = new Date()): Promise<{ duplicate: boolean; outcome: string }> {
  const seen = await billingEventOutcome(db, event.id);
  if (seen !== undefined) return { duplicate: true, outcome: seen };
  const out: Outcome = { words: "", notices: [] };
  const object = event.data.object as { id?: string };
  switch (event.type) {
    case "checkout.session.completed": {
      const session = await stripe.checkout.sessions.retrieve(object.id!);
      const subId = idOf(session.subscription);
      if (session.status === "complete" && subId) await reconcileSubscription(db, stripe, await stripe.subscriptions.retrieve(subId), "checkout", out);
      else out.words += " checkout not complete;";
      break;
    }
    case "customer.subscription.created":
    case "customer.subscription.updated":
    case "customer.subscription.deleted":
      await reconcileSubscription(db, stripe, await stripe.subscriptions.retrieve(object.id!), "subscription-ended", out);
      break;
    case "invoice.paid":
    case "invoice.payment_failed":
      await reconcileInvoice(db, await stripe.invoices.retrieve(object.id!), now, out);
      break;
    default:
      out.words = " not acted on;";
  }
  const outcome = out.words.trim() || "no change";
  const first = await recordBillingEvent(db, { id: event.id, type: event.type, at: iso(now), outcome });
  // A concurrent delivery of the same event recorded it first: its effects are the same reconciliation, so nothing is doubled, but only one announces.
  if (first) for (const n of out.notices) await sendBillingNotice(db, n.orgId, n.notice);
  return { duplicate: !first, outcome };
}

/** Move an org to the free plan now: its subscription is cancelled at the provider (which invoices the month's usage so far). */
export async function downgradeToFree(db: Db, stripe: Stripe | null, org: Org, actor: string): Promise<void> {
  const account = await findBillingAccount(db, org.id);
  if (account?.subscription_id && stripe) await stripe.subscriptions.cancel(account.subscription_id, { invoice_now: true });
  const out: Outcome = { words: "", notices: [] };
  await inTransaction(db, async (tx) => {
    if (account) await updateBillingAccount(tx, org.id, { subscription_id: null, subscription_status: account.subscription_id ? "canceled" : account.subscription_status, payment_failed_at: null, grace_until: null, updated_at: iso(new Date()) });
    const fresh = (await findOrgById(tx, org.id))!;
    await changePlan(tx, fresh, FREE_PLAN, "requested", out, actor);
  });
  for (const n of out.notices) await sendBillingNotice(db, n.orgId, n.notice);
}

/** Orgs whose grace period has passed without payment move to the free plan (the reporter process runs this every pass). */
export async function sweepGrace(db: Db, stripe: Stripe | null, now = new Date()): Promise<number> {
  const due = await graceExpired(db, iso(now));
  for (const account of due) {
    if (account.subscription_id && stripe) await stripe.subscriptions.cancel(account.subscription_id).catch((e: unknown) => logError(`cancelling ${account.subscription_id} at the end of grace failed`, e));
    const out: Outcome = { words: "", notices: [] };
    await inTransaction(db, async (tx) => {
      await updateBillingAccount(tx, account.org_id, { subscription_id: null, subscription_status: "canceled", payment_failed_at: null, grace_until: null, updated_at: iso(now) });
      await changePlan(tx, (await findOrgById(tx, account.org_id))!, FREE_PLAN, "grace-ended", out);
    });
    for (const n of out.notices) await sendBillingNotice(db, n.orgId, n.notice);
  }
  return due.length;
}
