import type { Db } from "@/db";
import { adjustUnits, monthKey, reserveUnits, unitsUsed } from "@/db/queries/quota";
import type { KeyMode } from "@/db/schema";
import { announceAllowance } from "@/lib/billing/notices";
import { allowanceOf, NOTICE_THRESHOLDS, periodOf, planOf, stopsAtAllowance, type Plan } from "@/lib/billing/plans";
import { ApiError, type QuotaInfo } from "./errors";

/**
 * Monthly quotas by plan (lib/billing/plans.ts). Units are reserved from the month's counter before any work
 * starts, in one conditional update that refuses when a plan that stops at its allowance would pass it; the
 * charge is settled against the reservation in the transaction that writes the usage row (lib/api/metering.ts),
 * so the counter always equals the ledger plus what running work holds. Live and test keys have separate allowances.
 */

/** Who pays for a call: the org, on its plan, with a live or test key. */
export interface Payer {
  orgId: number;
  plan: string;
  mode: KeyMode;
}

/** The allowance a payer draws on this month and how much of it is used. */
export interface QuotaState {
  plan: Plan;
  mode: KeyMode;
  month: string;
  allowance: number;
  used: number;
  stops: boolean;
  resetsAt: string;
}

export interface Reservation {
  payer: Payer;
  month: string;
  units: number;
}

function stateOf(payer: Payer, at: Date, used: number): QuotaState {
  const plan = planOf(payer.plan);
  return { plan, mode: payer.mode, month: monthKey(at), allowance: allowanceOf(plan, payer.mode), used, stops: stopsAtAllowance(plan, payer.mode), resetsAt: periodOf(at).end.toISOString() };
}

const fmt = (n: number) => n.toLocaleString("en-US");

function exhausted(s: QuotaState, requested: number): ApiError {
  const left = Math.max(0, s.allowance - s.used);
  const whose = s.mode === "test" ? `Test keys have ${fmt(s.allowance)} compute units a month on the ${s.plan.name} plan` : `The ${s.plan.name} plan includes ${fmt(s.allowance)} compute units a month for live keys`;
  const next =
    s.mode === "test"
      ? "Test keys never draw on paid units: use a live key, or wait for the reset."
      : "Move to a paid plan on the console's Billing page (owners and billing admins), or wait for the reset.";
  return new ApiError("quota-exhausted", `This call needs ${fmt(requested)} compute unit${requested === 1 ? "" : "s"}. ${whose}; ${fmt(left)} ${left === 1 ? "is" : "are"} left until ${s.resetsAt}. ${next}`, {
    quota: { plan: s.plan.id, mode: s.mode, allowance: s.allowance, used: s.used, requested, resetsAt: s.resetsAt },
  });
}

/** Reserve `units` for a call about to run, or throw the quota-exhausted problem (402) without changing anything. */
export async function reserveQuota(db: Db, payer: Payer, units: number, at = new Date()): Promise<Reservation> {
  const month = monthKey(at);
  if (units === 0) return { payer, month, units };
  const probe = stateOf(payer, at, 0);
  const used = await reserveUnits(db, { orgId: payer.orgId, mode: payer.mode, month, units, cap: probe.stops ? probe.allowance : null });
  if (used === null) throw exhausted(stateOf(payer, at, await unitsUsed(db, payer.orgId, payer.mode, month)), units);
  return { payer, month, units };
}

/**
 * Settle a reservation with the units actually charged (0 when the call was refused or failed): the difference goes
 * back to (or is taken from) the month it was reserved in, and the charge counts in the month it is recorded in.
 * Call it inside the transaction that writes the usage row, before writing it (a counter created here starts from
 * the ledger, which must not hold the row yet). Returns the state after.
 */
export async function settleQuota(tx: Db, r: Reservation, charged: number, at = new Date()): Promise<QuotaState> {
  const month = monthKey(at);
  let used: number;
  if (month === r.month) used = await adjustUnits(tx, { orgId: r.payer.orgId, mode: r.payer.mode, month, delta: charged - r.units });
  else {
    if (r.units !== 0) await adjustUnits(tx, { orgId: r.payer.orgId, mode: r.payer.mode, month: r.month, delta: -r.units });
    used = await adjustUnits(tx, { orgId: r.payer.orgId, mode: r.payer.mode, month, delta: charged });
  }
  return stateOf(r.payer, at, used);
}

/** After the settling transaction has committed: the 80 % and 100 % e-mails for live usage, once a month each. */
export async function afterSettle(db: Db, s: QuotaState, orgId: number): Promise<void> {
  if (s.mode !== "live") return;
  await announceAllowance(db, { orgId, plan: s.plan, month: s.month, used: s.used, resetsAt: s.resetsAt, thresholds: NOTICE_THRESHOLDS });
}

/**
 * After a live call was refused for want of units (on a plan that stops), outside any transaction: the 100 % notice,
 * once a month, worded for a refusal short of the allowance.
 */
export async function afterRefusal(db: Db, orgId: number, q: QuotaInfo): Promise<void> {
  if (q.mode !== "live") return;
  await announceAllowance(db, { orgId, plan: planOf(q.plan), month: monthKey(new Date(Date.parse(q.resetsAt) - 1)), used: q.used, resetsAt: q.resetsAt, thresholds: [1], refused: true });
}

/** The allowance headers every authenticated response carries. */
export function quotaHeaders(s: QuotaState): Record<string, string> {
  return {
    "units-allowance": String(s.allowance),
    "units-used": String(s.used),
    "units-remaining": String(Math.max(0, s.allowance - s.used)),
    "units-reset": s.resetsAt,
  };
}
