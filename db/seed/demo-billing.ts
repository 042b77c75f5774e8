import type Stripe from "stripe";
import type { Db } from "@/db";
import { findBillingAccount, updateBillingAccount } from "@/db/queries/billing";
import type { Org } from "@/db/schema";
import { ensureCustomer } from "@/lib/billing/accounts";
import { providerCatalogue } from "@/lib/billing/catalogue";
import { isPlanId, periodOf } from "@/lib/billing/plans";

/**
 * The demo org's standing at the billing provider (the local stand-in): a customer with the stand-in's
 * always-succeeding test card and a subscription to its plan that started at the beginning of last month, so
 * last month closes into an invoice once its usage has been reported. Runs once; later starts find it.
 */
export async function seedDemoBilling(db: Db, stripe: Stripe, org: Org): Promise<void> {
  const account = await ensureCustomer(db, stripe, org);
  if ((await findBillingAccount(db, org.id))?.subscription_id || !isPlanId(org.plan)) return;
  const { prices } = await providerCatalogue(stripe);
  const price = prices[org.plan];
  if (!price) return;
  const card = await stripe.paymentMethods.create({ type: "card", card: { number: "4242424242424242", exp_month: 4, exp_year: 2030, cvc: "123" } } as Stripe.PaymentMethodCreateParams);
  await stripe.paymentMethods.attach(card.id, { customer: account.customer_id });
  await stripe.customers.update(account.customer_id, { invoice_settings: { default_payment_method: card.id } });
  const lastMonth = periodOf(new Date(periodOf(new Date()).start.getTime() - 1)).start;
  const sub = await stripe.subscriptions.create({
    customer: account.customer_id,
    items: [{ price: price.fee, quantity: 1 }, { price: price.units }],
    default_payment_method: card.id,
    backdate_start_date: Math.floor(lastMonth.getTime() / 1000),
    metadata: { org_id: String(org.id), plan: org.plan },
  });
  await updateBillingAccount(db, org.id, {
    subscription_id: sub.id,
    subscription_status: sub.status,
    card_brand: card.card?.brand ?? "visa",
    card_last4: card.card?.last4 ?? "4242",
    card_exp_month: card.card?.exp_month ?? 4,
    card_exp_year: card.card?.exp_year ?? 2030,
    updated_at: new Date().toISOString(),
  });
}
