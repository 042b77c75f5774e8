import { createHmac } from "node:crypto";
import { render } from "./objects";
import { newId, unixNow, type ApiEvent, type Store } from "./state";

/**
 * Events and their delivery. Each event is POSTed as JSON with a `Stripe-Signature` header
 * `t=<unix seconds>,v1=<hex HMAC-SHA256 keyed by the secret over "<t>.<body>">`, the scheme the SDK's
 * `webhooks.constructEvent` checks. The queue is part of the persisted state; due deliveries go out one
 * at a time, oldest event first; a failed attempt (non-2xx or network error) waits `retryBaseMs × 2^attempt`
 * (at most an hour) and is signed afresh, up to 8 attempts. A waiting retry does not hold back newer events.
 */

export const maxAttempts = 8;
const maxBackoffMs = 3_600_000;

/** Used when no request says which API version the caller speaks (events made by the period-close timer). */
export const fixedApiVersion = "local-stand-in";

/** Records an event with a snapshot of the object and queues it for delivery when a webhook URL is set. */
export function emit(store: Store, type: string, object: object, apiVersion: string, deliver: boolean): ApiEvent {
  const event: ApiEvent = {
    id: newId("event"),
    object: "event",
    type,
    created: unixNow(),
    livemode: false,
    api_version: apiVersion,
    data: { object: JSON.parse(JSON.stringify(render(store, object))) },
  };
  store.state.events[event.id] = event;
  if (deliver) queue(store, event.id);
  return event;
}

export function queue(store: Store, eventId: string): void {
  store.state.deliveries.push({ event: eventId, attempts: 0, next_at_ms: Date.now(), done: false });
}

export function sign(body: string, secret: string, t = unixNow()): string {
  return `t=${t},v1=${createHmac("sha256", secret).update(`${t}.${body}`).digest("hex")}`;
}

export class Deliverer {
  private timer: NodeJS.Timeout | undefined;
  private running: Promise<void> | undefined;
  private stopped = false;
  private readonly abort = new AbortController();

  constructor(
    private readonly store: Store,
    private readonly url: string | undefined,
    private readonly secret: string,
    private readonly retryBaseMs: number,
  ) {}

  /** Sends whatever is due, then sleeps until the next retry is due. */
  kick(): void {
    if (!this.url || this.stopped || this.running) return;
    this.running = this.drain().finally(() => {
      this.running = undefined;
      this.schedule();
    });
  }

  /** An attempt in flight is cut short and stays queued, uncounted, so the next start sends it again. */
  async stop(): Promise<void> {
    this.stopped = true;
    clearTimeout(this.timer);
    this.abort.abort();
    await this.running;
  }

  private schedule(): void {
    clearTimeout(this.timer);
    const pending = this.store.state.deliveries.filter((d) => !d.done);
    if (this.stopped || pending.length === 0) return;
    const wait = Math.max(0, Math.min(...pending.map((d) => d.next_at_ms)) - Date.now());
    this.timer = setTimeout(() => this.kick(), wait);
    this.timer.unref();
  }

  private async drain(): Promise<void> {
    const url = this.url as string;
    for (;;) {
      if (this.stopped) return;
      const d = this.store.state.deliveries.find((x) => !x.done && x.next_at_ms <= Date.now());
      if (!d) return;
      const body = JSON.stringify(this.store.state.events[d.event]);
      let status: number | null = null;
      let error: string | null = null;
      try {
        const res = await fetch(url, {
          method: "POST",
          headers: { "content-type": "application/json", "stripe-signature": sign(body, this.secret) },
          body,
          signal: AbortSignal.any([this.abort.signal, AbortSignal.timeout(10_000)]),
        });
        status = res.status;
        await res.arrayBuffer();
      } catch (e) {
        error = e instanceof Error ? e.message : String(e);
      }
      // Cut short by our own stop: not counted, sent again on the next start.
      if (this.stopped && status === null) return;
      d.attempts += 1;
      const ok = status !== null && status >= 200 && status < 300;
      d.done = ok || d.attempts >= maxAttempts;
      d.next_at_ms = Date.now() + Math.min(this.retryBaseMs * 2 ** d.attempts, maxBackoffMs);
      // The log is for looking at recent traffic; the last 1000 attempts are plenty.
      this.store.state.deliveryLog = [...this.store.state.deliveryLog, { event: d.event, attempt: d.attempts, status, error, at: unixNow() }].slice(-1000);
      // Finished deliveries stay only in the log.
      this.store.state.deliveries = this.store.state.deliveries.filter((x) => !x.done);
      this.store.save();
    }
  }
}

/** What a handler works with: the store, a way to raise events, and where the stand-in is reachable. */
export interface Env {
  store: Store;
  emit(type: string, object: object): void;
  publicUrl: string;
}
