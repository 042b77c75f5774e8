import type Stripe from "stripe";
import type { Db } from "@/db";
import { findOrgById } from "@/db/queries/orgs";
import { redactSecrets } from "@/lib/api/redact";
import { markUsageReported, unreportedUsage } from "@/db/queries/billing";
import { sweepGrace, ensureCustomer } from "./accounts";
import { METER_EVENT, providerCatalogue } from "./catalogue";
import { providerErrorCode } from "./provider";

/**
 * The usage outbox, sent to the provider. Each live usage row with units becomes one meter event whose identifier
 * is the row's id; a row is marked sent only after the provider accepted its event. The provider refuses a second
 * event with an identifier it has (so a row sent just before a crash, and sent again after it, counts once), and
 * that refusal marks the row as well. Rows go in batches of `batch`, `concurrency` at a time, oldest first.
 */

export const usageIdentifier = (rowId: number) => `paritas-usage-${rowId}`;

const DUPLICATE = "meter_event_duplicate_identifier";

export interface ReportPass {
  sent: number;
  duplicates: number;
  failed: number;
}

/** Send one batch of the outbox. Rows whose event failed stay unsent for the next pass. */
export async function reportUsageOnce(db: Db, stripe: Stripe, opts: { batch?: number; concurrency?: number } = {}): Promise<ReportPass> {
  await providerCatalogue(stripe);
  const rows = await unreportedUsage(db, opts.batch ?? 200);
  const pass: ReportPass = { sent: 0, duplicates: 0, failed: 0 };
  const customers = new Map<number, string>();
  for (const orgId of new Set(rows.map((r) => r.org_id))) {
    const org = await findOrgById(db, orgId);
    if (org) customers.set(orgId, (await ensureCustomer(db, stripe, org)).customer_id);
  }
  let next = 0;
  const worker = async () => {
    while (next < rows.length) {
      const row = rows[next++]!;
      const customer = customers.get(row.org_id);
      if (!customer) continue;
      try {
        await stripe.billing.meterEvents.create({
          event_name: METER_EVENT,
          identifier: usageIdentifier(row.id),
          timestamp: Math.floor(Date.parse(row.created_at) / 1000),
          payload: { stripe_customer_id: customer, value: String(row.units) },
        });
        pass.sent++;
      } catch (e) {
        if (providerErrorCode(e) !== DUPLICATE) {
          pass.failed++;
          continue;
        }
        pass.duplicates++;
      }
      await markUsageReported(db, row.id, new Date().toISOString());
    }
  };
  await Promise.all(Array.from({ length: opts.concurrency ?? 8 }, worker));
  return pass;
}

const sleep = (ms: number, signal: AbortSignal) =>
  new Promise<void>((resolve) => {
    const done = () => {
      clearTimeout(t);
      signal.removeEventListener("abort", done);
      resolve();
    };
    const t = setTimeout(done, ms);
    signal.addEventListener("abort", done, { once: true });
  });

/**
 * Report until stopped: a pass whenever there is something to send, a pause of `idleMs` when the outbox is empty,
 * and on failures a backoff that doubles from 1 s to 60 s. Each pass also moves orgs whose grace period ended.
 */
export async function runReporter(db: Db, stripe: Stripe, signal: AbortSignal, opts: { idleMs?: number; batch?: number; log?: (line: string) => void } = {}): Promise<void> {
  let backoff = 0;
  while (!signal.aborted) {
    let busy = false;
    try {
      await sweepGrace(db, stripe);
      const pass = await reportUsageOnce(db, stripe, { batch: opts.batch });
      busy = pass.sent + pass.duplicates > 0;
      if (busy) opts.log?.(`reported ${pass.sent} usage rows${pass.duplicates ? `, ${pass.duplicates} already known to the provider` : ""}${pass.failed ? `, ${pass.failed} to retry` : ""}`);
      backoff = pass.failed > 0 ? Math.min(60_000, Math.max(1_000, backoff * 2)) : 0;
    } catch (e) {
      backoff = Math.min(60_000, Math.max(1_000, backoff * 2));
      opts.log?.(redactSecrets(`reporting failed (${e instanceof Error ? e.message : String(e)}); next try in ${backoff / 1000} s`));
    }
    if (backoff > 0) await sleep(backoff, signal);
    else if (!busy) await sleep(opts.idleMs ?? 2_000, signal);
  }
}
