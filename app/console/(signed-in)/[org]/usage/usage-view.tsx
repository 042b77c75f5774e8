"use client";

import { keepPreviousData, useQuery } from "@tanstack/react-query";
import { useId, useMemo, useState } from "react";
import { DataTable, type Column } from "@/components/console/data-table";
import { IconDownload } from "@/components/console/icons";
import { useCurrentOrg } from "@/components/console/org-context";
import { PageHeader } from "@/components/console/page-header";
import { Empty, LoadError, Loading } from "@/components/console/states";
import { buttonPrimary, buttonSecondary, errorText, inputBase, panel } from "@/components/console/ui";
import { consoleApi } from "@/lib/console-client/api";
import { addDays, daysBetween, formatDay, formatInt, utcToday } from "@/lib/console-client/format";
import { queryKeys } from "@/lib/console-client/query-keys";
import type { UsageReport } from "@/lib/console-client/types";
import { UsageChart } from "./usage-chart";

const MAX_DAYS = 400;
const PRESETS = [7, 30, 90] as const;
type Preset = (typeof PRESETS)[number] | "custom";

type EndpointRow = UsageReport["byEndpoint"][number];
type KeyRow = UsageReport["byKey"][number];

const num = (n: number) => formatInt(n);

const endpointColumns: Column<EndpointRow>[] = [
  { id: "endpoint", accessorKey: "endpoint", header: "Endpoint", cell: (c) => <code className="font-mono text-[0.8125rem]">{c.row.original.endpoint}</code> },
  { id: "calls", accessorKey: "calls", header: "Calls", cell: (c) => num(c.row.original.calls) },
  { id: "units", accessorKey: "units", header: "Units", cell: (c) => num(c.row.original.units) },
  { id: "errors", accessorKey: "errors", header: "Errors", cell: (c) => num(c.row.original.errors) },
];

const keyColumns: Column<KeyRow>[] = [
  {
    id: "key",
    accessorFn: (r) => r.name ?? r.prefix ?? "",
    header: "Key",
    cell: (c) => {
      const r = c.row.original;
      if (r.prefix === null && r.name === null) return <span className="text-ink-2">a deleted key</span>;
      return (
        <span>
          <span className="font-medium">{r.name ?? "unnamed"}</span> <code className="font-mono text-xs text-ink-2">{r.prefix}…</code>
        </span>
      );
    },
  },
  { id: "calls", accessorKey: "calls", header: "Calls", cell: (c) => num(c.row.original.calls) },
  { id: "units", accessorKey: "units", header: "Units", cell: (c) => num(c.row.original.units) },
];

function periodOf(preset: Preset, custom: { from: string; to: string }) {
  if (preset === "custom") return custom;
  const to = utcToday();
  return { from: addDays(to, 1 - preset), to };
}

function CustomPeriod({ initial, onApply }: { initial: { from: string; to: string }; onApply: (p: { from: string; to: string }) => void }) {
  const [from, setFrom] = useState(initial.from);
  const [to, setTo] = useState(initial.to);
  const fromId = useId();
  const toId = useId();
  const errId = useId();
  const problem = !from || !to ? "Pick both days." : from > to ? "The first day is after the last." : daysBetween(from, to) > MAX_DAYS ? `At most ${MAX_DAYS} days.` : null;
  return (
    <form
      className="flex flex-wrap items-end gap-3"
      onSubmit={(e) => {
        e.preventDefault();
        if (!problem) onApply({ from, to });
      }}
    >
      <div>
        <label htmlFor={fromId} className="block text-xs font-medium text-ink-2">
          From (UTC)
        </label>
        <input id={fromId} type="date" value={from} max={to || undefined} onChange={(e) => setFrom(e.target.value)} className={`${inputBase} mt-1 w-44`} aria-describedby={problem ? errId : undefined} />
      </div>
      <div>
        <label htmlFor={toId} className="block text-xs font-medium text-ink-2">
          To (UTC)
        </label>
        <input id={toId} type="date" value={to} min={from || undefined} onChange={(e) => setTo(e.target.value)} className={`${inputBase} mt-1 w-44`} aria-describedby={problem ? errId : undefined} />
      </div>
      <button type="submit" className={buttonPrimary} disabled={problem !== null}>
        Show
      </button>
      {problem ? (
        <p id={errId} className={`${errorText} w-full`}>
          {problem}
        </p>
      ) : null}
    </form>
  );
}

/** /console/{org}/usage: metered compute units by day, endpoint and key, for any role. */
export function UsageView() {
  const org = useCurrentOrg();
  const [preset, setPreset] = useState<Preset>(30);
  const [custom, setCustom] = useState(() => {
    const to = utcToday();
    return { from: addDays(to, -13), to };
  });
  const period = periodOf(preset, custom);
  const usage = useQuery({
    queryKey: queryKeys.usage(org.slug, period.from, period.to),
    queryFn: ({ signal }) => consoleApi.usage(org.slug, period.from, period.to, signal),
    placeholderData: keepPreviousData,
  });
  const groupName = useId();
  const d = usage.data;
  const errorsTotal = useMemo(() => d?.totals.errors ?? d?.daily.reduce((s, x) => s + x.errors, 0) ?? 0, [d]);
  const busiest = useMemo(() => (d ? d.daily.reduce<UsageReport["daily"][number] | null>((b, x) => (!b || x.units > b.units ? x : b), null) : null), [d]);

  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        eyebrow="Meter"
        title="Usage"
        lead="Compute units the organisation's keys used, by UTC day, endpoint and key. Errors are calls answered with a status of 400 or more: they are counted but cost no units."
        actions={
          <a href={consoleApi.usageCsvHref(org.slug, period.from, period.to)} download className={buttonSecondary}>
            <IconDownload className="h-4 w-4" />
            Export CSV
          </a>
        }
      />

      <section aria-label="Period" className={`${panel} flex flex-col gap-3 p-4`}>
        <fieldset>
          <legend className="text-sm font-medium">Period</legend>
          <div className="mt-2 flex flex-wrap gap-2">
            {[...PRESETS, "custom" as const].map((p) => (
              <label
                key={p}
                className="cursor-pointer rounded-full border border-ink-2/50 px-3 py-1 text-sm has-[:checked]:border-accent has-[:checked]:bg-accent has-[:checked]:text-accent-ink has-[:focus-visible]:outline has-[:focus-visible]:outline-3 has-[:focus-visible]:outline-offset-2 has-[:focus-visible]:outline-focus"
              >
                <input type="radio" name={groupName} value={String(p)} checked={preset === p} onChange={() => setPreset(p)} className="sr-only" />
                {p === "custom" ? "Custom…" : `Last ${p} days`}
              </label>
            ))}
          </div>
        </fieldset>
        {preset === "custom" ? <CustomPeriod initial={custom} onApply={setCustom} /> : null}
        <p className="text-sm text-ink-2" aria-live="polite">
          {formatDay(period.from)} – {formatDay(period.to)} ({daysBetween(period.from, period.to)} days, UTC)
          {usage.isFetching && d ? " · updating…" : ""}
        </p>
      </section>

      {usage.isPending ? (
        <Loading label="Loading usage" rows={5} />
      ) : usage.isError ? (
        <LoadError error={usage.error} onRetry={() => void usage.refetch()} what="the usage" />
      ) : (
        <>
          <dl className="grid gap-3 sm:grid-cols-3">
            {(
              [
                ["Compute units", d!.totals.units],
                ["Calls", d!.totals.calls],
                ["Errors", errorsTotal],
              ] as const
            ).map(([label, value]) => (
              <div key={label} className={`${panel} p-4`}>
                <dt className="text-xs font-medium tracking-wide text-ink-2 uppercase">{label}</dt>
                <dd className="mt-1 text-2xl font-semibold tabular-nums">{formatInt(value)}</dd>
              </div>
            ))}
          </dl>

          {d!.totals.calls === 0 ? (
            <Empty title="No calls in this period">
              <p>Nothing was metered between these days. Try a longer period, or run an endpoint from the Bench.</p>
            </Empty>
          ) : (
            <>
              <section aria-labelledby="daily-heading" className={`${panel} p-4`}>
                <h2 id="daily-heading" className="font-semibold">
                  Units by day
                </h2>
                <p className="text-sm text-ink-2">
                  {busiest && busiest.units > 0 ? `Busiest day: ${formatDay(busiest.day)} with ${formatInt(busiest.units)} units.` : null}
                </p>
                <div className="mt-3" aria-hidden="true">
                  <UsageChart daily={d!.daily} />
                </div>
                <details className="mt-2 text-sm">
                  <summary className="cursor-pointer text-accent">The same figures as a table</summary>
                  <div className="mt-2 max-h-72 overflow-auto rounded border border-rule">
                    <table className="w-full text-sm">
                      <caption className="sr-only">Usage by day</caption>
                      <thead className="sticky top-0 bg-sunken text-left text-xs text-ink-2">
                        <tr>
                          <th scope="col" className="px-3 py-1.5 font-medium">Day (UTC)</th>
                          <th scope="col" className="px-3 py-1.5 text-right font-medium">Units</th>
                          <th scope="col" className="px-3 py-1.5 text-right font-medium">Calls</th>
                          <th scope="col" className="px-3 py-1.5 text-right font-medium">Errors</th>
                        </tr>
                      </thead>
                      <tbody>
                        {d!.daily.map((x) => (
                          <tr key={x.day} className="border-t border-rule">
                            <th scope="row" className="px-3 py-1 text-left font-normal">{formatDay(x.day)}</th>
                            <td className="px-3 py-1 text-right font-mono tabular-nums">{formatInt(x.units)}</td>
                            <td className="px-3 py-1 text-right font-mono tabular-nums">{formatInt(x.calls)}</td>
                            <td className="px-3 py-1 text-right font-mono tabular-nums">{formatInt(x.errors)}</td>
                          </tr>
                        ))}
                      </tbody>
                    </table>
                  </div>
                </details>
              </section>

              <div className="grid gap-6 xl:grid-cols-2">
                <section aria-labelledby="by-endpoint-heading" className="flex min-w-0 flex-col gap-2">
                  <h2 id="by-endpoint-heading" className="font-semibold">
                    By endpoint
                  </h2>
                  <DataTable caption="Usage by endpoint" columns={endpointColumns} data={d!.byEndpoint} initialSort={{ id: "units", desc: true }} numeric={["calls", "units", "errors"]} />
                </section>
                <section aria-labelledby="by-key-heading" className="flex min-w-0 flex-col gap-2">
                  <h2 id="by-key-heading" className="font-semibold">
                    By key
                  </h2>
                  <DataTable caption="Usage by key" columns={keyColumns} data={d!.byKey} initialSort={{ id: "units", desc: true }} numeric={["calls", "units"]} />
                </section>
              </div>
            </>
          )}
        </>
      )}
      <p className="text-xs text-ink-2">
        The CSV has one line per day, endpoint and key: <code className="font-mono break-all">day,endpoint,key_prefix,calls,units,errors</code>, the same names as the fields of <code className="font-mono">GET /api/v1/usage</code>.{" "}
        <a href={consoleApi.usageCsvHref(org.slug, period.from, period.to)} download>
          Download it for this period
        </a>
        .
      </p>
    </div>
  );
}
