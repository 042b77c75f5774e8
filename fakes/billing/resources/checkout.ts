import { declined, readCard } from "../cards";
import { closedPage, notFoundPage, paymentPage } from "../checkout-page";
import { ApiError, get, invalid, metadata, obj, objects, Page, str, type Ctx, type Route } from "../objects";
import { newId, unixNow, type Session } from "../state";
import { attach, createCard } from "./customers";
import { readItems, startSubscription } from "./subscriptions";

const sessionLifetime = 24 * 3600;

/** An open session past its expiry is expired from then on. */
function current(session: Session): Session {
  if (session.status === "open" && unixNow() >= session.expires_at) session.status = "expired";
  return session;
}

function createSession({ env, q }: Ctx) {
  if (str(q, "mode", true) !== "subscription") throw invalid("parameter_invalid_string", "Only mode=subscription is supported.", "mode");
  const customer = get(env.store, "customers", str(q, "customer", true), "customer");
  const items = readItems(objects(q, "line_items"), "line_items");
  if (items.length === 0) throw invalid("parameter_missing", "At least one line item is required.", "line_items");
  items.forEach((it, i) => get(env.store, "prices", it.price, `line_items[${i}][price]`));
  const now = unixNow();
  const id = newId("session");
  const session: Session = {
    id,
    object: "checkout.session",
    created: now,
    livemode: false,
    metadata: metadata(q),
    url: `${env.publicUrl}/pay/${id}`,
    status: "open",
    payment_status: "unpaid",
    customer: customer.id,
    mode: "subscription",
    client_reference_id: str(q, "client_reference_id") ?? null,
    success_url: str(q, "success_url", true),
    cancel_url: str(q, "cancel_url") ?? null,
    subscription: null,
    expires_at: now + sessionLifetime,
    _line_items: items,
    _subscription_metadata: metadata(obj(q, "subscription_data")),
  };
  env.store.state.sessions[id] = session;
  return session;
}

function expireSession({ env, params }: Ctx) {
  const session = current(get(env.store, "sessions", params.id!));
  if (session.status !== "open") throw invalid("checkout_session_not_open", `Only an open session can be expired; this one is ${session.status}.`);
  session.status = "expired";
  env.emit("checkout.session.expired", session);
  return session;
}

function showPage({ env, params }: Ctx) {
  const session = env.store.state.sessions[params.id!];
  if (!session) return new Page(404, notFoundPage());
  return current(session).status === "open" ? new Page(200, paymentPage(env.store, session)) : new Page(410, closedPage(session));
}

/**
 * The card form's answer. A good card: payment method created, attached and made the customer's
 * default, subscription started, session complete, then 303 to success_url. A declined or unknown
 * card: the page again with the reason, and nothing created.
 */
function pay({ env, params, q }: Ctx) {
  const s = env.store.state;
  const session = s.sessions[params.id!];
  if (!session) return new Page(404, notFoundPage());
  if (current(session).status !== "open") return new Page(410, closedPage(session));
  const customer = get(env.store, "customers", session.customer, "customer");
  const expiry = /^\s*(\d{1,2})\s*\/\s*(\d{2}|\d{4})\s*$/.exec(str(q, "expiry") ?? "");
  if (!expiry) return new Page(400, paymentPage(env.store, session, "Enter the expiry as MM/YY."));
  const card = { number: str(q, "number") ?? "", exp_month: Number(expiry[1]), exp_year: Number(expiry[2]), cvc: str(q, "cvc") ?? "" };
  try {
    // Checked before anything is made, so a refused card leaves no trace.
    if (readCard(card.number, card.exp_month, card.exp_year, card.cvc).behaviour === "declined") throw declined();
  } catch (e) {
    if (!(e instanceof ApiError)) throw e;
    const message = e.code === "card_declined" ? "The card was declined. Nothing was charged; try another card or go back." : `${e.message} Nothing was charged.`;
    return new Page(402, paymentPage(env.store, session, message));
  }
  const pm = createCard(env, card);
  attach(pm, customer);
  customer.invoice_settings.default_payment_method = pm.id;
  const sub = startSubscription(env, { customer: customer.id, items: session._line_items, defaultPaymentMethod: pm.id, metadata: session._subscription_metadata });
  session.status = "complete";
  session.payment_status = "paid";
  session.subscription = sub.id;
  env.emit("checkout.session.completed", session);
  env.emit("customer.subscription.created", sub);
  return new Page(303, "", session.success_url.replaceAll("{CHECKOUT_SESSION_ID}", session.id));
}

export const checkoutRoutes: Route[] = [
  ["POST", "/v1/checkout/sessions", createSession],
  ["GET", "/v1/checkout/sessions/:id", ({ env, params }) => current(get(env.store, "sessions", params.id!))],
  ["POST", "/v1/checkout/sessions/:id/expire", expireSession],
  ["GET", "/pay/:id", showPage, "no-auth"],
  ["POST", "/pay/:id", pay, "no-auth"],
];
