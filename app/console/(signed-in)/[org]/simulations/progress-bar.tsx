/** A simulation's progress, 0 to 1, as a bar with its percentage in words beside it (not in colour alone). */
export function ProgressBar({ value, label, status }: { value: number; label: string; status: string }) {
  const pct = Math.round(Math.min(1, Math.max(0, value)) * 100);
  const ended = status === "cancelled" || status === "failed";
  return (
    <div className="flex min-w-0 items-center gap-2">
      <div
        role="progressbar"
        aria-label={label}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={pct}
        aria-valuetext={`${pct} % (${status})`}
        className="h-2.5 min-w-16 flex-1 overflow-hidden rounded-full border border-rule bg-sunken"
      >
        <div className={`h-full ${ended ? "bg-ink-2/50" : "bg-accent"} transition-[width] duration-300`} style={{ width: `${pct}%` }} />
      </div>
      <span className="w-11 shrink-0 text-right font-mono text-xs tabular-nums">{pct} %</span>
    </div>
  );
}
