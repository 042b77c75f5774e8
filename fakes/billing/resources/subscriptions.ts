import { cancelNow } from "../invoicing";
import { bool, get, int, invalid, list, metadata, newestFirst, objects, render, str, type Ctx, type Route } from "../objects";
import { monthStart, newId, nextMonthStart, unixNow, type LineItemInput, type Meta, type Subscription } from "../state";
import type { Env } from "../webhooks";

/** Starts a subscription (the caller raises its event) whose first period is the calendar month (UTC) of its start, or of `backdate` when given. */
export function startSubscription(
  env: Env,
  args: { customer: string; items: LineItemInput[]; defaultPaymentMethod: string | null; metadata: Meta; backdate?: number },
): Subscription {
  const s = env.store.state;
  const customer = get(env.store, "customers", args.customer, "customer");
  if (args.items.length === 0) throw invalid("parameter_missing", "At least one item is required.", "items");
  const prices = args.items.map((it, i) => get(env.store, "prices", it.price, `items[${i}][price]`));
  const currency = prices[0]!.currency;
  if (prices.some((p) => p.currency !== currency)) throw invalid("currency_mismatch", "All items must be priced in one currency.", "items");
  if (args.defaultPaymentMethod !== null && get(env.store, "paymentMethods", args.defaultPaymentMethod, "default_payment_method").customer !== customer.id) {
    throw invalid("payment_method_not_attached", "The default payment method must be attached to the customer.", "default_payment_method");
  }
  const now = unixNow();
  const start = args.backdate ?? now;
  if (start > now) throw invalid("parameter_invalid_integer", "backdate_start_date must not be in the future.", "backdate_start_date");
  const sub: Subscription = {
    id: newId("subscription"),
    object: "subscription",
    created: now,
    livemode: false,
    metadata: args.metadata,
    customer: customer.id,
    status: "active",
    items: args.items.map((it, i) => ({
      id: newId("subitem"),
      object: "subscription_item",
      created: now,
      metadata: {},
      price: it.price,
      // Metered items have no quantity: usage comes from the meter.
      quantity: prices[i]!.recurring.usage_type === "metered" ? null : (it.quantity ?? 1),
    })),
    current_period_start: monthStart(start),
    current_period_end: nextMonthStart(start),
    default_payment_method: args.defaultPaymentMethod,
    cancel_at_period_end: false,
    start_date: start,
    latest_invoice: null,
    canceled_at: null,
    ended_at: null,
    currency,
  };
  s.subscriptions[sub.id] = sub;
  return sub;
}

export function readItems(raw: ReturnType<typeof objects>, name: string): LineItemInput[] {
  return raw.map((it, i) => {
    const quantity = int(it, "quantity", `${name}[${i}][quantity]`) ?? null;
    if (quantity !== null && quantity < 1) throw invalid("parameter_invalid_integer", "quantity must be at least 1.", `${name}[${i}][quantity]`);
    return { price: str(it, "price", true), quantity };
  });
}

function createSubscription({ env, q }: Ctx) {
  const sub = startSubscription(env, {
    customer: str(q, "customer", true),
    items: readItems(objects(q, "items"), "items"),
    defaultPaymentMethod: str(q, "default_payment_method") ?? null,
    metadata: metadata(q),
    backdate: int(q, "backdate_start_date"),
  });
  env.emit("customer.subscription.created", sub);
  return render(env.store, sub);
}

function updateSubscription({ env, q, params }: Ctx) {
  const sub = get(env.store, "subscriptions", params.id!);
  if (sub.status === "canceled") throw invalid("subscription_canceled", "A canceled subscription cannot be changed.");
  sub.metadata = metadata(q, sub.metadata);
  sub.cancel_at_period_end = bool(q, "cancel_at_period_end") ?? sub.cancel_at_period_end;
  const pm = str(q, "default_payment_method");
  if (pm !== undefined) {
    if (get(env.store, "paymentMethods", pm, "default_payment_method").customer !== sub.customer) {
      throw invalid("payment_method_not_attached", "The default payment method must be attached to the customer.", "default_payment_method");
    }
    sub.default_payment_method = pm;
  }
  env.emit("customer.subscription.updated", sub);
  return render(env.store, sub);
}

function listSubscriptions({ env, q }: Ctx) {
  const customer = str(q, "customer");
  const status = str(q, "status");
  const all = newestFirst(env.store.state.subscriptions).filter(
    (x) => (customer === undefined || x.customer === customer) && (status === "all" || (status === undefined ? x.status !== "canceled" : x.status === status)),
  );
  return list(all, q, "/v1/subscriptions", (x) => render(env.store, x));
}

function cancelSubscription({ env, params }: Ctx) {
  const sub = get(env.store, "subscriptions", params.id!);
  cancelNow(env, sub);
  return render(env.store, sub);
}

export const subscriptionRoutes: Route[] = [
  ["POST", "/v1/subscriptions", createSubscription],
  ["GET", "/v1/subscriptions", listSubscriptions],
  ["GET", "/v1/subscriptions/:id", ({ env, params }) => render(env.store, get(env.store, "subscriptions", params.id!))],
  ["POST", "/v1/subscriptions/:id", updateSubscription],
  ["DELETE", "/v1/subscriptions/:id", cancelSubscription],
];
