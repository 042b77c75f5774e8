"use client";

import { keepPreviousData, useQuery, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { useState } from "react";
import { CursorPager, useCursorPages } from "@/components/console/cursor-pages";
import { ConfirmDialog } from "@/components/console/confirm-dialog";
import { SectionGate, useCurrentOrg } from "@/components/console/org-context";
import { PageHeader } from "@/components/console/page-header";
import { Empty, LoadError, Loading } from "@/components/console/states";
import { buttonQuietDanger, buttonSmall, panel, stackBody, stackCell, stackHead, stackRow, stackTable, tableHead } from "@/components/console/ui";
import { consoleApi } from "@/lib/console-client/api";
import { formatDateTime, formatRelative } from "@/lib/console-client/format";
import { queryKeys } from "@/lib/console-client/query-keys";
import { isOver, useSimulationEvents } from "@/lib/console-client/simulation-events";
import type { Role, SimulationItem } from "@/lib/console-client/types";
import { NewSimulation } from "./new-simulation";
import { ProgressBar } from "./progress-bar";
import { channelWords, codeWords } from "./words";

const PAGE_SIZE = 20;
/** Who may start and cancel; the routes check the same. */
export const mayRun = (role: Role | undefined) => role === "owner" || role === "developer";

function Row({ sim, org, canCancel, onAsk, onEnd }: { sim: SimulationItem; org: string; canCancel: boolean; onAsk: (s: SimulationItem) => void; onEnd: () => void }) {
  const live = useSimulationEvents(org, sim.id, !isOver(sim.status), onEnd);
  const s = live ?? sim;
  const req = s.request as { code?: unknown; channel: unknown; points: number[] };
  return (
    <tr className={`border-t border-rule align-top ${stackRow}`}>
      <td className={`px-3 py-2 ${stackCell}`} data-label="Simulation">
        <Link href={`/console/${org}/simulations/${s.id}`} className="font-mono text-[0.8125rem] break-all">
          {s.id}
        </Link>
        <span className="block text-xs text-ink-2">
          {codeWords(req.code)} · {channelWords(req.channel)}
        </span>
      </td>
      <td className={`px-3 py-2 ${stackCell}`} data-label="Status">
        <span className="font-medium">{s.status}</span>
        {s.reason ? <span className="block text-xs text-ink-2">{s.reason}</span> : null}
      </td>
      <td className={`w-full min-w-40 px-3 py-2 md:w-56 ${stackCell}`} data-label="Progress">
        <ProgressBar value={s.progress} status={s.status} label={`Progress of ${s.id}`} />
      </td>
      <td className={`px-3 py-2 whitespace-nowrap ${stackCell}`} data-label="Points">
        {req.points.length}
      </td>
      <td className={`px-3 py-2 ${stackCell}`} data-label="Created">
        <time dateTime={s.createdAt} title={formatDateTime(s.createdAt)}>
          {formatRelative(s.createdAt)}
        </time>
      </td>
      <td className={`px-3 py-2 text-right ${stackCell}`} data-label="">
        {canCancel && !isOver(s.status) ? (
          <button type="button" className={`${buttonQuietDanger} ${buttonSmall}`} onClick={() => onAsk(s)} aria-label={`Cancel ${s.id}`}>
            Cancel
          </button>
        ) : null}
      </td>
    </tr>
  );
}

function List({ org, role }: { org: string; role: Role | undefined }) {
  const qc = useQueryClient();
  const pages = useCursorPages();
  const [asking, setAsking] = useState<SimulationItem | null>(null);
  const filters = { cursor: pages.cursor, limit: PAGE_SIZE };
  const list = useQuery({ queryKey: queryKeys.simulations(org, filters), queryFn: ({ signal }) => consoleApi.simulations(org, filters, signal), placeholderData: keepPreviousData });
  const refresh = () => void qc.invalidateQueries({ queryKey: ["console", "org", org, "simulations"] });

  if (list.isPending) return <Loading label="Loading the simulations" rows={4} />;
  if (list.isError) return <LoadError error={list.error} onRetry={() => void list.refetch()} what="the simulations" />;
  const sims = list.data.simulations;
  return (
    <section aria-labelledby="sim-list-title" className="flex min-w-0 flex-col gap-3">
      <h2 id="sim-list-title" className="text-lg font-semibold">
        Simulations, newest first
      </h2>
      {sims.length === 0 ? (
        <Empty title="No simulations yet">
          <p>{mayRun(role) ? "Start one with the form above: it runs as a job, and its progress shows here as it goes." : "Owners and developers start simulations; they show here with their progress."}</p>
        </Empty>
      ) : (
        <div className={`${panel} overflow-hidden`}>
          <table className={`w-full text-sm ${stackTable}`}>
            <thead className={`${tableHead} ${stackHead}`}>
              <tr>
                <th scope="col" className="px-3 py-2">
                  Simulation
                </th>
                <th scope="col" className="px-3 py-2">
                  Status
                </th>
                <th scope="col" className="px-3 py-2">
                  Progress
                </th>
                <th scope="col" className="px-3 py-2">
                  Points
                </th>
                <th scope="col" className="px-3 py-2">
                  Created
                </th>
                <th scope="col" className="px-3 py-2">
                  <span className="sr-only">Actions</span>
                </th>
              </tr>
            </thead>
            <tbody className={stackBody}>
              {sims.map((s) => (
                <Row key={s.id} sim={s} org={org} canCancel={mayRun(role)} onAsk={setAsking} onEnd={refresh} />
              ))}
            </tbody>
          </table>
        </div>
      )}
      <CursorPager pages={pages} nextCursor={list.data.nextCursor} fetching={list.isFetching} stale={list.isPlaceholderData} />
      <ConfirmDialog
        open={asking !== null}
        title="Cancel this simulation?"
        confirmLabel="Cancel simulation"
        cancelLabel="Keep it running"
        pendingLabel="Cancelling…"
        danger
        onConfirm={() => consoleApi.cancelSimulation(org, asking!.id)}
        onDone={refresh}
        onClose={() => setAsking(null)}
      >
        <p>
          <span className="font-mono">{asking?.id}</span> stops within about a second. The chunks it has finished are kept and charged; it cannot be resumed.
        </p>
      </ConfirmDialog>
    </section>
  );
}

/** /console/{org}/simulations: every role follows the org's simulations; owners and developers start and cancel them. */
export function SimulationsView() {
  const org = useCurrentOrg();
  const qc = useQueryClient();
  return (
    <SectionGate section="simulations" heading={<PageHeader eyebrow="Simulations" title="Error-rate simulations" />} deniedTitle="Simulations are not open to your role">
      <div className="flex flex-col gap-6">
        <PageHeader
          eyebrow="Simulations"
          title="Error-rate simulations"
          lead="Seeded Monte Carlo runs of a code on a channel over a sweep of operating points, run as jobs. Follow them as they run, cancel them, and read each one's bit and frame error curves."
        />
        {mayRun(org.role) ? <NewSimulation org={org.slug} onStarted={() => void qc.invalidateQueries({ queryKey: ["console", "org", org.slug, "simulations"] })} /> : null}
        <List org={org.slug} role={org.role} />
      </div>
    </SectionGate>
  );
}
