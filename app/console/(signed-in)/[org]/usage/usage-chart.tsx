"use client";

import { Bar, BarChart, CartesianGrid, ResponsiveContainer, Tooltip, XAxis, YAxis, type TooltipContentProps } from "recharts";
import { formatDay, formatInt } from "@/lib/console-client/format";
import type { UsageReport } from "@/lib/console-client/types";

type Day = UsageReport["daily"][number];

function DayTip({ active, payload }: TooltipContentProps) {
  const d = active ? (payload?.[0]?.payload as Day | undefined) : undefined;
  if (!d) return null;
  return (
    <div className="rounded-md border border-rule bg-surface px-3 py-2 text-xs shadow-md">
      <p className="font-semibold">{formatDay(d.day)}</p>
      <p>
        <span className="font-mono tabular-nums">{formatInt(d.units)}</span> units
      </p>
      <p className="text-ink-2">
        {formatInt(d.calls)} calls{d.errors ? ` · ${formatInt(d.errors)} ${d.errors === 1 ? "error" : "errors"}` : ""}
      </p>
    </div>
  );
}

/** Compute units a day as bars, the y-axis named with its unit; days without use show as gaps on the baseline. */
export function UsageChart({ daily }: { daily: Day[] }) {
  return (
    <div className="h-64 w-full sm:h-72">
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={daily} margin={{ top: 8, right: 8, bottom: 0, left: 0 }} accessibilityLayer={false}>
          <CartesianGrid vertical={false} stroke="var(--pa-rule)" strokeDasharray="3 4" />
          <XAxis
            dataKey="day"
            tickFormatter={(d: string) => formatDay(d, true)}
            interval="preserveStartEnd"
            minTickGap={18}
            tick={{ fill: "var(--pa-ink-2)", fontSize: 12 }}
            axisLine={{ stroke: "var(--pa-rule)" }}
            tickLine={false}
          />
          <YAxis
            allowDecimals={false}
            width={64}
            label={{ value: "compute units per day", angle: -90, position: "insideLeft", style: { textAnchor: "middle", fill: "var(--pa-ink-2)", fontSize: 12 } }}
            tick={{ fill: "var(--pa-ink-2)", fontSize: 12 }}
            axisLine={false}
            tickLine={false}
            tickFormatter={(n: number) => formatInt(n)}
          />
          <Tooltip content={DayTip} cursor={{ fill: "var(--pa-accent-soft)", opacity: 0.6 }} />
          <Bar dataKey="units" name="Compute units" fill="var(--pa-accent)" radius={[3, 3, 0, 0]} maxBarSize={28} isAnimationActive={false} />
        </BarChart>
      </ResponsiveContainer>
    </div>
  );
}
