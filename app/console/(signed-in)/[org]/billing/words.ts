import type { CardView, InvoiceStatus } from "@/lib/billing/views";

/** The billing page's figures in words; pure, so they read the same in every test and browser. */

const int = (n: number) => n.toLocaleString("en-US");
const compact = new Intl.NumberFormat("en-US", { notation: "compact", compactDisplay: "long", maximumSignificantDigits: 3 });

/** The exponent of a power of two, or null: a simulation budget is stated as 2^k bits. */
export function powerOfTwo(n: number): number | null {
  if (!Number.isSafeInteger(n) || n < 1) return null;
  const k = Math.round(Math.log2(n));
  return 2 ** k === n ? k : null;
}

/** "17.2 billion" for 2^34: a large count as people say it. */
export const countWords = (n: number) => compact.format(n);

/** "Visa ending 4242, expires 04/2030", or "No card on file". */
export function cardWords(card: CardView | null): string {
  if (!card) return "No card on file";
  const brand = card.brand ? card.brand[0]!.toUpperCase() + card.brand.slice(1) : "Card";
  return `${brand} ending ${card.last4}, expires ${String(card.expMonth).padStart(2, "0")}/${card.expYear}`;
}

/** A price per unit in cents as "2¢ a unit", or "$1.50 a unit" from 150. */
export function unitPriceWords(cents: number): string {
  if (cents < 100) return `${cents}¢ a unit`;
  return `$${Math.floor(cents / 100)}.${String(cents % 100).padStart(2, "0")} a unit`;
}

/** "12,400 of 40,000 units used" and the projection, "; at this rate 31,000 by 1 Jan". */
export function meterWords(used: number, allowance: number, projected: number, byDay: string): string {
  const base = `${int(used)} of ${int(allowance)} units used`;
  return projected > used ? `${base}; at this rate ${int(projected)} by ${byDay}` : base;
}

/** Share of an allowance used, as a whole percentage (floored, so 100 % means the allowance is spent). */
export const percentUsed = (used: number, allowance: number) => (allowance <= 0 ? 100 : Math.floor((used * 100) / allowance));

/** The provider's subscription states in plain words. */
export function subscriptionWords(status: string | null): string {
  if (status === null) return "none (free plan)";
  const words: Record<string, string> = {
    active: "active",
    trialing: "in a trial",
    past_due: "payment overdue",
    unpaid: "unpaid",
    canceled: "cancelled",
    incomplete: "waiting for the first payment",
    incomplete_expired: "first payment never made",
    paused: "paused",
  };
  return words[status] ?? status.replaceAll("_", " ");
}

export const INVOICE_STATUS: Record<InvoiceStatus, { label: string; mark: string; cls: string }> = {
  draft: { label: "draft", mark: "◌", cls: "border-dashed border-ink-2/60 text-ink-2" },
  open: { label: "open", mark: "◐", cls: "border-caution-rule bg-caution-bg text-caution-ink" },
  paid: { label: "paid", mark: "●", cls: "border-accent/40 bg-accent-soft text-accent" },
  uncollectible: {
    label: "uncollectible",
    mark: "⊘",
    cls: "border-[#a3261c]/40 bg-[#f7e1dd] text-[#7a1d14] dark:border-[#f08a7e]/40 dark:bg-[#3a1714] dark:text-[#f5b4ab]",
  },
  void: { label: "void", mark: "○", cls: "border-rule bg-sunken text-ink-2" },
};

/** A period [start, end) as its first and last UTC day (the end is the first instant after it). */
export function periodDays(start: string, end: string): { first: string; last: string } {
  return { first: start.slice(0, 10), last: new Date(Date.parse(end) - 1).toISOString().slice(0, 10) };
}
