import type { Plan, PlanId } from "./plans";

/**
 * The billing shapes the console's routes answer with and its pages and invoice documents read.
 * Money is in integer cents; times are ISO-8601 UTC strings.
 */

export type PlanView = Plan;

export interface CardView {
  brand: string;
  last4: string;
  expMonth: number;
  expYear: number;
}

export interface BillingOverview {
  plan: PlanView;
  /** Every plan of the catalogue, cheapest first, for the change-plan choices. */
  plans: PlanView[];
  currency: string;
  period: { start: string; end: string };
  /** Live keys' compute units this period against the plan's allowance. */
  live: {
    used: number;
    allowance: number;
    /** Usage at period end if it goes on at the rate so far. */
    projected: number;
    /** True on a plan that refuses calls past the allowance (the free plan). */
    stopsAtAllowance: boolean;
  };
  test: { used: number; allowance: number };
  /** The invoice the projected usage would give: fee + overage, in cents. */
  projectedInvoice: { fee: number; overageUnits: number; overage: number; total: number };
  payment: {
    /** "none": no card on file; "ok"; "failed": the last invoice could not be paid. */
    state: "none" | "ok" | "failed";
    card: CardView | null;
    /** While a payment has failed: when the organisation moves to the free plan unless it pays. */
    graceUntil: string | null;
  };
  /** The provider's subscription status, or null on the free plan. */
  subscriptionStatus: string | null;
  /** False when the billing provider is not configured: plans and usage show, changes and invoices do not. */
  providerConfigured: boolean;
}

export type InvoiceStatus = "draft" | "open" | "paid" | "uncollectible" | "void";

export interface InvoiceSummary {
  id: string;
  number: string | null;
  status: InvoiceStatus;
  currency: string;
  periodStart: string;
  periodEnd: string;
  /** Cents. */
  total: number;
  amountDue: number;
  amountPaid: number;
  createdAt: string;
  paidAt: string | null;
}

export interface InvoiceLine {
  description: string;
  quantity: number;
  /** Cents per unit, when the line is quantity × a unit price. */
  unitAmount: number | null;
  /** Cents. */
  amount: number;
  periodStart: string;
  periodEnd: string;
}

export interface InvoiceDetail extends InvoiceSummary {
  org: { name: string; slug: string };
  plan: PlanId | null;
  lines: InvoiceLine[];
}

export interface InvoicePage {
  items: InvoiceSummary[];
  nextCursor: string | null;
}
