import { formatInt } from "@/lib/console-client/format";
import { percentUsed } from "./words";

/**
 * Units used against an allowance as a bar: the used part solid, the projected rest of the period
 * hatched, and a tick at the allowance when the bar runs past it. The figures are said in text
 * beside it, never by colour alone.
 */
export function UsageMeter({ label, used, allowance, projected, words }: { label: string; used: number; allowance: number; projected?: number; words: string }) {
  const scale = Math.max(allowance, used, projected ?? 0, 1);
  const pct = (n: number) => `${Math.min(100, (n / scale) * 100)}%`;
  const full = used >= allowance;
  const share = percentUsed(used, allowance);
  return (
    <div className="flex flex-col gap-1.5">
      <div
        role="progressbar"
        aria-label={label}
        aria-valuemin={0}
        aria-valuemax={allowance}
        aria-valuenow={Math.min(used, allowance)}
        aria-valuetext={`${formatInt(used)} of ${formatInt(allowance)} units (${share} %)`}
        className="relative h-4 overflow-hidden rounded-full border border-rule bg-sunken"
      >
        {projected !== undefined && projected > used ? (
          <div
            aria-hidden="true"
            className="absolute inset-y-0 left-0 bg-[repeating-linear-gradient(135deg,var(--color-accent)_0_2px,transparent_2px_6px)] opacity-45"
            style={{ width: pct(projected) }}
          />
        ) : null}
        <div aria-hidden="true" className={`absolute inset-y-0 left-0 ${full ? "bg-brass" : "bg-accent"}`} style={{ width: pct(used) }} />
        {scale > allowance ? <div aria-hidden="true" className="absolute inset-y-0 w-0.5 bg-ink" style={{ left: pct(allowance) }} /> : null}
      </div>
      <p className="flex flex-wrap justify-between gap-x-3 text-sm">
        <span>{words}</span>
        <span className="ml-auto font-mono text-xs text-ink-2 tabular-nums">{share === 0 && used > 0 ? "under 1 %" : `${share} %`}</span>
      </p>
    </div>
  );
}
