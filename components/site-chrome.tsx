import Link from "next/link";
import type { ReactNode } from "react";
import { Mark } from "./mark";

const navLink =
  "rounded-md px-2.5 py-1.5 text-sm font-medium text-ink-2 no-underline hover:bg-sunken hover:text-ink";

export function SiteHeader() {
  return (
    <header className="border-b border-rule bg-surface/90">
      <div className="mx-auto flex max-w-6xl flex-wrap items-center justify-between gap-x-6 gap-y-2 px-5 py-3 sm:px-8">
        <Link
          href="/"
          className="flex items-center gap-2.5 text-ink no-underline"
          aria-label="Paritas, home"
        >
          <Mark className="h-4 w-auto" />
          <span className="text-lg font-semibold tracking-tight">Paritas</span>
        </Link>
        <nav aria-label="Main">
          <ul className="-mx-2.5 flex flex-wrap items-center gap-x-1 gap-y-1">
            <li>
              {/* /docs is a route handler, not a page: a plain link does a full load. */}
              <a href="/docs" className={navLink}>
                API reference
              </a>
            </li>
            <li>
              <Link href="/problems" className={navLink}>
                Problem types
              </Link>
            </li>
            <li>
              <Link href="/console" className={navLink}>
                Console
              </Link>
            </li>
          </ul>
        </nav>
      </div>
    </header>
  );
}

export function SiteFooter() {
  return (
    <footer className="mt-20 border-t border-rule bg-surface">
      <div className="mx-auto flex max-w-6xl flex-col gap-4 px-5 py-8 text-sm text-ink-2 sm:flex-row sm:items-start sm:justify-between sm:px-8">
        <div className="flex items-center gap-2.5">
          <Mark className="h-3.5 w-auto text-ink" />
          <span>
            <span className="font-semibold text-ink">Paritas</span> · API{" "}
            <code className="font-mono">/api/v1</code>
          </span>
        </div>
        <p className="max-w-xl">
          Results are engineering estimates. For safety-critical links, the applicable standards and
          certification decide. Typeface: IBM Plex, SIL Open Font License 1.1.
        </p>
      </div>
    </footer>
  );
}

/** Page wrapper for the narrow, text-first pages (problem types, not found). */
export function PageShell({ children }: { children: ReactNode }) {
  return <div className="mx-auto max-w-3xl px-5 pt-10 sm:px-8 sm:pt-14">{children}</div>;
}
