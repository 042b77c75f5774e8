"use client";

import {
  createPaginatedRowModel,
  createSortedRowModel,
  rowPaginationFeature,
  rowSortingFeature,
  sortFn_alphanumeric,
  sortFn_basic,
  sortFn_text,
  tableFeatures,
  useTable,
  type ColumnDef,
  type RowData,
} from "@tanstack/react-table";
import { useState } from "react";
import { IconSort } from "./icons";
import { buttonSecondary, buttonSmall, panel, tableHead } from "./ui";

/** Sorting and client-side pages: the features every console table uses. */
export const tableFeats = tableFeatures({
  rowSortingFeature,
  sortedRowModel: createSortedRowModel(),
  rowPaginationFeature,
  paginatedRowModel: createPaginatedRowModel(),
  sortFns: { alphanumeric: sortFn_alphanumeric, basic: sortFn_basic, text: sortFn_text },
});

export type TableFeats = typeof tableFeats;
export type Column<T extends RowData> = ColumnDef<TableFeats, T>;

const PAGE_SIZES = [10, 25, 50] as const;

/** On a phone: the cell's column name on the left, its value on the right. */
const cellLabelled =
  "max-sm:flex max-sm:justify-between max-sm:gap-3 max-sm:before:font-sans max-sm:before:text-xs max-sm:before:text-ink-2 max-sm:before:uppercase max-sm:before:content-[attr(data-label)]";

/**
 * A sortable, paginated table (TanStack Table). Sort by a header's button (aria-sort says the
 * order); page with Previous / Next. `numeric` columns are right-aligned. Below the sm
 * breakpoint each row becomes a card (its first cell on top, then one line per other cell under
 * its column's name) and the header a row of sort buttons, so nothing scrolls sideways on a phone.
 */
export function DataTable<T extends RowData>({
  caption,
  columns,
  data,
  initialSort,
  numeric = [],
  pageSize = 10,
}: {
  caption: string;
  columns: Column<T>[];
  data: T[];
  initialSort?: { id: string; desc: boolean };
  numeric?: string[];
  pageSize?: number;
}) {
  const [sorting, setSorting] = useState(initialSort ? [initialSort] : []);
  const [pagination, setPagination] = useState({ pageIndex: 0, pageSize });
  const table = useTable(
    {
      features: tableFeats,
      columns,
      data,
      state: { sorting, pagination },
      onSortingChange: setSorting,
      onPaginationChange: setPagination,
      enableSortingRemoval: false,
    },
    (s) => ({ sorting: s.sorting, pagination: s.pagination }),
  );

  const pageCount = Math.max(1, table.getPageCount());
  const rows = table.getRowModel().rows;
  const total = data.length;
  const first = total === 0 ? 0 : pagination.pageIndex * pagination.pageSize + 1;
  const last = Math.min(total, (pagination.pageIndex + 1) * pagination.pageSize);
  const isNum = (id: string) => numeric.includes(id);

  return (
    <div className={`${panel} overflow-hidden`}>
      <div className="overflow-x-auto">
        <table className="w-full border-collapse text-sm max-sm:block">
          <caption className="sr-only">{caption}, sortable by column</caption>
          <thead className={`${tableHead} max-sm:block`}>
            {table.getHeaderGroups().map((group) => (
              <tr key={group.id} className="max-sm:flex max-sm:flex-wrap max-sm:px-1">
                {group.headers.map((header) => {
                  const sorted = header.column.getIsSorted();
                  const canSort = header.column.getCanSort();
                  return (
                    <th
                      key={header.id}
                      scope="col"
                      aria-sort={sorted === "asc" ? "ascending" : sorted === "desc" ? "descending" : canSort ? "none" : undefined}
                      className={`px-3 py-2 font-medium max-sm:block max-sm:px-2 ${isNum(header.column.id) ? "text-right" : ""}`}
                    >
                      {header.isPlaceholder ? null : canSort ? (
                        <button
                          type="button"
                          onClick={header.column.getToggleSortingHandler()}
                          className={`inline-flex items-center gap-1 rounded uppercase hover:text-ink ${isNum(header.column.id) ? "flex-row-reverse" : ""}`}
                        >
                          <table.FlexRender header={header} />
                          <IconSort dir={sorted} />
                        </button>
                      ) : (
                        <table.FlexRender header={header} />
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody className="max-sm:block">
            {rows.map((row) => (
              <tr key={row.id} className="border-t border-rule max-sm:block max-sm:py-1.5">
                {row.getAllCells().map((cell, i) => (
                  <td
                    key={cell.id}
                    data-label={i > 0 && typeof cell.column.columnDef.header === "string" ? cell.column.columnDef.header : undefined}
                    className={`px-3 py-2 align-top max-sm:py-0.5 ${i > 0 ? cellLabelled : "max-sm:block max-sm:pb-1"} ${isNum(cell.column.id) ? "text-right font-mono tabular-nums" : ""}`}
                  >
                    <table.FlexRender cell={cell} />
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <div className="flex flex-wrap items-center justify-between gap-3 border-t border-rule bg-sunken/50 px-3 py-2 text-sm text-ink-2">
        <p aria-live="polite">
          {total === 0 ? "No rows" : `Rows ${first}–${last} of ${total}`}
          {pageCount > 1 ? ` · page ${pagination.pageIndex + 1} of ${pageCount}` : ""}
        </p>
        <div className="flex items-center gap-2">
          <label className="flex items-center gap-1.5">
            <span>Rows</span>
            <select
              className="rounded border border-ink-2/60 bg-surface px-1.5 py-0.5 text-ink"
              value={pagination.pageSize}
              onChange={(e) => setPagination({ pageIndex: 0, pageSize: Number(e.target.value) })}
            >
              {PAGE_SIZES.map((n) => (
                <option key={n} value={n}>
                  {n}
                </option>
              ))}
            </select>
          </label>
          <button type="button" className={`${buttonSecondary} ${buttonSmall}`} onClick={() => table.previousPage()} disabled={!table.getCanPreviousPage()}>
            Previous
          </button>
          <button type="button" className={`${buttonSecondary} ${buttonSmall}`} onClick={() => table.nextPage()} disabled={!table.getCanNextPage()}>
            Next
          </button>
        </div>
      </div>
    </div>
  );
}
