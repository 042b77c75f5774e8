import type { InvoiceSummary } from "./views";

/**
 * What is left to pay on an invoice, in cents. The provider's amount due is the invoice's whole
 * due amount and stays so once it is paid, so the remainder is due minus paid (never below zero).
 */
export const remaining = (inv: Pick<InvoiceSummary, "amountDue" | "amountPaid">) => Math.max(0, inv.amountDue - inv.amountPaid);
