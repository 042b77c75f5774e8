import { randomBytes } from "node:crypto";
import { appendFileSync, existsSync, mkdirSync, readFileSync, renameSync, writeFileSync } from "node:fs";
import { dirname } from "node:path";

/**
 * The stand-in's whole state: every object it has made, the meter events it accepted, the webhook
 * queue and the idempotency records. The objects live in one JSON file, rewritten after each change;
 * the two collections that grow with every call (meter events and idempotency records) are appended
 * to journals beside it instead, one JSON line each, so a change costs the same however many came
 * before. A restart loses nothing. Fields whose names start with "_" are ours and never leave the stand-in.
 */

export type Meta = Record<string, string>;

interface Base {
  id: string;
  created: number;
  livemode: false;
  metadata: Meta;
}

export interface Customer extends Base {
  object: "customer";
  name: string | null;
  email: string | null;
  invoice_settings: { default_payment_method: string | null };
}

export interface Product extends Base {
  object: "product";
  name: string;
  description: string | null;
  active: boolean;
}

export interface Tier {
  up_to: number | null;
  unit_amount: number;
  flat_amount: number | null;
}

export interface Price extends Base {
  object: "price";
  product: string;
  currency: string;
  lookup_key: string | null;
  nickname: string | null;
  active: boolean;
  type: "recurring";
  billing_scheme: "per_unit" | "tiered";
  tiers_mode: "graduated" | null;
  tiers: Tier[] | null;
  unit_amount: number | null;
  recurring: { interval: "month"; interval_count: 1; usage_type: "licensed" | "metered"; meter: string | null };
}

export interface Meter extends Base {
  object: "billing.meter";
  display_name: string;
  event_name: string;
  status: "active";
  default_aggregation: { formula: "sum" };
  customer_mapping: { type: "by_id"; event_payload_key: string };
  value_settings: { event_payload_key: string };
  updated: number;
}

export interface MeterEvent {
  identifier: string;
  event_name: string;
  meter: string;
  customer: string;
  value: number;
  timestamp: number;
  created: number;
}

/** How a test card behaves: "ok" always pays, "declined" is refused at once, "declines_charges" attaches but every charge fails. */
export type CardBehaviour = "ok" | "declined" | "declines_charges";

export interface PaymentMethod extends Base {
  object: "payment_method";
  type: "card";
  card: { brand: "visa" | "mastercard"; last4: string; exp_month: number; exp_year: number };
  customer: string | null;
  _behaviour: CardBehaviour;
}

export interface LineItemInput {
  price: string;
  quantity: number | null;
}

export interface Session extends Base {
  object: "checkout.session";
  url: string;
  status: "open" | "complete" | "expired";
  payment_status: "unpaid" | "paid";
  customer: string;
  mode: "subscription";
  client_reference_id: string | null;
  success_url: string;
  cancel_url: string | null;
  subscription: string | null;
  expires_at: number;
  _line_items: LineItemInput[];
  _subscription_metadata: Meta;
}

export interface SubscriptionItem {
  id: string;
  object: "subscription_item";
  created: number;
  metadata: Meta;
  price: string;
  quantity: number | null;
}

export type SubscriptionStatus = "active" | "past_due" | "canceled" | "unpaid";

export interface Subscription extends Base {
  object: "subscription";
  customer: string;
  status: SubscriptionStatus;
  items: SubscriptionItem[];
  current_period_start: number;
  current_period_end: number;
  default_payment_method: string | null;
  cancel_at_period_end: boolean;
  start_date: number;
  latest_invoice: string | null;
  canceled_at: number | null;
  ended_at: number | null;
  currency: string;
}

export interface InvoiceLine {
  id: string;
  object: "line_item";
  amount: number;
  currency: string;
  description: string;
  quantity: number;
  period: { start: number; end: number };
  price: Price;
  pricing: { type: "price_details"; price_details: { price: string; product: string } };
  metadata: Meta;
}

export interface Invoice extends Base {
  object: "invoice";
  number: string;
  customer: string;
  subscription: string;
  status: "draft" | "open" | "paid";
  currency: string;
  period_start: number;
  period_end: number;
  subtotal: number;
  total: number;
  amount_due: number;
  amount_paid: number;
  amount_remaining: number;
  attempt_count: number;
  status_transitions: { finalized_at: number | null; paid_at: number | null };
  _lines: InvoiceLine[];
}

export interface ApiEvent {
  id: string;
  object: "event";
  type: string;
  created: number;
  livemode: false;
  api_version: string;
  data: { object: unknown };
}

export interface Delivery {
  event: string;
  attempts: number;
  next_at_ms: number;
  done: boolean;
}

export interface DeliveryAttempt {
  event: string;
  attempt: number;
  status: number | null;
  error: string | null;
  at: number;
}

export interface IdempotencyRecord {
  method: string;
  path: string;
  body: string;
  status: number;
  payload: unknown;
  at_ms: number;
}

export interface State {
  invoiceCount: number;
  customers: Record<string, Customer>;
  products: Record<string, Product>;
  prices: Record<string, Price>;
  meters: Record<string, Meter>;
  /** Keyed by identifier: an identifier once accepted stays taken for good. */
  meterEvents: Record<string, MeterEvent>;
  paymentMethods: Record<string, PaymentMethod>;
  sessions: Record<string, Session>;
  subscriptions: Record<string, Subscription>;
  invoices: Record<string, Invoice>;
  events: Record<string, ApiEvent>;
  deliveries: Delivery[];
  deliveryLog: DeliveryAttempt[];
  idempotency: Record<string, IdempotencyRecord>;
}

const emptyState = (): State => ({
  invoiceCount: 0,
  customers: {},
  products: {},
  prices: {},
  meters: {},
  meterEvents: {},
  paymentMethods: {},
  sessions: {},
  subscriptions: {},
  invoices: {},
  events: {},
  deliveries: [],
  deliveryLog: [],
  idempotency: {},
});

/** The id prefix of each kind of object, and the collection that holds it. */
export const kinds = {
  customer: "customers",
  product: "products",
  price: "prices",
  meter: "meters",
  paymentmethod: "paymentMethods",
  session: "sessions",
  subscription: "subscriptions",
  invoice: "invoices",
  event: "events",
} as const satisfies Record<string, keyof State>;

const base32 = "abcdefghijklmnopqrstuvwxyz234567";

/** `<kind>.<12 lowercase base32>`: 60 random bits, letters, digits and dots only, safe in URL paths. */
export function newId(kind: string): string {
  const bytes = randomBytes(12);
  let out = "";
  for (const b of bytes) out += base32[b & 31];
  return `${kind}.${out}`;
}

const readJournal = <T>(file: string): T[] =>
  existsSync(file)
    ? readFileSync(file, "utf8")
        .split("\n")
        .filter((l) => l.trim())
        .flatMap((l) => {
          try {
            return [JSON.parse(l) as T];
          } catch {
            return []; // a line cut short by a crash mid-append
          }
        })
    : [];

export class Store {
  readonly state: State;
  private readonly meterJournal: string;
  private readonly idempotencyJournal: string;

  constructor(readonly file: string) {
    this.state = existsSync(file) ? { ...emptyState(), ...(JSON.parse(readFileSync(file, "utf8")) as Partial<State>) } : emptyState();
    this.meterJournal = `${file}.meter-events.jsonl`;
    this.idempotencyJournal = `${file}.idempotency.jsonl`;
    for (const e of readJournal<MeterEvent>(this.meterJournal)) this.state.meterEvents[e.identifier] = e;
    for (const r of readJournal<{ key: string; record: IdempotencyRecord }>(this.idempotencyJournal)) this.state.idempotency[r.key] = r.record;
  }

  /** Accept a meter event: appended to its journal before it counts. */
  addMeterEvent(e: MeterEvent): void {
    mkdirSync(dirname(this.file), { recursive: true });
    appendFileSync(this.meterJournal, JSON.stringify(e) + "\n");
    this.state.meterEvents[e.identifier] = e;
  }

  /** Remember a request's answer under its Idempotency-Key: appended to its journal. */
  remember(key: string, record: IdempotencyRecord): void {
    mkdirSync(dirname(this.file), { recursive: true });
    appendFileSync(this.idempotencyJournal, JSON.stringify({ key, record }) + "\n");
    this.state.idempotency[key] = record;
  }

  /** The objects, written aside and renamed, so a crash mid-write leaves the previous file whole (the journals hold the rest). */
  save(): void {
    mkdirSync(dirname(this.file), { recursive: true });
    const tmp = `${this.file}.${process.pid}.tmp`;
    writeFileSync(tmp, JSON.stringify({ ...this.state, meterEvents: {}, idempotency: {} }));
    renameSync(tmp, this.file);
  }
}

/** Unix seconds. */
export const unixNow = () => Math.floor(Date.now() / 1000);

/** Start of the calendar month (UTC) that holds t, in unix seconds. */
export function monthStart(t: number): number {
  const d = new Date(t * 1000);
  return Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), 1) / 1000;
}

/** Start of the calendar month (UTC) after the one that holds t. */
export function nextMonthStart(t: number): number {
  const d = new Date(t * 1000);
  return Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + 1, 1) / 1000;
}
