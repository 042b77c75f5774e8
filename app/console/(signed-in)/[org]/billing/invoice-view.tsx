"use client";

import { useQuery } from "@tanstack/react-query";
import { IconDownload } from "@/components/console/icons";
import { LoadError, Loading } from "@/components/console/states";
import { buttonSecondary, buttonSmall, stackBody, stackCell, stackHead, stackRow, stackTable, tableHead } from "@/components/console/ui";
import { remaining } from "@/lib/billing/invoice-amounts";
import { formatMoney } from "@/lib/billing/plans";
import { formatInt } from "@/lib/console-client/format";
import { billingApi, billingKeys } from "./billing-api";

/** One invoice's line items, its totals and its documents. */
export function InvoiceView({ org, id, title }: { org: string; id: string; title: string }) {
  const inv = useQuery({ queryKey: billingKeys.invoice(org, id), queryFn: ({ signal }) => billingApi.invoice(org, id, signal) });
  if (inv.isPending) return <Loading label={`Loading ${title}`} rows={2} />;
  if (inv.isError) return <LoadError error={inv.error} onRetry={() => void inv.refetch()} what={title} />;
  const d = inv.data;
  const num = "px-3 py-1.5 text-right font-mono tabular-nums max-md:text-left";
  return (
    <div className="flex flex-col gap-3">
      <table className={`w-full border-collapse text-sm ${stackTable}`}>
        <caption className="sr-only">Line items of {title}</caption>
        <thead className={`${tableHead} ${stackHead}`}>
          <tr>
            <th scope="col" className="px-3 py-1.5 font-medium">Description</th>
            <th scope="col" className="px-3 py-1.5 text-right font-medium">Quantity</th>
            <th scope="col" className="px-3 py-1.5 text-right font-medium">Unit price</th>
            <th scope="col" className="px-3 py-1.5 text-right font-medium">Amount</th>
          </tr>
        </thead>
        <tbody className={stackBody}>
          {d.lines.map((l, i) => (
            <tr key={i} className={`border-t border-rule ${stackRow}`}>
              <th scope="row" className={`px-3 py-1.5 text-left font-normal ${stackCell}`}>{l.description}</th>
              <td className={`${num} ${stackCell}`} data-label="Quantity">{formatInt(l.quantity)}</td>
              <td className={`${num} ${stackCell}`} data-label="Unit price">{l.unitAmount === null ? "—" : formatMoney(l.unitAmount)}</td>
              <td className={`${num} ${stackCell}`} data-label="Amount">{formatMoney(l.amount)}</td>
            </tr>
          ))}
          {d.lines.length === 0 ? (
            <tr className={stackRow}>
              <td colSpan={4} className={`px-3 py-1.5 text-ink-2 ${stackCell}`}>No line items.</td>
            </tr>
          ) : null}
        </tbody>
      </table>
      <dl className="ml-auto grid w-full max-w-xs grid-cols-[1fr_auto] gap-x-6 gap-y-0.5 text-sm">
        <dt className="font-medium">Total</dt>
        <dd className="text-right font-mono font-medium tabular-nums">{formatMoney(d.total)}</dd>
        <dt className="text-ink-2">Paid</dt>
        <dd className="text-right font-mono tabular-nums">{formatMoney(d.amountPaid)}</dd>
        <dt className="text-ink-2">Remaining</dt>
        <dd className="text-right font-mono tabular-nums">{formatMoney(remaining(d))}</dd>
      </dl>
      <div className="flex flex-wrap items-center gap-2 text-sm">
        <span className="text-ink-2">Download:</span>
        <a href={billingApi.documentHref(org, id, "pdf")} download className={`${buttonSecondary} ${buttonSmall}`}>
          <IconDownload className="h-4 w-4" />
          PDF
        </a>
        <a href={billingApi.documentHref(org, id, "csv")} download className={`${buttonSecondary} ${buttonSmall}`}>
          <IconDownload className="h-4 w-4" />
          CSV
        </a>
      </div>
    </div>
  );
}
