import Stripe from "stripe";
import { getDb } from "@/db";
import { ApiError, problemResponse } from "@/lib/api/errors";
import { requestIdFor } from "@/lib/api/request-id";
import { processBillingEvent } from "./accounts";
import { billingConfig } from "./config";
import { clientFor } from "./provider";

/**
 * POST /api/webhooks/billing: the provider's events. The signature is checked on the raw body with the SDK's own
 * verifier before anything else (missing or wrong → 400, nothing changes); each event id is processed once and a
 * repeated delivery is answered 200 with `duplicate: true`. A failure while processing answers 500, so the
 * provider delivers the event again later.
 */
export async function billingWebhook(req: Request): Promise<Response> {
  const requestId = requestIdFor(req);
  const config = billingConfig();
  if (!config?.webhookSecret) return problemResponse(new ApiError("not-found", "Billing webhooks are not configured on this server (PARITAS_BILLING_WEBHOOK_SECRET)."), requestId);
  const raw = await req.text();
  const signature = req.headers.get("stripe-signature");
  if (!signature) return problemResponse(new ApiError("bad-request", "The request has no Stripe-Signature header; only the billing provider sends events here."), requestId);
  const stripe = clientFor(config);
  let event: Stripe.Event;
  try {
    event = stripe.webhooks.constructEvent(raw, signature, config.webhookSecret);
  } catch (e) {
    const why = e instanceof Stripe.errors.StripeSignatureVerificationError ? "its signature does not match the body and the webhook secret, or its timestamp is too old" : "it could not be read";
    return problemResponse(new ApiError("bad-request", `The event was refused: ${why}. Nothing was changed.`), requestId);
  }
  try {
    const result = await processBillingEvent(await getDb(), stripe, event);
    return Response.json({ received: event.id, ...result }, { headers: { "x-request-id": requestId } });
  } catch (e) {
    return problemResponse(e instanceof ApiError ? e : new Error(`processing ${event.type} ${event.id} failed: ${e instanceof Error ? e.message : String(e)}`), requestId);
  }
}
