"use client";

import type { ReactNode } from "react";
import { toProblem } from "@/lib/console-client/problem";
import { IconWarn } from "./icons";
import { ProblemView } from "./problem-view";
import { buttonSecondary } from "./ui";

/** A quiet placeholder while data loads; announced once to screen readers. */
export function Loading({ label = "Loading", rows = 3 }: { label?: string; rows?: number }) {
  return (
    <div role="status" aria-live="polite" className="rounded-lg border border-rule bg-surface p-5">
      <span className="sr-only">{label}…</span>
      <div aria-hidden="true" className="flex flex-col gap-3">
        {Array.from({ length: rows }, (_, i) => (
          <div key={i} className="flex items-center gap-3">
            <span className="h-3 w-3 shrink-0 animate-pulse rounded-sm bg-brass/40" />
            <span className="h-3 animate-pulse rounded bg-sunken" style={{ width: `${85 - i * 17}%` }} />
          </div>
        ))}
      </div>
    </div>
  );
}

/** Nothing to show yet, with what to do about it. */
export function Empty({ title, children, action }: { title: string; children?: ReactNode; action?: ReactNode }) {
  return (
    <div className="rounded-lg border border-dashed border-ink-2/40 bg-surface/60 px-5 py-8 text-center">
      <div aria-hidden="true" className="mx-auto mb-3 flex w-fit gap-1">
        {[0, 1, 2, 3].map((i) => (
          <span key={i} className="h-4 w-1.5 rounded-full bg-ink-2/25" />
        ))}
        {[0, 1, 2].map((i) => (
          <span key={i} className="mt-1 h-3 w-1.5 rounded-full bg-brass/40" />
        ))}
      </div>
      <p className="font-semibold">{title}</p>
      {children ? <div className="mx-auto mt-1 max-w-prose text-sm text-ink-2">{children}</div> : null}
      {action ? <div className="mt-4 flex justify-center">{action}</div> : null}
    </div>
  );
}

/** A failed load: the problem the server gave, and a retry. */
export function LoadError({ error, onRetry, what = "this" }: { error: unknown; onRetry?: () => void; what?: string }) {
  const p = toProblem(error);
  return (
    <div role="alert" className="flex flex-col gap-3">
      <p className="text-sm text-ink-2">Could not load {what}.</p>
      <ProblemView problem={p} />
      {onRetry ? (
        <div>
          <button type="button" className={buttonSecondary} onClick={onRetry}>
            Try again
          </button>
        </div>
      ) : null}
    </div>
  );
}

/** The role does not reach this section. */
export function NotForRole({ title, children }: { title: string; children?: ReactNode }) {
  return (
    <div className="flex gap-3 rounded-lg border border-caution-rule border-l-[6px] bg-caution-bg px-5 py-4 text-caution-ink">
      <IconWarn className="mt-0.5 h-5 w-5 shrink-0" />
      <div>
        <p className="font-semibold">{title}</p>
        {children ? <div className="mt-1 text-sm">{children}</div> : null}
      </div>
    </div>
  );
}
