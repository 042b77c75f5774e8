import Stripe from "stripe";
import { billingConfig, type BillingConfig } from "./config";

/**
 * The billing provider's SDK client, built from the configuration alone: the same code talks to the local
 * stand-in in development and tests and to the hosted service in production.
 */

const clients = new Map<string, Stripe>();

export function clientFor(c: BillingConfig): Stripe {
  const key = [c.secretKey, c.host, c.port, c.protocol].join("|");
  let client = clients.get(key);
  if (!client) {
    client = new Stripe(c.secretKey, { host: c.host, port: c.port, protocol: c.protocol, maxNetworkRetries: 2, timeout: 20_000, appInfo: { name: "paritas" } });
    clients.set(key, client);
  }
  return client;
}

/** The configured client, or null when billing is off. */
export function billingClient(): Stripe | null {
  const c = billingConfig();
  return c ? clientFor(c) : null;
}

/** The provider's error code of a failed call, if it was one of its errors. */
export const providerErrorCode = (e: unknown): string | undefined => (e instanceof Stripe.errors.StripeError ? e.code : undefined);
