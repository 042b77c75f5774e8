import type { BillingOverview, InvoiceDetail, InvoicePage } from "@/lib/billing/views";
import type { PlanId } from "@/lib/billing/plans";
import { consoleFetch } from "@/lib/console-client/fetcher";

/** The billing section's console routes, one function each, and the query keys they are cached under. */

const billingPath = (org: string) => `/api/console/orgs/${encodeURIComponent(org)}/billing`;

export const billingApi = {
  overview: (org: string, signal?: AbortSignal) => consoleFetch<BillingOverview>(billingPath(org), { signal }),
  checkout: (org: string, plan: Exclude<PlanId, "lantern">) => consoleFetch<{ url: string }>(`${billingPath(org)}/checkout`, { method: "POST", body: { plan } }),
  downgrade: (org: string) => consoleFetch<BillingOverview>(`${billingPath(org)}/downgrade`, { method: "POST" }),
  invoices: (org: string, f: { cursor?: string; limit: number }, signal?: AbortSignal) => {
    const q = new URLSearchParams({ limit: String(f.limit) });
    if (f.cursor) q.set("cursor", f.cursor);
    return consoleFetch<InvoicePage>(`${billingPath(org)}/invoices?${q.toString()}`, { signal });
  },
  invoice: (org: string, id: string, signal?: AbortSignal) => consoleFetch<InvoiceDetail>(`${billingPath(org)}/invoices/${encodeURIComponent(id)}`, { signal }),
  documentHref: (org: string, id: string, format: "pdf" | "csv") => `${billingPath(org)}/invoices/${encodeURIComponent(id)}/document?format=${format}`,
};

export const billingKeys = {
  all: (org: string) => ["console", "org", org, "billing"] as const,
  overview: (org: string) => ["console", "org", org, "billing", "overview"] as const,
  invoices: (org: string, f: { cursor?: string; limit: number }) => ["console", "org", org, "billing", "invoices", f] as const,
  invoice: (org: string, id: string) => ["console", "org", org, "billing", "invoice", id] as const,
};
