import { randomUUID } from "node:crypto";
import type { Server } from "node:http";
import type { AddressInfo } from "node:net";
import { rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type Stripe from "stripe";
import { afterAll, beforeAll } from "vitest";
import type { FakeBilling } from "@/fakes/billing";
import { bootBilling } from "../fakes/billing-harness";
import { createApp } from "./app";

export const TEST_BILLING_KEY = "test-billing-secret";
export const TEST_WEBHOOK_SECRET = "test-webhook-signing-secret";

export interface BillingHarness {
  /** The SDK pointed at the stand-in, as Paritas configures it. */
  stripe: Stripe;
  standIn: FakeBilling;
  /** Where the stand-in delivers webhooks: the real route modules on a local port. */
  appUrl: string;
  /** POST to one of the stand-in's control endpoints. */
  control(path: string): Promise<unknown>;
}

/**
 * For one test file: the billing stand-in on a free port with its own state file, the PARITAS_BILLING_* settings
 * pointing at it, and (with `webhooks`) the app's route modules listening so that its events reach
 * /api/webhooks/billing signed with the test secret. Periods close only when a test asks.
 */
export function billingStandInForThisFile(opts: { webhooks?: boolean } = {}): BillingHarness {
  const h = {} as BillingHarness;
  const stateFile = join(tmpdir(), `paritas-billing-${randomUUID()}.json`);
  let app: Server | undefined;
  beforeAll(async () => {
    if (opts.webhooks) {
      app = createApp();
      await new Promise<void>((ok) => app!.listen(0, "127.0.0.1", ok));
      h.appUrl = `http://127.0.0.1:${(app.address() as AddressInfo).port}`;
    }
    const boot = await bootBilling({
      stateFile,
      secretKey: TEST_BILLING_KEY,
      webhookUrl: opts.webhooks ? `${h.appUrl}/api/webhooks/billing` : undefined,
      webhookSecret: TEST_WEBHOOK_SECRET,
      retryBaseMs: 50,
    });
    h.standIn = boot.billing;
    h.stripe = boot.stripe;
    Object.assign(process.env, {
      PARITAS_BILLING_SECRET_KEY: TEST_BILLING_KEY,
      PARITAS_BILLING_HOST: "127.0.0.1",
      PARITAS_BILLING_PORT: String(h.standIn.port),
      PARITAS_BILLING_PROTOCOL: "http",
      PARITAS_BILLING_WEBHOOK_SECRET: TEST_WEBHOOK_SECRET,
    });
    h.control = async (path) => {
      const res = await fetch(`${h.standIn.url}/_stand-in/${path}`, { method: "POST", headers: { authorization: `Bearer ${TEST_BILLING_KEY}` } });
      if (!res.ok) throw new Error(`stand-in control ${path}: ${res.status} ${await res.text()}`);
      return res.json();
    };
  });
  afterAll(async () => {
    for (const k of ["PARITAS_BILLING_SECRET_KEY", "PARITAS_BILLING_HOST", "PARITAS_BILLING_PORT", "PARITAS_BILLING_PROTOCOL", "PARITAS_BILLING_WEBHOOK_SECRET"]) delete process.env[k];
    await h.standIn?.close();
    if (app) await new Promise<void>((ok) => (app!.closeAllConnections(), app!.close(() => ok())));
    for (const f of [stateFile, `${stateFile}.meter-events.jsonl`, `${stateFile}.idempotency.jsonl`]) rmSync(f, { force: true });
  });
  return h;
}

/** Pay on the stand-in's hosted page the way a browser form would: the answer's status and Location. */
export async function payOnPage(url: string, card: string): Promise<{ status: number; location: string | null; text: string }> {
  const body = new URLSearchParams({ number: card, expiry: "04/30", cvc: "123" });
  const res = await fetch(url, { method: "POST", body, redirect: "manual", headers: { "content-type": "application/x-www-form-urlencoded" } });
  return { status: res.status, location: res.headers.get("location"), text: await res.text() };
}
