import { declined, readCard } from "../cards";
import { get, int, invalid, list, metadata, newestFirst, obj, str, type Ctx, type Route } from "../objects";
import { newId, unixNow, type Customer, type PaymentMethod } from "../state";
import type { Env } from "../webhooks";

function createCustomer({ env, q }: Ctx) {
  const c: Customer = {
    id: newId("customer"),
    object: "customer",
    created: unixNow(),
    livemode: false,
    metadata: metadata(q),
    name: str(q, "name") ?? null,
    email: str(q, "email") ?? null,
    invoice_settings: { default_payment_method: null },
  };
  env.store.state.customers[c.id] = c;
  return c;
}

function updateCustomer({ env, q, params }: Ctx) {
  const c = get(env.store, "customers", params.id!);
  c.metadata = metadata(q, c.metadata);
  if (q.name !== undefined) c.name = str(q, "name") ?? null;
  if (q.email !== undefined) c.email = str(q, "email") ?? null;
  const settings = obj(q, "invoice_settings");
  if (settings.default_payment_method !== undefined) {
    const param = "invoice_settings[default_payment_method]";
    const pm = str(settings, "default_payment_method");
    if (pm !== undefined && get(env.store, "paymentMethods", pm, param).customer !== c.id) {
      throw invalid("payment_method_not_attached", `Payment method '${pm}' is not attached to this customer.`, param);
    }
    c.invoice_settings.default_payment_method = pm ?? null;
  }
  return c;
}

function listCustomers({ env, q }: Ctx) {
  const email = str(q, "email");
  const all = newestFirst(env.store.state.customers).filter((c) => email === undefined || c.email === email);
  return list(all, q, "/v1/customers");
}

/** A card payment method from the raw card fields; only brand, last four and expiry are kept. */
export function createCard(env: Env, card: { number: string; exp_month: number; exp_year: number; cvc: string }, meta: Record<string, string> = {}): PaymentMethod {
  const read = readCard(card.number, card.exp_month, card.exp_year, card.cvc);
  const pm: PaymentMethod = {
    id: newId("paymentmethod"),
    object: "payment_method",
    created: unixNow(),
    livemode: false,
    metadata: meta,
    type: "card",
    card: read.card,
    customer: null,
    _behaviour: read.behaviour,
  };
  env.store.state.paymentMethods[pm.id] = pm;
  return pm;
}

/** The always-declined card is refused when it is attached, before anything can be charged to it. */
export function attach(pm: PaymentMethod, customer: Customer): void {
  if (pm._behaviour === "declined") throw declined();
  pm.customer = customer.id;
}

function createPaymentMethod({ env, q }: Ctx) {
  if (str(q, "type", true) !== "card") throw invalid("parameter_invalid_string", "Only type=card is supported.", "type");
  const card = obj(q, "card");
  return createCard(
    env,
    {
      number: str(card, "number", true),
      exp_month: int(card, "exp_month", "card[exp_month]") ?? 0,
      exp_year: int(card, "exp_year", "card[exp_year]") ?? 0,
      cvc: str(card, "cvc", true),
    },
    metadata(q),
  );
}

function attachPaymentMethod({ env, q, params }: Ctx) {
  const pm = get(env.store, "paymentMethods", params.id!);
  attach(pm, get(env.store, "customers", str(q, "customer", true), "customer"));
  return pm;
}

function customerPaymentMethods({ env, q, params }: Ctx) {
  const c = get(env.store, "customers", params.id!);
  const all = newestFirst(env.store.state.paymentMethods).filter((pm) => pm.customer === c.id);
  return list(all, q, `/v1/customers/${c.id}/payment_methods`);
}

export const customerRoutes: Route[] = [
  ["POST", "/v1/customers", createCustomer],
  ["GET", "/v1/customers", listCustomers],
  ["GET", "/v1/customers/:id", ({ env, params }) => get(env.store, "customers", params.id!)],
  ["POST", "/v1/customers/:id", updateCustomer],
  ["GET", "/v1/customers/:id/payment_methods", customerPaymentMethods],
  ["POST", "/v1/payment_methods", createPaymentMethod],
  ["GET", "/v1/payment_methods/:id", ({ env, params }) => get(env.store, "paymentMethods", params.id!)],
  ["POST", "/v1/payment_methods/:id/attach", attachPaymentMethod],
];
