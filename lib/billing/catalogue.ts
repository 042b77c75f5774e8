import type Stripe from "stripe";
import { CURRENCY, PLAN_IDS, PLANS, priceKeys, isPaid, type PlanId } from "./plans";

/**
 * The plan catalogue at the billing provider: one meter for compute units, and for each paid plan a product with a
 * monthly fee (licensed) and a units price (metered, graduated: the included units at 0, then the overage price).
 * Made once and found again by lookup keys, so every process can call it at start.
 */

export const METER_EVENT = "paritas_compute_units";

export interface ProviderCatalogue {
  meterId: string;
  prices: Partial<Record<PlanId, { fee: string; units: string }>>;
}

const memo = new WeakMap<Stripe, Promise<ProviderCatalogue>>();

async function build(stripe: Stripe): Promise<ProviderCatalogue> {
  const meters = await stripe.billing.meters.list({ limit: 100 }).autoPagingToArray({ limit: 1000 });
  const meter =
    meters.find((m) => m.event_name === METER_EVENT) ??
    (await stripe.billing.meters.create({
      display_name: "Paritas compute units",
      event_name: METER_EVENT,
      default_aggregation: { formula: "sum" },
      customer_mapping: { type: "by_id", event_payload_key: "stripe_customer_id" },
      value_settings: { event_payload_key: "value" },
    }, { idempotencyKey: "paritas-meter-compute-units" }));

  const paid = PLAN_IDS.filter((id) => isPaid(PLANS[id]));
  const keys = paid.flatMap((id) => Object.values(priceKeys(id)));
  const existing = await stripe.prices.list({ lookup_keys: keys, limit: 100 });
  const byKey = new Map(existing.data.map((p) => [p.lookup_key, p.id]));
  const prices: ProviderCatalogue["prices"] = {};
  for (const id of paid) {
    const plan = PLANS[id];
    const k = priceKeys(id);
    let fee = byKey.get(k.fee);
    let units = byKey.get(k.units);
    if (!fee || !units) {
      const product = await stripe.products.create({ name: `Paritas ${plan.name}`, description: plan.summary, metadata: { plan: id } }, { idempotencyKey: `paritas-product-${id}` });
      fee ??= (
        await stripe.prices.create(
          { product: product.id, currency: CURRENCY, unit_amount: plan.monthlyFee, recurring: { interval: "month", usage_type: "licensed" }, lookup_key: k.fee, nickname: `${plan.name} monthly fee`, metadata: { plan: id } },
          { idempotencyKey: `paritas-price-${k.fee}` },
        )
      ).id;
      units ??= (
        await stripe.prices.create(
          {
            product: product.id,
            currency: CURRENCY,
            billing_scheme: "tiered",
            tiers_mode: "graduated",
            tiers: [
              { up_to: plan.includedUnits, unit_amount: 0 },
              { up_to: "inf", unit_amount: plan.overagePerUnit ?? 0 },
            ],
            recurring: { interval: "month", usage_type: "metered", meter: meter.id },
            lookup_key: k.units,
            nickname: `${plan.name} compute units`,
            metadata: { plan: id },
          },
          { idempotencyKey: `paritas-price-${k.units}` },
        )
      ).id;
    }
    prices[id] = { fee, units };
  }
  return { meterId: meter.id, prices };
}

/** The provider's meter and prices for the catalogue, made on first use (once per client and process). */
export function providerCatalogue(stripe: Stripe): Promise<ProviderCatalogue> {
  let p = memo.get(stripe);
  if (!p) {
    p = build(stripe);
    memo.set(stripe, p);
    p.catch(() => memo.delete(stripe));
  }
  return p;
}
