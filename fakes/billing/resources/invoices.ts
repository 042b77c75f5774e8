import { closeDue, closePeriod, payInvoice } from "../invoicing";
import { get, invalid, list, newestFirst, render, str, type Ctx, type Route } from "../objects";
import { unixNow } from "../state";
import { queue } from "../webhooks";

function listInvoices({ env, q }: Ctx) {
  const customer = str(q, "customer");
  const subscription = str(q, "subscription");
  const status = str(q, "status");
  const all = newestFirst(env.store.state.invoices).filter(
    (i) => (customer === undefined || i.customer === customer) && (subscription === undefined || i.subscription === subscription) && (status === undefined || i.status === status),
  );
  return list(all, q, "/v1/invoices", (i) => render(env.store, i));
}

function invoiceLines({ env, q, params }: Ctx) {
  const invoice = get(env.store, "invoices", params.id!);
  return list(invoice._lines, q, `/v1/invoices/${invoice.id}/lines`);
}

/** Invoices are finalized when they are made, so finalizing again only answers the invoice. */
function finalize({ env, params }: Ctx) {
  return render(env.store, get(env.store, "invoices", params.id!));
}

/** A decline is answered with the card error, but its effects (attempt counted, webhook, past_due) are kept. */
function pay(c: Ctx) {
  const invoice = get(c.env.store, "invoices", c.params.id!);
  const refusal = payInvoice(c.env, invoice);
  if (refusal) {
    c.env.store.save();
    throw refusal;
  }
  return render(c.env.store, invoice);
}

function listEvents({ env, q }: Ctx) {
  const type = str(q, "type");
  return list(
    newestFirst(env.store.state.events).filter((e) => type === undefined || e.type === type),
    q,
    "/v1/events",
  );
}

/** Ends the current period now (or closes it as it stands if it already ended) and invoices it. */
function closeNow({ env, params }: Ctx) {
  const sub = get(env.store, "subscriptions", params.id!);
  if (sub.status === "canceled") throw invalid("subscription_canceled", "A canceled subscription has no period to close.");
  return render(env.store, closePeriod(env, sub, Math.min(sub.current_period_end, unixNow())));
}

function redeliver({ env, params }: Ctx) {
  const event = get(env.store, "events", params.id!);
  queue(env.store, event.id);
  return { object: "stand_in.redelivery", event: event.id, queued: true };
}

export const invoiceRoutes: Route[] = [
  ["GET", "/v1/invoices", listInvoices],
  ["GET", "/v1/invoices/:id", ({ env, params }) => render(env.store, get(env.store, "invoices", params.id!))],
  ["GET", "/v1/invoices/:id/lines", invoiceLines],
  ["POST", "/v1/invoices/:id/finalize", finalize],
  ["POST", "/v1/invoices/:id/pay", pay],
  ["GET", "/v1/events", listEvents],
  ["GET", "/v1/events/:id", ({ env, params }) => get(env.store, "events", params.id!)],
  // Control endpoints of the stand-in itself (not part of the provider's API).
  ["POST", "/_stand-in/close-due", ({ env }) => ({ object: "list", data: closeDue(env, 0).map((i) => render(env.store, i)), has_more: false, url: "/_stand-in/close-due" })],
  ["POST", "/_stand-in/subscriptions/:id/close-period", closeNow],
  ["POST", "/_stand-in/events/:id/redeliver", redeliver],
  ["GET", "/_stand-in/deliveries", ({ env }) => ({ object: "list", data: [...env.store.state.deliveryLog].reverse(), pending: env.store.state.deliveries, has_more: false, url: "/_stand-in/deliveries" })],
];
