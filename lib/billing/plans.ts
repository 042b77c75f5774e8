/**
 * The plan catalogue: the one list of plans that quotas, job budgets, the billing provider's
 * products and prices, the console and the API reference all read. Money is in integer minor
 * units (US cents) everywhere; no amount is ever a float.
 */

export const PLAN_IDS = ["lantern", "beacon", "lighthouse"] as const;
export type PlanId = (typeof PLAN_IDS)[number];

export const CURRENCY = "usd";

export interface Plan {
  id: PlanId;
  name: string;
  summary: string;
  /** Monthly fee in cents; 0 for the free plan. */
  monthlyFee: number;
  /** Compute units of live keys included each calendar month (UTC). */
  includedUnits: number;
  /** Cents per live compute unit beyond the included ones; null: the plan stops at its allowance instead. */
  overagePerUnit: number | null;
  /** Compute units test keys may use each month; test keys never draw on paid units. */
  testUnits: number;
  /** Simulation budget: most information bits one job may ask for, summed over its points. */
  maxBitsPerJob: number;
  /** Simulation budget: jobs queued or running at once per organisation. */
  maxActiveJobs: number;
}

export const PLANS: Record<PlanId, Plan> = {
  lantern: {
    id: "lantern",
    name: "Lantern",
    summary: "Free: enough for trying every endpoint and a few small simulations. Stops at its allowance.",
    monthlyFee: 0,
    includedUnits: 5_000,
    overagePerUnit: null,
    testUnits: 2_000,
    maxBitsPerJob: 2 ** 36,
    maxActiveJobs: 1,
  },
  beacon: {
    id: "beacon",
    name: "Beacon",
    summary: "For a team that checks its claims from CI on every build.",
    monthlyFee: 3_900,
    includedUnits: 40_000,
    overagePerUnit: 2,
    testUnits: 10_000,
    maxBitsPerJob: 2 ** 40,
    maxActiveJobs: 4,
  },
  lighthouse: {
    id: "lighthouse",
    name: "Lighthouse",
    summary: "For long simulation campaigns and many pipelines.",
    monthlyFee: 24_900,
    includedUnits: 400_000,
    overagePerUnit: 1,
    testUnits: 50_000,
    maxBitsPerJob: 2 ** 44,
    maxActiveJobs: 8,
  },
};

export const FREE_PLAN: PlanId = "lantern";

/** How long a failed payment leaves a paid plan in place before the organisation moves to the free plan. */
export const GRACE_DAYS = 7;

/** Share of the monthly allowance at which owners and billing admins are told by e-mail. */
export const NOTICE_THRESHOLDS = [0.8, 1] as const;

export const isPlanId = (s: string): s is PlanId => (PLAN_IDS as readonly string[]).includes(s);

/** The plan with this id; an id no longer in the catalogue reads as the free plan. */
export const planOf = (id: string): Plan => PLANS[isPlanId(id) ? id : FREE_PLAN];

export const isPaid = (p: Plan) => p.monthlyFee > 0;

/** The lookup keys the provider's prices carry, so the catalogue can find them again (lib/billing/catalogue.ts). */
export const priceKeys = (id: PlanId) => ({ fee: `paritas.${id}.fee`, units: `paritas.${id}.units` });

/** The allowance a key's mode draws on. */
export const allowanceOf = (p: Plan, mode: "live" | "test") => (mode === "live" ? p.includedUnits : p.testUnits);

/** Whether calls stop at the allowance: always for test keys, and for live keys on a plan without overage. */
export const stopsAtAllowance = (p: Plan, mode: "live" | "test") => mode === "test" || p.overagePerUnit === null;

/** A calendar month in UTC: the quota period and the billing period. */
export interface Period {
  start: Date;
  end: Date;
}

/** The calendar month (UTC) containing `at`. */
export function periodOf(at: Date): Period {
  const start = new Date(Date.UTC(at.getUTCFullYear(), at.getUTCMonth(), 1));
  const end = new Date(Date.UTC(at.getUTCFullYear(), at.getUTCMonth() + 1, 1));
  return { start, end };
}

/** What a month's live units cost on a plan, in cents: the fee, plus the units beyond the included ones at the overage price. */
export function chargeFor(p: Plan, units: number): { fee: number; includedUnits: number; overageUnits: number; overage: number; total: number } {
  const overageUnits = Math.max(0, units - p.includedUnits);
  const overage = overageUnits * (p.overagePerUnit ?? 0);
  return { fee: p.monthlyFee, includedUnits: Math.min(units, p.includedUnits), overageUnits, overage, total: p.monthlyFee + overage };
}

/**
 * The month's total if usage goes on at the rate so far: used × (period length / time elapsed),
 * rounded up to whole units. Early in a period (under an hour) the projection is just what was used.
 */
export function projectUnits(used: number, period: Period, now: Date): number {
  const elapsed = now.getTime() - period.start.getTime();
  const length = period.end.getTime() - period.start.getTime();
  if (elapsed < 3_600_000) return used;
  if (elapsed >= length) return used;
  return Math.ceil((used * length) / elapsed);
}

/** "$39.00" from 3900 cents: integer arithmetic, no float rounding. */
export function formatMoney(cents: number): string {
  const sign = cents < 0 ? "−" : "";
  const abs = Math.abs(cents);
  const whole = Math.floor(abs / 100).toLocaleString("en-US");
  return `${sign}$${whole}.${String(abs % 100).padStart(2, "0")}`;
}
