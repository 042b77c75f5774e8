"use client";

import { useState, type ReactNode } from "react";
import { buttonSecondary, buttonSmall } from "./ui";

/** Cursor pagination of a newest-first list: the cursors of the pages visited so far, so Newer goes back one. */
export function useCursorPages() {
  const [cursors, setCursors] = useState<(string | undefined)[]>([undefined]);
  const page = cursors.length - 1;
  return {
    page,
    cursor: cursors[page],
    restart: () => setCursors([undefined]),
    newer: () => setCursors((c) => c.slice(0, -1)),
    older: (next: string) => setCursors((c) => [...c, next]),
  };
}

/** "Page n", what else the list says about itself, and Newer / Older buttons under a cursor-paginated list of more than one page. */
export function CursorPager({
  pages,
  nextCursor,
  fetching,
  stale,
  summary,
  className = "flex flex-wrap items-center justify-between gap-2 text-sm text-ink-2",
}: {
  pages: ReturnType<typeof useCursorPages>;
  nextCursor: string | null;
  /** A page is being fetched (said beside the page number). */
  fetching: boolean;
  /** The list shows the previous page's rows while the next loads: Older waits. */
  stale: boolean;
  summary?: ReactNode;
  className?: string;
}) {
  // A list that fits on one page needs no pager: only what it says about itself, if anything.
  if (pages.page === 0 && !nextCursor) return summary ? <p className={className}>{typeof summary === "string" ? summary.replace(/^ · /, "") : summary}</p> : null;
  return (
    <div className={className}>
      <p aria-live="polite">
        Page {pages.page + 1}
        {summary}
        {fetching ? " · loading…" : ""}
      </p>
      <div className="flex gap-2">
        <button type="button" className={`${buttonSecondary} ${buttonSmall}`} disabled={pages.page === 0} onClick={pages.newer}>
          Newer
        </button>
        <button type="button" className={`${buttonSecondary} ${buttonSmall}`} disabled={!nextCursor || stale} onClick={() => nextCursor && pages.older(nextCursor)}>
          Older
        </button>
      </div>
    </div>
  );
}
