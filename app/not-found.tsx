import type { Metadata } from "next";
import Link from "next/link";
import { PageShell } from "@/components/site-chrome";

export const metadata: Metadata = { title: "Not found" };

export default function NotFound() {
  return (
    <PageShell>
      <div className="pa-grid rounded-lg border border-rule p-6 sm:p-10">
        <p className="font-mono text-sm text-ink-2" aria-hidden="true">
          syndrome ≠ 0
        </p>
        <h1 className="mt-2 text-3xl font-semibold tracking-tight">Nothing at this address</h1>
        <p className="mt-3 text-ink-2">
          The page does not exist, or not yet — the console, for one, is still being built. API
          calls live under <code className="pa-code">/api/v1</code> and answer in JSON, not with
          this page.
        </p>
        <ul className="mt-6 flex flex-col gap-2 sm:flex-row sm:gap-6">
          <li>
            <Link href="/">Paritas home</Link>
          </li>
          <li>
            <a href="/docs">API reference</a>
          </li>
          <li>
            <Link href="/problems">Problem types</Link>
          </li>
        </ul>
      </div>
    </PageShell>
  );
}
