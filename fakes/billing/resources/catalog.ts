import type { ParsedQs } from "qs";
import { bool, get, int, invalid, list, metadata, newestFirst, obj, objects, str, strings, type Ctx, type Route } from "../objects";
import { newId, unixNow, type Meter, type Price, type Product, type Tier } from "../state";
import { meterTotal } from "../invoicing";

function createProduct({ env, q }: Ctx) {
  const s = env.store.state;
  const id = str(q, "id") ?? newId("product");
  if (!/^[A-Za-z0-9._-]+$/.test(id)) throw invalid("parameter_invalid_string", "A product id may hold letters, digits, '.', '_' and '-' only.", "id");
  if (s.products[id]) throw invalid("resource_already_exists", `Product '${id}' already exists.`, "id");
  const p: Product = {
    id,
    object: "product",
    created: unixNow(),
    livemode: false,
    metadata: metadata(q),
    name: str(q, "name", true),
    description: str(q, "description") ?? null,
    active: bool(q, "active") ?? true,
  };
  s.products[id] = p;
  return p;
}

function nonNegative(q: ParsedQs, name: string, param: string): number | undefined {
  const v = int(q, name, param);
  if (v !== undefined && v < 0) throw invalid("parameter_invalid_integer", `${param} must not be negative.`, param);
  return v;
}

/** Graduated tiers: each `up_to` an integer above the last, the last one `inf`. */
function readTiers(q: ParsedQs): Tier[] {
  const tiers = objects(q, "tiers").map((t, i): Tier => {
    const upTo = str(t, "up_to", true);
    const unit = nonNegative(t, "unit_amount", `tiers[${i}][unit_amount]`);
    const flat = nonNegative(t, "flat_amount", `tiers[${i}][flat_amount]`);
    if (unit === undefined && flat === undefined) throw invalid("parameter_missing", `tiers[${i}] needs unit_amount or flat_amount.`, `tiers[${i}][unit_amount]`);
    return { up_to: upTo === "inf" ? null : (nonNegative(t, "up_to", `tiers[${i}][up_to]`) ?? null), unit_amount: unit ?? 0, flat_amount: flat ?? null };
  });
  if (tiers.length < 2) throw invalid("parameter_missing", "A tiered price needs at least two tiers.", "tiers");
  tiers.forEach((t, i) => {
    const last = i === tiers.length - 1;
    const prev = i === 0 ? 0 : (tiers[i - 1]!.up_to ?? Infinity);
    if (last !== (t.up_to === null) || (t.up_to !== null && t.up_to <= prev)) {
      throw invalid("parameter_invalid_integer", "Tier limits must increase and only the last may be 'inf'.", `tiers[${i}][up_to]`);
    }
  });
  return tiers;
}

function createPrice({ env, q }: Ctx) {
  const s = env.store.state;
  const product = get(env.store, "products", str(q, "product", true), "product");
  const recurring = obj(q, "recurring");
  if (str(recurring, "interval") !== "month") throw invalid("parameter_invalid_string", "Only monthly recurring prices are supported: recurring[interval]=month.", "recurring[interval]");
  const usage = str(recurring, "usage_type") ?? "licensed";
  if (usage !== "licensed" && usage !== "metered") throw invalid("parameter_invalid_string", "recurring[usage_type] must be licensed or metered.", "recurring[usage_type]");
  const meterId = str(recurring, "meter");
  if (usage === "metered" && meterId === undefined) throw invalid("parameter_missing", "A metered price needs recurring[meter].", "recurring[meter]");
  if (meterId !== undefined) get(env.store, "meters", meterId, "recurring[meter]");
  const tiered = str(q, "billing_scheme") === "tiered";
  if (tiered && str(q, "tiers_mode") !== "graduated") throw invalid("parameter_invalid_string", "Only tiers_mode=graduated is supported.", "tiers_mode");
  const unitAmount = tiered ? undefined : nonNegative(q, "unit_amount", "unit_amount");
  if (!tiered && unitAmount === undefined) throw invalid("parameter_missing", "Missing required param: unit_amount.", "unit_amount");
  const lookupKey = str(q, "lookup_key") ?? null;
  if (lookupKey !== null && Object.values(s.prices).some((p) => p.lookup_key === lookupKey)) {
    throw invalid("lookup_key_in_use", `A price with lookup_key '${lookupKey}' already exists.`, "lookup_key");
  }
  const p: Price = {
    id: newId("price"),
    object: "price",
    created: unixNow(),
    livemode: false,
    metadata: metadata(q),
    product: product.id,
    currency: str(q, "currency", true).toLowerCase(),
    lookup_key: lookupKey,
    nickname: str(q, "nickname") ?? null,
    active: true,
    type: "recurring",
    billing_scheme: tiered ? "tiered" : "per_unit",
    tiers_mode: tiered ? "graduated" : null,
    tiers: tiered ? readTiers(q) : null,
    unit_amount: unitAmount ?? null,
    recurring: { interval: "month", interval_count: 1, usage_type: usage, meter: meterId ?? null },
  };
  s.prices[p.id] = p;
  return p;
}

function listPrices({ env, q }: Ctx) {
  const keys = strings(q, "lookup_keys");
  const product = str(q, "product");
  const active = bool(q, "active");
  const all = newestFirst(env.store.state.prices).filter(
    (p) => (keys.length === 0 || (p.lookup_key !== null && keys.includes(p.lookup_key))) && (product === undefined || p.product === product) && (active === undefined || p.active === active),
  );
  return list(all, q, "/v1/prices");
}

function createMeter({ env, q }: Ctx) {
  const s = env.store.state;
  const eventName = str(q, "event_name", true);
  if (Object.values(s.meters).some((m) => m.event_name === eventName)) throw invalid("resource_already_exists", `A meter for event '${eventName}' already exists.`, "event_name");
  const formula = str(obj(q, "default_aggregation"), "formula", true);
  if (formula !== "sum") throw invalid("parameter_invalid_string", "Only default_aggregation[formula]=sum is supported.", "default_aggregation[formula]");
  const mapping = obj(q, "customer_mapping");
  if ((str(mapping, "type") ?? "by_id") !== "by_id") throw invalid("parameter_invalid_string", "Only customer_mapping[type]=by_id is supported.", "customer_mapping[type]");
  const now = unixNow();
  const m: Meter = {
    id: newId("meter"),
    object: "billing.meter",
    created: now,
    updated: now,
    livemode: false,
    metadata: {},
    display_name: str(q, "display_name", true),
    event_name: eventName,
    status: "active",
    default_aggregation: { formula: "sum" },
    customer_mapping: { type: "by_id", event_payload_key: str(mapping, "event_payload_key") ?? "stripe_customer_id" },
    value_settings: { event_payload_key: str(obj(q, "value_settings"), "event_payload_key") ?? "value" },
  };
  s.meters[m.id] = m;
  return m;
}

/** Accepts a usage event once per identifier, for ever; a repeat is refused and not counted again. */
function createMeterEvent({ env, q }: Ctx) {
  const s = env.store.state;
  const eventName = str(q, "event_name", true);
  const meter = Object.values(s.meters).find((m) => m.event_name === eventName);
  if (!meter) throw invalid("resource_missing", `No meter for event name '${eventName}'.`, "event_name");
  const payload = obj(q, "payload");
  const customerKey = meter.customer_mapping.event_payload_key;
  const customer = get(env.store, "customers", str(payload, customerKey, true), `payload[${customerKey}]`);
  const valueKey = meter.value_settings.event_payload_key;
  const raw = str(payload, valueKey, true);
  if (!/^\d+$/.test(raw) || !Number.isSafeInteger(Number(raw))) throw invalid("parameter_invalid_integer", `payload[${valueKey}] must hold a non-negative integer.`, `payload[${valueKey}]`);
  const identifier = str(q, "identifier") ?? newId("usage");
  if (s.meterEvents[identifier]) {
    throw invalid("meter_event_duplicate_identifier", `An event with identifier '${identifier}' was already accepted; it is not counted again.`, "identifier");
  }
  const now = unixNow();
  const timestamp = int(q, "timestamp") ?? now;
  env.store.addMeterEvent({ identifier, event_name: eventName, meter: meter.id, customer: customer.id, value: Number(raw), timestamp, created: now });
  return { object: "billing.meter_event", created: now, event_name: eventName, identifier, livemode: false, payload, timestamp };
}

const day = 86_400;

/** One summary for the whole window, or one per UTC day with value_grouping_window=day; newest first. */
function eventSummaries({ env, q, params }: Ctx) {
  const meter = get(env.store, "meters", params.id!);
  const customer = str(q, "customer", true);
  const start = int(q, "start_time") ?? 0;
  const end = int(q, "end_time") ?? 0;
  if (end <= start) throw invalid("parameter_invalid_integer", "end_time must be after start_time.", "end_time");
  const grouping = str(q, "value_grouping_window");
  if (grouping !== undefined && grouping !== "day") throw invalid("parameter_invalid_string", "value_grouping_window may only be day.", "value_grouping_window");
  const windows: [number, number][] = [];
  if (grouping === "day") for (let t = start; t < end; t = Math.min(end, (Math.floor(t / day) + 1) * day)) windows.push([t, Math.min(end, (Math.floor(t / day) + 1) * day)]);
  else windows.push([start, end]);
  const all = windows.reverse().map(([a, b]) => ({
    id: `summary.${a}`,
    object: "billing.meter_event_summary",
    aggregated_value: meterTotal(env.store, meter.id, customer, a, b),
    start_time: a,
    end_time: b,
    meter: meter.id,
    livemode: false,
  }));
  return list(all, q, `/v1/billing/meters/${meter.id}/event_summaries`);
}

export const catalogRoutes: Route[] = [
  ["POST", "/v1/products", createProduct],
  ["GET", "/v1/products", ({ env, q }) => list(newestFirst(env.store.state.products), q, "/v1/products")],
  ["GET", "/v1/products/:id", ({ env, params }) => get(env.store, "products", params.id!)],
  ["POST", "/v1/prices", createPrice],
  ["GET", "/v1/prices", listPrices],
  ["GET", "/v1/prices/:id", ({ env, params }) => get(env.store, "prices", params.id!)],
  ["POST", "/v1/billing/meters", createMeter],
  ["GET", "/v1/billing/meters", ({ env, q }) => list(newestFirst(env.store.state.meters), q, "/v1/billing/meters")],
  ["GET", "/v1/billing/meters/:id", ({ env, params }) => get(env.store, "meters", params.id!)],
  ["GET", "/v1/billing/meters/:id/event_summaries", eventSummaries],
  ["POST", "/v1/billing/meter_events", createMeterEvent],
];
