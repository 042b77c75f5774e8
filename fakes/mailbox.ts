import { readdir, readFile } from "node:fs/promises";
import { join, resolve } from "node:path";

/** One message as the fake SMTP server stores it: a JSON file per message. */
export interface StoredMessage {
  id: string;
  to: string;
  from: string;
  subject: string;
  text: string;
  html: string | null;
  receivedAt: string;
}

/** Where the fake SMTP server writes messages: PARITAS_MAILBOX_DIR, default ./data/mailbox. */
export const mailboxDir = () => resolve(/*turbopackIgnore: true*/ process.env.PARITAS_MAILBOX_DIR ?? "./data/mailbox");

/** The mailbox is a development tool: hidden in production unless PARITAS_DEV_MAILBOX=1 (the demo sets it). */
export const devMailboxEnabled = () => process.env.NODE_ENV !== "production" || process.env.PARITAS_DEV_MAILBOX === "1";

/** The messages in `dir`, newest first (at most `limit`); an absent directory is an empty mailbox. */
export async function readMailbox(dir: string = mailboxDir(), limit = 100): Promise<StoredMessage[]> {
  let names: string[];
  try {
    names = (await readdir(dir)).filter((n) => n.endsWith(".json"));
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === "ENOENT") return [];
    throw e;
  }
  // File names start with the receipt time, so sorting them sorts by time.
  const newest = names.sort().reverse().slice(0, limit);
  return Promise.all(newest.map(async (n) => JSON.parse(await readFile(join(dir, n), "utf8")) as StoredMessage));
}

/** Wait for the newest message to `address` received after `since` (tests). */
export async function waitForMessage(dir: string, address: string, opts: { since?: Date; timeoutMs?: number } = {}): Promise<StoredMessage> {
  const since = (opts.since ?? new Date(0)).toISOString();
  const deadline = Date.now() + (opts.timeoutMs ?? 5000);
  const wanted = address.toLowerCase();
  for (;;) {
    const hit = (await readMailbox(dir)).find((m) => m.receivedAt >= since && m.to.toLowerCase().split(/,\s*/).includes(wanted));
    if (hit) return hit;
    if (Date.now() > deadline) throw new Error(`no message to ${address} arrived in ${dir}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}
