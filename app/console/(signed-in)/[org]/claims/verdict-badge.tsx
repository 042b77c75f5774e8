import type { ClaimVerdict } from "@/lib/console-client/types";

/**
 * A verdict: a word and a shape of its own, never colour alone. Supported: a tick in a square, as a passed
 * check; refuted: a cross in a diamond, as a warning sign; inconclusive: a square half filled, evidence half
 * way; pending: an open dashed square, still being filled in.
 */
const VERDICT = {
  supported: { label: "supported", cls: "border-accent/50 bg-accent-soft text-accent" },
  refuted: { label: "refuted", cls: "border-[#a3261c]/50 bg-[#f7e1dd] text-[#7a1d14] dark:border-[#f08a7e]/50 dark:bg-[#3a1714] dark:text-[#f5b4ab]" },
  inconclusive: { label: "inconclusive", cls: "border-caution-rule bg-caution-bg text-caution-ink" },
  pending: { label: "pending", cls: "border-dashed border-ink-2/60 bg-surface text-ink-2" },
} as const satisfies Record<ClaimVerdict, { label: string; cls: string }>;

function Shape({ verdict }: { verdict: ClaimVerdict }) {
  return (
    <svg viewBox="0 0 12 12" className="h-3 w-3 shrink-0" aria-hidden="true" focusable="false" fill="none" stroke="currentColor" strokeWidth="1.5" strokeLinecap="round" strokeLinejoin="round">
      {verdict === "supported" ? (
        <>
          <rect x="1" y="1" width="10" height="10" rx="2" fill="currentColor" stroke="none" />
          <path d="m3.4 6.2 1.8 1.8 3.6-3.8" className="stroke-accent-soft dark:stroke-accent-ink" />
        </>
      ) : verdict === "refuted" ? (
        <>
          <path d="M6 .8 11.2 6 6 11.2.8 6Z" fill="currentColor" stroke="none" />
          <path d="m4.3 4.3 3.4 3.4m0-3.4L4.3 7.7" className="stroke-[#f7e1dd] dark:stroke-[#3a1714]" />
        </>
      ) : verdict === "inconclusive" ? (
        <>
          <rect x="1.5" y="1.5" width="9" height="9" rx="1.5" />
          <path d="M1.5 6h9v3a1.5 1.5 0 0 1-1.5 1.5H3A1.5 1.5 0 0 1 1.5 9Z" fill="currentColor" stroke="none" />
        </>
      ) : (
        <rect x="1.5" y="1.5" width="9" height="9" rx="1.5" strokeDasharray="2 1.6" />
      )}
    </svg>
  );
}

export function VerdictBadge({ verdict, size = "sm" }: { verdict: ClaimVerdict; size?: "sm" | "md" }) {
  const v = VERDICT[verdict];
  return (
    <span
      data-verdict={verdict}
      className={`inline-flex items-center gap-1.5 rounded-md border font-medium whitespace-nowrap ${size === "md" ? "px-2 py-0.5 text-sm" : "px-1.5 py-px text-xs"} ${v.cls}`}
    >
      <Shape verdict={verdict} />
      {v.label}
    </span>
  );
}
