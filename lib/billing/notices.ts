import type { Db } from "@/db";
import { listBillingEmails } from "@/db/queries/members";
import { findOrgById } from "@/db/queries/orgs";
import { claimQuotaNotice, dropQuotaNotice } from "@/db/queries/quota";
import { sendMail } from "@/lib/mail/send";
import { formatMoney, GRACE_DAYS, planOf, type Plan } from "./plans";
import { logError } from "@/lib/api/redact";

/** Messages about money and allowances, to every owner and billing admin of the organisation. */

const day = (iso: string) => iso.slice(0, 10);
const units = (n: number) => n.toLocaleString("en-US");

export type BillingNotice =
  | { kind: "allowance"; threshold: number; used: number; plan: Plan; resetsAt: string }
  | { kind: "payment-failed"; amount: number; graceUntil: string; plan: Plan }
  | { kind: "payment-recovered"; amount: number; plan: Plan }
  | { kind: "downgraded"; from: Plan; to: Plan; reason: "grace-ended" | "requested" | "subscription-ended" }
  | { kind: "plan-changed"; from: Plan; to: Plan };

export function noticeText(orgName: string, n: BillingNotice): { subject: string; text: string } {
  switch (n.kind) {
    case "allowance": {
      const pct = Math.round(n.threshold * 100);
      if (n.threshold === 1 && n.used < n.plan.includedUnits) {
        // Refused short of the allowance: the call needed more than the units left.
        const left = n.plan.includedUnits - n.used;
        return {
          subject: `Paritas: ${orgName} has too few compute units left this month`,
          text: [
            `${orgName} has used ${units(n.used)} of the ${units(n.plan.includedUnits)} compute units its ${n.plan.name} plan includes this month, and a call that needed more than the ${units(left)} left was refused (402).`,
            `Calls that fit in what is left still run; the allowance renews on ${day(n.resetsAt)}, or the organisation can move to a paid plan.`,
            "",
            "The console's Billing page shows the usage and a projection for the month.",
          ].join("\n"),
        };
      }
      const after =
        n.plan.overagePerUnit === null
          ? `At 100 % calls with live keys are refused (402) until the allowance renews on ${day(n.resetsAt)}, unless the organisation moves to a paid plan.`
          : `Beyond 100 % each unit costs ${formatMoney(n.plan.overagePerUnit)} and appears on the next invoice; nothing is refused.`;
      return {
        subject: `Paritas: ${orgName} has used ${pct} % of this month's compute units`,
        text: [`${orgName} has used ${units(n.used)} of the ${units(n.plan.includedUnits)} compute units its ${n.plan.name} plan includes this month.`, after, "", "The console's Billing page shows the usage and a projection for the month."].join("\n"),
      };
    }
    case "payment-failed":
      return {
        subject: `Paritas: a payment for ${orgName} failed`,
        text: [
          `The invoice of ${formatMoney(n.amount)} for ${orgName}'s ${n.plan.name} plan could not be paid with the card on file.`,
          `The plan stays in place for ${GRACE_DAYS} days, until ${day(n.graceUntil)}. If the invoice is still unpaid then, the organisation moves to the free plan (${planOf("lantern").name}).`,
          "An owner or billing admin can enter another card by choosing the plan again on the console's Billing page.",
        ].join("\n"),
      };
    case "payment-recovered":
      return {
        subject: `Paritas: payment received for ${orgName}`,
        text: `The invoice of ${formatMoney(n.amount)} for ${orgName} has been paid. The ${n.plan.name} plan continues as before.`,
      };
    case "downgraded": {
      const why = { "grace-ended": `the grace period after a failed payment ended without payment`, requested: "an owner or billing admin asked for it", "subscription-ended": "the subscription ended at the billing provider" }[n.reason];
      return {
        subject: `Paritas: ${orgName} is now on the ${n.to.name} plan`,
        text: [`${orgName} moved from ${n.from.name} to ${n.to.name} because ${why}.`, `The allowance is now ${units(n.to.includedUnits)} compute units a month, and calls past it are refused.`].join("\n"),
      };
    }
    case "plan-changed":
      return {
        subject: `Paritas: ${orgName} is now on the ${n.to.name} plan`,
        text: `${orgName} moved from ${n.from.name} to ${n.to.name}. It includes ${units(n.to.includedUnits)} compute units a month${n.to.overagePerUnit === null ? "" : `, then ${formatMoney(n.to.overagePerUnit)} a unit`}; the change applies from now.`,
      };
  }
}

/** The notice as mails to each owner and billing admin of the org (none when it has gone). */
async function noticeMails(db: Db, orgId: number, n: BillingNotice) {
  const [org, to] = await Promise.all([findOrgById(db, orgId), listBillingEmails(db, orgId)]);
  if (!org) return [];
  const { subject, text } = noticeText(org.name, n);
  return to.map((addr) => ({ to: addr, subject, text }));
}

/** Mail a notice to the owners and billing admins; failures are logged, the change it reports has happened either way. */
export async function sendBillingNotice(db: Db, orgId: number, n: BillingNotice): Promise<void> {
  const mails = await noticeMails(db, orgId, n);
  await Promise.all(mails.map((m) => sendMail(m).catch((e: unknown) => logError(`mail "${m.subject}" to ${m.to} failed`, e instanceof Error ? e.message : e))));
}

// Thresholds already announced (per database), so a busy org past 80 % does not try the notices table on every call.
const announcedIn = new WeakMap<Db, Set<string>>();

/**
 * After a live call: tell the owners and billing admins the first time this month the usage reaches 80 % and 100 %
 * of the plan's allowance (or, on a plan that stops, a call is refused for want of units: the 100 % notice, worded so). The notices table makes it once per org, month and threshold across processes; a mail
 * that could not be sent gives its row back so a later call tries again.
 */
export async function announceAllowance(db: Db, q: { orgId: number; plan: Plan; month: string; used: number; resetsAt: string; thresholds: readonly number[]; refused?: boolean }): Promise<void> {
  const announced = announcedIn.get(db) ?? new Set<string>();
  announcedIn.set(db, announced);
  for (const t of q.thresholds) {
    const pct = Math.round(t * 100);
    const memo = `${q.orgId}:${q.month}:${pct}`;
    // A refusal on a plan that stops counts as reaching the allowance, though the units left were too few for the call.
    if ((q.used < t * q.plan.includedUnits && !(q.refused && t === 1)) || announced.has(memo)) continue;
    if (!(await claimQuotaNotice(db, q.orgId, q.month, pct, new Date().toISOString()))) {
      announced.add(memo);
      continue;
    }
    announced.add(memo);
    const mails = await noticeMails(db, q.orgId, { kind: "allowance", threshold: t, used: q.used, plan: q.plan, resetsAt: q.resetsAt });
    try {
      await Promise.all(mails.map((m) => sendMail(m)));
    } catch (e) {
      announced.delete(memo);
      await dropQuotaNotice(db, q.orgId, q.month, pct);
      logError(`allowance notice for org ${q.orgId} failed`, e instanceof Error ? e.message : e);
    }
  }
}
