import { createServer, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import Stripe from "stripe";
import { startFakeBilling, type FakeBilling, type FakeBillingOptions } from "@/fakes/billing";

/** A stand-in on a free port and the provider's SDK pointed at it, configured as Paritas configures it. */
export async function bootBilling(opts: Partial<FakeBillingOptions> & { stateFile: string; secretKey: string }): Promise<{ billing: FakeBilling; stripe: Stripe }> {
  // Periods close only when a test asks (the timer would otherwise close backdated months on its own).
  const billing = await startFakeBilling({ port: 0, closeDelayMs: 400 * 86_400_000, ...opts });
  const stripe = new Stripe(opts.secretKey, { host: "127.0.0.1", port: billing.port, protocol: "http", maxNetworkRetries: 2 });
  return { billing, stripe };
}

export interface Received {
  body: string;
  signature: string;
  status: number;
}

/** A webhook receiver that answers each request with the next status from `answers` (then 200; 0 = never answer) and keeps every request. */
export async function startReceiver(answers: number[] = []): Promise<{ url: string; received: Received[]; close(): Promise<void> }> {
  const received: Received[] = [];
  const queue = [...answers];
  const server: Server = createServer((req, res) => {
    const chunks: Buffer[] = [];
    req.on("data", (c: Buffer) => chunks.push(c));
    req.on("end", () => {
      const status = queue.shift() ?? 200;
      received.push({ body: Buffer.concat(chunks).toString("utf8"), signature: String(req.headers["stripe-signature"] ?? ""), status });
      if (status !== 0) res.writeHead(status).end();
    });
  });
  await new Promise<void>((ok) => server.listen(0, "127.0.0.1", ok));
  const { port } = server.address() as AddressInfo;
  return {
    url: `http://127.0.0.1:${port}/hook`,
    received,
    close: () =>
      new Promise<void>((ok) => {
        server.closeAllConnections();
        server.close(() => ok());
      }),
  };
}

/** Polls until `check` returns true (deliveries are asynchronous); fails after `ms`. */
export async function until(check: () => boolean, ms = 5000): Promise<void> {
  const end = Date.now() + ms;
  while (!check()) {
    if (Date.now() > end) throw new Error("condition not met in time");
    await new Promise((r) => setTimeout(r, 20));
  }
}
