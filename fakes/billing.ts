import { createServer } from "node:http";
import type { AddressInfo } from "node:net";
import { resolve } from "node:path";
import { pathToFileURL } from "node:url";
import { closeDue } from "./billing/invoicing";
import { handler } from "./billing/server";
import { Store } from "./billing/state";
import { Deliverer, emit, fixedApiVersion, type Env } from "./billing/webhooks";

/**
 * A local stand-in for the hosted billing provider, for development, tests and the demo only —
 * never production, which reaches the real service through environment variables alone. It is a
 * node:http server that answers the provider's official SDK with the subset of the REST API Paritas
 * calls: customers, products, prices (licensed, and graduated tiers on a meter), billing meters and
 * meter events (deduplicated by identifier for good), card payment methods with the documented test
 * cards, checkout sessions with a hosted payment page of our own, subscriptions, invoices, events
 * and signed webhook delivery with retries. Control endpoints under /_stand-in/ let tests close
 * billing periods and redeliver events.
 *
 * Simplifications, on purpose:
 * - billing periods are calendar months in UTC (the same months as Paritas's quota periods), and
 *   everything, licensed fees included, is invoiced in arrears when a period closes;
 * - cancelling at once invoices the unfinished period's metered usage (no usage is lost), but not a
 *   partial licensed fee;
 * - raw card numbers are accepted by POST /v1/payment_methods, as there is no browser-side
 *   tokenisation here; only brand, last four and expiry are kept;
 * - meter events may carry any past timestamp;
 * - an invoice is paid from the customer's default payment method first, then the subscription's;
 * - prices always show their tiers (the provider shows them only with expand[]=tiers).
 * All state sits in one JSON file written after every change, so a restart loses nothing.
 */
export interface FakeBilling {
  port: number;
  url: string;
  close(): Promise<void>;
}

export interface FakeBillingOptions {
  port?: number;
  host?: string;
  stateFile: string;
  secretKey: string;
  webhookUrl?: string;
  webhookSecret?: string;
  closeDelayMs?: number;
  retryBaseMs?: number;
  publicUrl?: string;
}

/** Start the stand-in; port 0 picks a free port (tests). */
export async function startFakeBilling(opts: FakeBillingOptions): Promise<FakeBilling> {
  const host = opts.host ?? "127.0.0.1";
  const store = new Store(resolve(opts.stateFile));
  const deliver = Boolean(opts.webhookUrl);
  const deliverer = new Deliverer(store, opts.webhookUrl, opts.webhookSecret ?? "", opts.retryBaseMs ?? 1_000);
  let apiVersion: string | undefined;
  const env: Env & { setApiVersion(v: string | undefined): void } = {
    store,
    publicUrl: opts.publicUrl ?? "",
    emit: (type, object) => emit(store, type, object, apiVersion ?? fixedApiVersion, deliver),
    setApiVersion: (v) => {
      apiVersion = v;
    },
  };
  const server = createServer(handler(env, opts.secretKey, () => deliverer.kick()));
  await new Promise<void>((ok, fail) => {
    server.once("error", fail);
    server.listen(opts.port ?? 0, host, () => {
      server.off("error", fail);
      ok();
    });
  });
  const { port } = server.address() as AddressInfo;
  const url = `http://${host}:${port}`;
  env.publicUrl = (opts.publicUrl ?? url).replace(/\/$/, "");

  // Periods close on their own `closeDelayMs` after they end; deliveries left from a previous run resume.
  const closeDelay = Math.ceil((opts.closeDelayMs ?? 60_000) / 1000);
  const ticker = setInterval(() => {
    if (closeDue(env, closeDelay).length > 0) {
      store.save();
      deliverer.kick();
    }
  }, 1000);
  ticker.unref();
  deliverer.kick();

  return {
    port,
    url,
    close: async () => {
      clearInterval(ticker);
      await deliverer.stop();
      server.closeAllConnections();
      await new Promise<void>((ok) => server.close(() => ok()));
    },
  };
}

// npm run fake:billing
if (process.argv[1] && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) {
  const billing = await startFakeBilling({
    port: Number(process.env.PARITAS_BILLING_PORT ?? 12111),
    stateFile: process.env.PARITAS_BILLING_STATE_FILE ?? "data/billing-stand-in.json",
    secretKey: process.env.PARITAS_BILLING_SECRET_KEY ?? "local-billing-secret",
    webhookUrl: process.env.PARITAS_BILLING_WEBHOOK_URL || undefined,
    webhookSecret: process.env.PARITAS_BILLING_WEBHOOK_SECRET,
  });
  console.log(`billing stand-in listening on ${billing.url}${process.env.PARITAS_BILLING_WEBHOOK_URL ? `; webhooks go to ${process.env.PARITAS_BILLING_WEBHOOK_URL}` : "; no webhook URL set, events are kept but not sent"}`);
}
