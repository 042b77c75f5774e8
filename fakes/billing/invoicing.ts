import { declined } from "./cards";
import { ApiError, invalid } from "./objects";
import { newId, nextMonthStart, unixNow, type Invoice, type InvoiceLine, type Price, type Store, type Subscription } from "./state";
import type { Env } from "./webhooks";

/**
 * Closing a billing period into an invoice, and paying invoices.
 *
 * Periods are calendar months in UTC (a simplification: the provider anchors them on the start
 * date). Everything is charged in arrears when the period closes: licensed items as quantity ×
 * unit amount, metered items from the sum of the customer's meter events with a timestamp in
 * [period start, period end), priced tier by tier for graduated prices. All in integer minor units.
 */

/** Sum of the values of a customer's events on a meter with timestamp in [start, end). */
export function meterTotal(store: Store, meter: string, customer: string, start: number, end: number): number {
  let total = 0;
  for (const e of Object.values(store.state.meterEvents)) {
    if (e.meter === meter && e.customer === customer && e.timestamp >= start && e.timestamp < end) total += e.value;
  }
  return total;
}

function line(price: Price, amount: number, quantity: number, description: string, start: number, end: number): InvoiceLine {
  return {
    id: newId("line"),
    object: "line_item",
    amount,
    currency: price.currency,
    description,
    quantity,
    period: { start, end },
    price,
    pricing: { type: "price_details", price_details: { price: price.id, product: price.product } },
    metadata: {},
  };
}

/**
 * Graduated pricing: each tier prices only the units that fall inside it, so a usage reaching
 * tier k gives k lines (the first tier always, even at zero usage, so the meter shows on the invoice).
 */
const count = (n: number) => n.toLocaleString("en-US");

/** An amount in minor units as people read it: "$0.02" in dollars, else "2 minor units of EUR". */
function money(minor: number, currency: string): string {
  if (currency !== "usd") return `${count(minor)} minor units of ${currency.toUpperCase()}`;
  return `$${count(Math.floor(minor / 100))}.${String(minor % 100).padStart(2, "0")}`;
}

function tierLines(store: Store, price: Price, used: number, start: number, end: number): InvoiceLine[] {
  const name = price.nickname ?? store.state.products[price.product]?.name ?? "Usage";
  const lines: InvoiceLine[] = [];
  let below = 0;
  for (const tier of price.tiers ?? []) {
    const top = tier.up_to ?? Infinity;
    const quantity = Math.max(0, Math.min(used, top) - below);
    if (quantity === 0 && lines.length > 0) break;
    const range = tier.up_to === null ? `above ${count(below)}` : `${count(below + 1)}–${count(tier.up_to)}`;
    const rate = tier.unit_amount === 0 && !tier.flat_amount ? "included" : `at ${money(tier.unit_amount, price.currency)} each${tier.flat_amount ? ` + ${money(tier.flat_amount, price.currency)} flat` : ""}`;
    const flat = quantity > 0 ? (tier.flat_amount ?? 0) : 0;
    lines.push(line(price, quantity * tier.unit_amount + flat, quantity, `${name}, units ${range} (${rate})`, start, end));
    below = top;
  }
  return lines;
}

function itemLines(store: Store, sub: Subscription, start: number, end: number, meteredOnly: boolean): InvoiceLine[] {
  const lines: InvoiceLine[] = [];
  for (const item of sub.items) {
    const price = store.state.prices[item.price];
    if (!price) continue;
    if (price.recurring.usage_type === "metered") {
      const used = price.recurring.meter ? meterTotal(store, price.recurring.meter, sub.customer, start, end) : 0;
      if (price.billing_scheme === "tiered") lines.push(...tierLines(store, price, used, start, end));
      else lines.push(line(price, used * (price.unit_amount ?? 0), used, `${price.nickname ?? "Usage"} (${count(used)} × ${money(price.unit_amount ?? 0, price.currency)})`, start, end));
    } else if (!meteredOnly) {
      const quantity = item.quantity ?? 1;
      const name = price.nickname ?? store.state.products[price.product]?.name ?? "Subscription";
      lines.push(line(price, quantity * (price.unit_amount ?? 0), quantity, `${name} (${count(quantity)} × ${money(price.unit_amount ?? 0, price.currency)})`, start, end));
    }
  }
  return lines;
}

/** Builds the invoice for [start, end), finalizes it (status open) and tries to pay it at once. */
export function invoicePeriod(env: Env, sub: Subscription, start: number, end: number, meteredOnly = false): Invoice {
  const s = env.store.state;
  const lines = itemLines(env.store, sub, start, end, meteredOnly);
  const total = lines.reduce((a, l) => a + l.amount, 0);
  const now = unixNow();
  s.invoiceCount += 1;
  const invoice: Invoice = {
    id: newId("invoice"),
    object: "invoice",
    created: now,
    livemode: false,
    metadata: {},
    number: `LBS-${String(s.invoiceCount).padStart(4, "0")}`,
    customer: sub.customer,
    subscription: sub.id,
    status: "open",
    currency: sub.currency,
    period_start: start,
    period_end: end,
    subtotal: total,
    total,
    amount_due: total,
    amount_paid: 0,
    amount_remaining: total,
    attempt_count: 0,
    status_transitions: { finalized_at: now, paid_at: null },
    _lines: lines,
  };
  s.invoices[invoice.id] = invoice;
  sub.latest_invoice = invoice.id;
  env.emit("invoice.finalized", invoice);
  payInvoice(env, invoice);
  return invoice;
}

/**
 * Charges the customer's default payment method, else the subscription's. Returns the card error
 * on a decline (the invoice stays open, the subscription goes past_due); a success brings a
 * past-due subscription back to active once none of its invoices is left open.
 */
export function payInvoice(env: Env, invoice: Invoice): ApiError | undefined {
  const s = env.store.state;
  if (invoice.status === "paid") return invalid("invoice_already_paid", "This invoice is already paid.");
  const sub = s.subscriptions[invoice.subscription];
  const pmId = s.customers[invoice.customer]?.invoice_settings.default_payment_method ?? sub?.default_payment_method ?? null;
  const pm = pmId ? s.paymentMethods[pmId] : undefined;
  const now = unixNow();
  if (invoice.amount_due > 0) {
    invoice.attempt_count += 1;
    const refusal = !pm
      ? new ApiError(402, "card_error", "invoice_payment_method_missing", "The customer has no default payment method to charge.")
      : pm._behaviour === "ok"
        ? undefined
        : declined();
    if (refusal) {
      env.emit("invoice.payment_failed", invoice);
      if (sub && sub.status === "active") {
        sub.status = "past_due";
        env.emit("customer.subscription.updated", sub);
      }
      return refusal;
    }
  }
  invoice.status = "paid";
  invoice.amount_paid = invoice.amount_due;
  invoice.amount_remaining = 0;
  invoice.status_transitions.paid_at = now;
  env.emit("invoice.paid", invoice);
  if (sub && sub.status === "past_due" && !Object.values(s.invoices).some((i) => i.subscription === sub.id && i.status === "open")) {
    sub.status = "active";
    env.emit("customer.subscription.updated", sub);
  }
  return undefined;
}

/** Closes the current period of one subscription (ending at `end`), invoices it and starts the next calendar month (an update event), or ends the subscription if so asked. */
export function closePeriod(env: Env, sub: Subscription, end: number): Invoice {
  const invoice = invoicePeriod(env, sub, sub.current_period_start, end);
  sub.current_period_start = end;
  sub.current_period_end = nextMonthStart(end);
  if (sub.cancel_at_period_end) {
    sub.status = "canceled";
    sub.canceled_at = end;
    sub.ended_at = end;
    env.emit("customer.subscription.deleted", sub);
  } else {
    env.emit("customer.subscription.updated", sub);
  }
  return invoice;
}

const ended = (sub: Subscription) => sub.status === "canceled";

/** Closes every period that ended at least `delaySeconds` ago (repeatedly, for a subscription backdated several months). */
export function closeDue(env: Env, delaySeconds: number): Invoice[] {
  const now = unixNow();
  const made: Invoice[] = [];
  for (const sub of Object.values(env.store.state.subscriptions)) {
    while (!ended(sub) && sub.current_period_end + delaySeconds <= now) made.push(closePeriod(env, sub, sub.current_period_end));
  }
  return made;
}

/**
 * Cancels at once. The metered usage of the unfinished period is invoiced now, so no usage is lost
 * (as the provider's immediate cancel with `invoice_now`); the licensed fee of that partial period is not charged.
 */
export function cancelNow(env: Env, sub: Subscription): void {
  const now = unixNow();
  if (ended(sub)) throw invalid("subscription_canceled", "This subscription is already canceled.");
  // Months that ended but were not closed yet are invoiced in full first.
  while (sub.current_period_end <= now && !ended(sub)) closePeriod(env, sub, sub.current_period_end);
  if (ended(sub)) return;
  invoicePeriod(env, sub, sub.current_period_start, now, true);
  sub.status = "canceled";
  sub.canceled_at = now;
  sub.ended_at = now;
  env.emit("customer.subscription.deleted", sub);
}
