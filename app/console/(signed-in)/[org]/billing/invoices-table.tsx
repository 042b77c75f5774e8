"use client";

import { keepPreviousData, useQuery } from "@tanstack/react-query";
import { Fragment, useState } from "react";
import { CursorPager, useCursorPages } from "@/components/console/cursor-pages";
import { Empty, LoadError, Loading } from "@/components/console/states";
import { buttonQuiet, buttonSmall, panel, stackBody, stackCell, stackHead, stackRow, stackTable, tableHead } from "@/components/console/ui";
import { formatMoney } from "@/lib/billing/plans";
import type { InvoiceStatus, InvoiceSummary } from "@/lib/billing/views";
import { formatDay } from "@/lib/console-client/format";
import { billingApi, billingKeys } from "./billing-api";
import { InvoiceView } from "./invoice-view";
import { INVOICE_STATUS, periodDays } from "./words";

const PAGE_SIZE = 12;

export function InvoiceStatusBadge({ status }: { status: InvoiceStatus }) {
  const s = INVOICE_STATUS[status];
  return (
    <span className={`inline-flex items-center gap-1 rounded-full border px-2 py-px text-xs font-medium whitespace-nowrap ${s.cls}`}>
      <span aria-hidden="true">{s.mark}</span>
      {s.label}
    </span>
  );
}

const invoiceName = (i: InvoiceSummary) => `invoice ${i.number ?? i.id}`;

function InvoiceRow({ org, i, open, onToggle }: { org: string; i: InvoiceSummary; open: boolean; onToggle: () => void }) {
  const p = periodDays(i.periodStart, i.periodEnd);
  const detailId = `invoice-${i.id}`;
  return (
    <Fragment>
      <tr className={`border-t border-rule align-top ${stackRow}`}>
        <th scope="row" className={`px-3 py-2.5 text-left font-mono text-[0.8125rem] font-medium ${stackCell}`}>
          {i.number ?? <span className="font-sans font-normal text-ink-2">not numbered yet</span>}
        </th>
        <td className={`px-3 py-2.5 ${stackCell}`} data-label="Period">
          {formatDay(p.first, true)} – {formatDay(p.last)}
        </td>
        <td className={`px-3 py-2.5 text-right font-mono tabular-nums max-md:text-left ${stackCell}`} data-label="Amount">
          {formatMoney(i.total)}
        </td>
        <td className={`px-3 py-2.5 ${stackCell}`} data-label="Status">
          <InvoiceStatusBadge status={i.status} />
        </td>
        <td className={`px-3 py-2.5 ${stackCell}`} data-label="Paid">
          {i.paidAt ? formatDay(i.paidAt.slice(0, 10)) : <span className="text-ink-2">—</span>}
        </td>
        <td className={`px-3 py-2 text-right max-md:text-left ${stackCell}`}>
          <button type="button" className={`${buttonQuiet} ${buttonSmall}`} aria-expanded={open} aria-controls={detailId} onClick={onToggle}>
            {open ? "Hide lines" : "Lines and downloads"}
            <span className="sr-only"> of {invoiceName(i)}</span>
          </button>
        </td>
      </tr>
      {open ? (
        <tr className={stackRow} id={detailId}>
          <td colSpan={6} className="bg-sunken/40 px-3 pt-1 pb-4 max-md:block">
            <section aria-label={`Details of ${invoiceName(i)}`}>
              <InvoiceView org={org} id={i.id} title={invoiceName(i)} />
            </section>
          </td>
        </tr>
      ) : null}
    </Fragment>
  );
}

/** The organisation's invoices, newest first, a page at a time; a row opens its lines and documents. */
export function InvoicesTable({ org }: { org: string }) {
  const pages = useCursorPages();
  const filters = { cursor: pages.cursor, limit: PAGE_SIZE };
  const invoices = useQuery({ queryKey: billingKeys.invoices(org, filters), queryFn: ({ signal }) => billingApi.invoices(org, filters, signal), placeholderData: keepPreviousData });
  const [openId, setOpenId] = useState<string | null>(null);

  if (invoices.isPending) return <Loading label="Loading the invoices" rows={3} />;
  if (invoices.isError) return <LoadError error={invoices.error} onRetry={() => void invoices.refetch()} what="the invoices" />;
  const data = invoices.data;
  if (data.items.length === 0 && pages.page === 0) {
    return <Empty title="No invoices yet — the first one is issued when this month ends." />;
  }
  return (
    <div className="flex flex-col gap-3">
      <div className={`${panel} overflow-x-auto ${invoices.isPlaceholderData ? "opacity-60" : ""}`}>
        <table className={`w-full border-collapse text-sm md:min-w-[40rem] ${stackTable}`}>
          <caption className="sr-only">Invoices, newest first</caption>
          <thead className={`${tableHead} ${stackHead}`}>
            <tr>
              <th scope="col" className="px-3 py-2 font-medium">Number</th>
              <th scope="col" className="px-3 py-2 font-medium">Period</th>
              <th scope="col" className="px-3 py-2 text-right font-medium">Amount</th>
              <th scope="col" className="px-3 py-2 font-medium">Status</th>
              <th scope="col" className="px-3 py-2 font-medium">Paid</th>
              <th scope="col" className="px-3 py-2 font-medium"><span className="sr-only">Details</span></th>
            </tr>
          </thead>
          <tbody className={stackBody}>
            {data.items.map((i) => (
              <InvoiceRow key={i.id} org={org} i={i} open={openId === i.id} onToggle={() => setOpenId((o) => (o === i.id ? null : i.id))} />
            ))}
          </tbody>
        </table>
      </div>
      <CursorPager pages={pages} nextCursor={data.nextCursor} fetching={invoices.isFetching} stale={invoices.isPlaceholderData} />
    </div>
  );
}
