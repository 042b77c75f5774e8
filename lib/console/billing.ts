import type Stripe from "stripe";
import { z } from "zod";
import type { Db } from "@/db";
import { findBillingAccount } from "@/db/queries/billing";
import { findOrgById } from "@/db/queries/orgs";
import { monthKey, unitsUsed } from "@/db/queries/quota";
import type { Org } from "@/db/schema";
import { ApiError } from "@/lib/api/errors";
import { cursorParam, limitParam } from "@/lib/api/pagination";
import { downgradeToFree, startCheckout } from "@/lib/billing/accounts";
import { billingClient } from "@/lib/billing/provider";
import { chargeFor, CURRENCY, FREE_PLAN, isPaid, isPlanId, PLAN_IDS, PLANS, periodOf, planOf, projectUnits, stopsAtAllowance } from "@/lib/billing/plans";
import type { BillingOverview, InvoiceDetail, InvoiceLine, InvoicePage, InvoiceStatus, InvoiceSummary } from "@/lib/billing/views";
import { actorOf, type Caller } from "./common";

/** The console's Billing page: the plan, the month against the allowance, plan changes through the provider, invoices. */

export async function billingOverview(db: Db, org: Org, now = new Date()): Promise<BillingOverview> {
  const plan = planOf(org.plan);
  const period = periodOf(now);
  const month = monthKey(now);
  const [live, test, account] = await Promise.all([unitsUsed(db, org.id, "live", month), unitsUsed(db, org.id, "test", month), findBillingAccount(db, org.id)]);
  const projected = projectUnits(live, period, now);
  const invoice = chargeFor(plan, projected);
  return {
    plan,
    plans: PLAN_IDS.map((id) => PLANS[id]),
    currency: CURRENCY,
    period: { start: period.start.toISOString(), end: period.end.toISOString() },
    live: { used: live, allowance: plan.includedUnits, projected, stopsAtAllowance: stopsAtAllowance(plan, "live") },
    test: { used: test, allowance: plan.testUnits },
    projectedInvoice: { fee: invoice.fee, overageUnits: invoice.overageUnits, overage: invoice.overage, total: invoice.total },
    payment: {
      state: account?.payment_failed_at ? "failed" : account?.card_last4 ? "ok" : "none",
      card: account?.card_last4 ? { brand: account.card_brand ?? "card", last4: account.card_last4, expMonth: account.card_exp_month ?? 0, expYear: account.card_exp_year ?? 0 } : null,
      graceUntil: account?.grace_until ?? null,
    },
    subscriptionStatus: isPaid(plan) ? (account?.subscription_status ?? null) : null,
    providerConfigured: billingClient() !== null,
  };
}

function provider(): Stripe {
  const stripe = billingClient();
  if (!stripe) throw new ApiError("not-found", "The billing provider is not configured on this server, so plans cannot be changed and there are no invoices.");
  return stripe;
}

export const checkoutBody = z.strictObject({ plan: z.enum(PLAN_IDS).meta({ description: "The paid plan to move to." }) });

export async function orgCheckout(db: Db, org: Org, caller: Caller, plan: z.output<typeof checkoutBody>["plan"], origin: string): Promise<{ url: string }> {
  return { url: await startCheckout(db, provider(), org, plan, `${origin}/console/${org.slug}/billing`, actorOf(caller)) };
}

export async function orgDowngrade(db: Db, org: Org, caller: Caller): Promise<BillingOverview> {
  if (org.plan === FREE_PLAN) throw new ApiError("validation-failed", `/plan: The organisation is already on ${planOf(FREE_PLAN).name}.`, { errors: [{ pointer: "", message: "Already on the free plan." }] });
  await downgradeToFree(db, billingClient(), org, actorOf(caller));
  return billingOverview(db, (await findOrgById(db, org.id))!);
}

export const invoicesQuery = z.strictObject({ limit: limitParam(50, 12), cursor: cursorParam });

const isoOf = (unix: number | null | undefined) => (unix ? new Date(unix * 1000).toISOString() : null);

function summaryOf(inv: Stripe.Invoice): InvoiceSummary {
  return {
    id: inv.id!,
    number: inv.number ?? null,
    status: (inv.status ?? "draft") as InvoiceStatus,
    currency: inv.currency,
    periodStart: isoOf(inv.period_start)!,
    periodEnd: isoOf(inv.period_end)!,
    total: inv.total,
    amountDue: inv.amount_due,
    amountPaid: inv.amount_paid,
    createdAt: isoOf(inv.created)!,
    paidAt: isoOf(inv.status_transitions?.paid_at),
  };
}

/** The org's invoices at the provider, newest first; the cursor is the last invoice id of the page before. */
export async function orgInvoices(db: Db, org: Org, q: z.output<typeof invoicesQuery>): Promise<InvoicePage> {
  const stripe = provider();
  const account = await findBillingAccount(db, org.id);
  if (!account) return { items: [], nextCursor: null };
  const page = await stripe.invoices.list({ customer: account.customer_id, limit: q.limit, ...(q.cursor ? { starting_after: q.cursor } : {}) });
  const items = page.data.map(summaryOf);
  return { items, nextCursor: page.has_more ? (items.at(-1)?.id ?? null) : null };
}

/** One of the org's invoices with its line items; another customer's invoice is not found, as a missing one. */
export async function orgInvoice(db: Db, org: Org, id: string): Promise<InvoiceDetail> {
  const stripe = provider();
  const account = await findBillingAccount(db, org.id);
  const notFound = new ApiError("not-found", `There is no invoice ${id} for this organisation.`);
  if (!account || !/^[\w.-]{1,80}$/.test(id)) throw notFound;
  const inv = await stripe.invoices.retrieve(id).catch((e: unknown) => {
    if (e instanceof Error && "statusCode" in e && (e as { statusCode?: number }).statusCode === 404) throw notFound;
    throw e;
  });
  const customer = typeof inv.customer === "string" ? inv.customer : inv.customer?.id;
  if (customer !== account.customer_id) throw notFound;
  const lines = await stripe.invoices.listLineItems(id, { limit: 100 }).autoPagingToArray({ limit: 1000 });
  // The plan is named on the lines' prices (the catalogue's metadata); read loosely, as API versions place the price differently.
  const plan = lines.map((l) => (l as unknown as { price?: { metadata?: Record<string, string> } }).price?.metadata?.plan).find((p) => p !== undefined && isPlanId(p));
  return {
    ...summaryOf(inv),
    org: { name: org.name, slug: org.slug },
    plan: plan && isPlanId(plan) ? plan : null,
    lines: lines.map(
      (l): InvoiceLine => ({
        description: l.description ?? "",
        quantity: l.quantity ?? 0,
        // A line is quantity × a unit price when that divides exactly: integer cents, no float division.
        unitAmount: l.quantity && l.amount % l.quantity === 0 ? l.amount / l.quantity : null,
        amount: l.amount,
        periodStart: isoOf(l.period?.start)!,
        periodEnd: isoOf(l.period?.end)!,
      }),
    ),
  };
}
