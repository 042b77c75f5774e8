"use client";

import { useQuery, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { useId, useRef, useState, type ReactNode } from "react";
import { ConfirmDialog } from "@/components/console/confirm-dialog";
import { SectionGate, useCurrentOrg } from "@/components/console/org-context";
import { PageHeader } from "@/components/console/page-header";
import { LoadError, Loading } from "@/components/console/states";
import { buttonQuietDanger, buttonSecondary, buttonSmall, panel, stackBody, stackCell, stackHead, stackRow, stackTable, tableHead } from "@/components/console/ui";
import { consoleApi } from "@/lib/console-client/api";
import { download, pngOf, standaloneSvg } from "@/lib/console-client/export-plot";
import { formatDateTime, formatInt } from "@/lib/console-client/format";
import { queryKeys } from "@/lib/console-client/query-keys";
import { isOver, useSimulationEvents } from "@/lib/console-client/simulation-events";
import { pointsCsv, shannonLimitDb } from "@/lib/console-client/sim-plot";
import type { SimulationDetail } from "@/lib/console-client/types";
import { ProgressBar } from "../progress-bar";
import { mayRun } from "../simulations-view";
import { channelWords, codeWords, pointName } from "../words";
import { ErrorRatePlot, plotModel, SERIES_WORDS } from "./error-rate-plot";

const sci = (v: number) => (v === 0 ? "0" : v >= 0.01 ? v.toPrecision(3) : v.toExponential(2));
type Rate = SimulationDetail["points"][number]["ber"];
const rateCell = (r: Rate) =>
  r === null ? (
    "—"
  ) : (
    <>
      {sci(r.estimate)}
      <span className="block text-xs text-ink-2">
        [{sci(r.clopperPearson.lower)}, {sci(r.clopperPearson.upper)}]
      </span>
    </>
  );

function Term({ term, children }: { term: string; children: ReactNode }) {
  return (
    <div className="min-w-0">
      <dt className="text-xs font-medium tracking-wide text-ink-2 uppercase">{term}</dt>
      <dd className="mt-0.5 break-words">{children}</dd>
    </div>
  );
}

function Result({ org, sim, canCancel }: { org: string; sim: SimulationDetail; canCancel: boolean }) {
  const qc = useQueryClient();
  const titleId = useId();
  const plotRef = useRef<HTMLDivElement>(null);
  const [asking, setAsking] = useState(false);
  const [exportError, setExportError] = useState<string | null>(null);
  const refresh = () => void qc.invalidateQueries({ queryKey: queryKeys.simulation(org, sim.id) });
  const live = useSimulationEvents(org, sim.id, !isOver(sim.status), refresh);
  const s: SimulationDetail = live ? { ...live, code: sim.code } : sim;
  const req = s.request as { code?: unknown; channel: { type: string }; points: number[]; confidence: number; stop: Record<string, number> };
  const awgn = req.channel.type === "awgn";
  const rate = s.code ? s.code.k / s.code.n : 1;
  const rateWords = s.code ? `R = ${s.code.k}/${s.code.n}` : "R = 1 (uncoded)";
  const limit = awgn ? shannonLimitDb(rate) : null;
  const model = plotModel(s, limit);
  const skipped = s.points.filter((p) => p.counts.infoBits > 0 && p.counts.bitErrors === 0).length;
  const legend = [
    `${s.id} · ${s.code?.name ?? "uncoded"} · ${channelWords(req.channel)} · seed ${s.seed}`,
    `${SERIES_WORDS.ber}; ${SERIES_WORDS.fer}; ${SERIES_WORDS.uncoded}`,
    `${SERIES_WORDS.bars} at ${req.confidence * 100} %${limit !== null ? `; vertical dash-dot line: Shannon limit for ${rateWords}, ${limit.toFixed(2)} dB` : ""}`,
  ];

  async function save(kind: "svg" | "png") {
    setExportError(null);
    const svg = plotRef.current?.querySelector("svg.recharts-surface");
    if (!(svg instanceof SVGSVGElement)) return setExportError("The plot is not drawn yet.");
    const file = standaloneSvg(svg, legend);
    try {
      download(`${s.id}.${kind}`, kind === "svg" ? new Blob([file.text], { type: "image/svg+xml" }) : await pngOf(file));
    } catch (e) {
      setExportError(e instanceof Error ? e.message : "The browser could not save the plot.");
    }
  }

  return (
    <div className="flex flex-col gap-6">
      <section aria-label="Summary" className={`${panel} flex flex-col gap-4 p-4`}>
        <ProgressBar value={s.progress} status={s.status} label={`Progress of ${s.id}`} />
        <dl className="grid gap-3 text-sm sm:grid-cols-2 lg:grid-cols-4">
          <Term term="Status">
            <span className="font-medium">{s.status}</span>
            {s.reason ? <span className="block text-xs text-ink-2">{s.reason}</span> : null}
          </Term>
          <Term term="Code">{s.code ? `${s.code.name} (n = ${s.code.n}, k = ${s.code.k})` : codeWords(req.code)}</Term>
          <Term term="Channel">{channelWords(req.channel)}</Term>
          <Term term="Seed">
            <span className="font-mono">{s.seed}</span>
          </Term>
          <Term term="Created">{formatDateTime(s.createdAt)}</Term>
          <Term term="Finished">{formatDateTime(s.finishedAt)}</Term>
          <Term term="Compute units">{formatInt(s.units)}</Term>
          {limit !== null ? (
            <Term term="Shannon limit">
              {limit.toFixed(2)} dB <span className="text-ink-2">for {rateWords}</span>
            </Term>
          ) : null}
        </dl>
        {canCancel && !isOver(s.status) ? (
          <div>
            <button type="button" className={`${buttonQuietDanger} ${buttonSmall}`} onClick={() => setAsking(true)}>
              Cancel simulation
            </button>
          </div>
        ) : null}
      </section>

      <section aria-labelledby={titleId} className={`${panel} p-4`}>
        <div className="flex flex-wrap items-end justify-between gap-3">
          <h2 id={titleId} className="text-lg font-semibold">
            Bit and frame error rates against {pointName(req.channel)}
          </h2>
          <div className="flex flex-wrap gap-2" role="group" aria-label="Export">
            <button type="button" className={`${buttonSecondary} ${buttonSmall}`} onClick={() => download(`${s.id}.csv`, new Blob([pointsCsv(s)], { type: "text/csv" }))}>
              CSV
            </button>
            <button type="button" className={`${buttonSecondary} ${buttonSmall}`} onClick={() => void save("svg")}>
              SVG
            </button>
            <button type="button" className={`${buttonSecondary} ${buttonSmall}`} onClick={() => void save("png")}>
              PNG
            </button>
          </div>
        </div>
        {exportError ? (
          <p role="alert" className="mt-2 text-sm">
            {exportError}
          </p>
        ) : null}
        <div className="mt-3">
          <ErrorRatePlot ref={plotRef} model={model} rateWords={rateWords} labelledBy={titleId} />
        </div>
        <ul className="mt-2 flex flex-col gap-0.5 text-xs text-ink-2" aria-label="Legend">
          <li>{SERIES_WORDS.ber}</li>
          <li>{SERIES_WORDS.fer}</li>
          <li>{SERIES_WORDS.uncoded}</li>
          <li>
            {SERIES_WORDS.bars} at {req.confidence * 100} % confidence
          </li>
          {limit !== null ? (
            <li>
              vertical dash-dot line: Shannon limit for {rateWords}, {limit.toFixed(2)} dB
            </li>
          ) : null}
        </ul>
        {skipped > 0 ? <p className="mt-2 text-xs text-ink-2">Points without errors have no place on a log axis; the table gives their counts and upper bounds.</p> : null}
        <p className="mt-2 text-xs text-ink-2">
          After decoding, bit errors come in bursts inside failed frames: for a coded link, read the FER&apos;s interval, not the BER&apos;s.
        </p>
      </section>

      <section aria-labelledby={`${titleId}-table`} className="flex min-w-0 flex-col gap-2">
        <h2 id={`${titleId}-table`} className="text-lg font-semibold">
          Counts
        </h2>
        <div className={`${panel} overflow-hidden`}>
          <table className={`w-full text-sm ${stackTable}`}>
            <caption className="sr-only">Counts and error rates for each point, with the two-sided Clopper–Pearson interval in brackets</caption>
            <thead className={`${tableHead} ${stackHead}`}>
              <tr>
                {[pointName(req.channel), "Status", "Frames", "Info bits", "Bit errors", "Frame errors", "BER", "FER", "Stopped by"].map((h) => (
                  <th key={h} scope="col" className="px-3 py-2">
                    {h}
                  </th>
                ))}
              </tr>
            </thead>
            <tbody className={stackBody}>
              {s.points.map((p, i) => (
                <tr key={i} className={`border-t border-rule align-top ${stackRow}`}>
                  <th scope="row" className={`px-3 py-2 text-left font-mono font-normal ${stackCell}`} data-label={pointName(req.channel)}>
                    {p.x}
                  </th>
                  <td className={`px-3 py-2 ${stackCell}`} data-label="Status">
                    {p.status}
                  </td>
                  <td className={`px-3 py-2 font-mono tabular-nums ${stackCell}`} data-label="Frames">
                    {formatInt(p.counts.frames)}
                  </td>
                  <td className={`px-3 py-2 font-mono tabular-nums ${stackCell}`} data-label="Info bits">
                    {formatInt(p.counts.infoBits)}
                  </td>
                  <td className={`px-3 py-2 font-mono tabular-nums ${stackCell}`} data-label="Bit errors">
                    {formatInt(p.counts.bitErrors)}
                  </td>
                  <td className={`px-3 py-2 font-mono tabular-nums ${stackCell}`} data-label="Frame errors">
                    {formatInt(p.counts.frameErrors)}
                  </td>
                  <td className={`px-3 py-2 font-mono tabular-nums ${stackCell}`} data-label="BER">
                    {rateCell(p.ber)}
                  </td>
                  <td className={`px-3 py-2 font-mono tabular-nums ${stackCell}`} data-label="FER">
                    {rateCell(p.fer)}
                  </td>
                  <td className={`px-3 py-2 ${stackCell}`} data-label="Stopped by">
                    {p.stoppedBy ?? "—"}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </section>
      <ConfirmDialog
        open={asking}
        title="Cancel this simulation?"
        confirmLabel="Cancel simulation"
        cancelLabel="Keep it running"
        pendingLabel="Cancelling…"
        danger
        onConfirm={() => consoleApi.cancelSimulation(org, s.id)}
        onDone={refresh}
        onClose={() => setAsking(false)}
      >
        <p>
          <span className="font-mono">{s.id}</span> stops within about a second. The chunks it has finished are kept and charged; it cannot be resumed.
        </p>
      </ConfirmDialog>
    </div>
  );
}

/** /console/{org}/simulations/{id}: one simulation's progress, curves, counts and exports. Claims link here by job id. */
export function SimulationResult({ id }: { id: string }) {
  const org = useCurrentOrg();
  const sim = useQuery({ queryKey: queryKeys.simulation(org.slug, id), queryFn: ({ signal }) => consoleApi.simulation(org.slug, id, signal) });
  const back = (
    <Link href={`/console/${org.slug}/simulations`} className="text-sm">
      ← All simulations
    </Link>
  );
  return (
    <SectionGate section="simulations" heading={<PageHeader eyebrow="Simulation" title={id} />} deniedTitle="Simulations are not open to your role">
      <div className="flex min-w-0 flex-col gap-6">
        {back}
        <PageHeader eyebrow="Simulation" title={id} lead={sim.data ? `${codeWords(sim.data.simulation.request.code)} on the ${channelWords(sim.data.simulation.request.channel)}` : undefined} />
        {sim.isPending ? <Loading label="Loading the simulation" rows={4} /> : null}
        {sim.isError ? <LoadError error={sim.error} onRetry={() => void sim.refetch()} what="this simulation" /> : null}
        {sim.data ? <Result org={org.slug} sim={sim.data.simulation} canCancel={mayRun(org.role)} /> : null}
      </div>
    </SectionGate>
  );
}
