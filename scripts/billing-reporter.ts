/**
 * The usage reporter: its own process beside the web server and the job runner (the demo starts it). It sends
 * every live usage row to the billing provider as a meter event, marking a row only after the provider accepted
 * it, and moves organisations whose grace period after a failed payment has ended to the free plan.
 *
 *   npm run billing:report   # PARITAS_DB_FILE as for the app, the PARITAS_BILLING_* settings (lib/billing/config.ts),
 *                            # PARITAS_REPORTER_IDLE_MS (default 2000): the pause when there is nothing to send
 */
import { closeDb, getDb } from "@/db";
import { billingClient } from "@/lib/billing/provider";
import { runReporter } from "@/lib/billing/reporter";

const stripe = billingClient();
if (!stripe) {
  console.error("the billing provider is not configured (PARITAS_BILLING_SECRET_KEY); nothing to report to");
  process.exit(1);
}
const stop = new AbortController();
for (const sig of ["SIGINT", "SIGTERM"] as const) process.on(sig, () => stop.abort());
const db = await getDb();
console.log(`usage reporter ${process.pid}: sending live usage to the billing provider`);
await runReporter(db, stripe, stop.signal, { idleMs: Number(process.env.PARITAS_REPORTER_IDLE_MS ?? 2_000), log: (l) => console.log(l) });
await closeDb();
console.log(`usage reporter ${process.pid}: stopped`);
