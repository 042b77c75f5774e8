"use client";

import { keepPreviousData, useQuery } from "@tanstack/react-query";
import Link from "next/link";
import { useId, useState } from "react";
import { CursorPager, useCursorPages } from "@/components/console/cursor-pages";
import { SectionGate, useCurrentOrg } from "@/components/console/org-context";
import { PageHeader } from "@/components/console/page-header";
import { Email } from "@/components/console/email";
import { Empty, LoadError, Loading } from "@/components/console/states";
import { labelBase, panel, selectBase, tableHead } from "@/components/console/ui";
import { consoleApi } from "@/lib/console-client/api";
import { formatDateTime, formatRelative } from "@/lib/console-client/format";
import { queryKeys } from "@/lib/console-client/query-keys";
import type { AuditEntry } from "@/lib/console-client/types";

/** Every action the console, the operator CLI and the demo seed write, in plain words (the filter's choices). */
const ACTIONS: Record<string, string> = {
  "org.created": "created the organisation",
  "key.created": "created a key",
  "key.rotated": "rotated a key",
  "key.revoked": "revoked a key",
  "bench.credential_issued": "received a bench credential",
  "simulation.started": "started a simulation",
  "simulation.cancelled": "cancelled a simulation",
  "member.invited": "invited someone",
  "invitation.revoked": "withdrew an invitation",
  "member.joined": "joined",
  "member.role_changed": "changed a role",
  "member.removed": "removed a member",
  "org.ownership_transferred": "handed over ownership",
};

const PAGE_SIZES = [10, 25, 50, 100] as const;

/** The server writes the sentence; here its names become links and its moments local times. */
function Sentence({ parts }: { parts: AuditEntry["sentence"] }) {
  return (
    <p className="leading-relaxed">
      {parts.map((p, i) => {
        if (typeof p === "string") return p;
        if ("at" in p)
          return (
            <time key={i} dateTime={p.at} className="whitespace-nowrap">
              {formatDateTime(p.at)}
            </time>
          );
        const body = p.style === "code" ? <code className="font-mono text-[0.8125rem]">{p.text}</code> : p.style === "email" ? (
            <span data-address="">
              <Email address={p.text} />
            </span>
          ) : (
            p.text
          );
        return p.href ? (
          <Link key={i} href={p.href} className="font-medium">
            {body}
          </Link>
        ) : (
          <span key={i} className={p.style ? undefined : "font-medium"}>
            {body}
          </span>
        );
      })}
    </p>
  );
}

function Ledger({ org }: { org: string }) {
  const [actor, setActor] = useState("");
  const [action, setAction] = useState("");
  const [limit, setLimit] = useState<number>(25);
  const pages = useCursorPages();
  const { cursor, restart, page } = pages;
  const ids = { actor: useId(), action: useId(), limit: useId() };

  const members = useQuery({ queryKey: queryKeys.members(org), queryFn: ({ signal }) => consoleApi.members(org, signal) });
  const filters = { actor: actor || undefined, action: action || undefined, cursor, limit };
  const audit = useQuery({
    queryKey: queryKeys.audit(org, filters),
    queryFn: ({ signal }) => consoleApi.audit(org, filters, signal),
    placeholderData: keepPreviousData,
  });


  return (
    <div className="flex flex-col gap-4">
      <form className={`${panel} grid gap-3 p-4 sm:grid-cols-[minmax(0,1fr)_minmax(0,1fr)_8rem]`} onSubmit={(e) => e.preventDefault()} aria-label="Filter the ledger">
        <div>
          <label htmlFor={ids.actor} className={labelBase}>
            Who
          </label>
          <select
            id={ids.actor}
            className={`${selectBase} mt-1`}
            value={actor}
            onChange={(e) => {
              setActor(e.target.value);
              restart();
            }}
          >
            <option value="">Anyone</option>
            {(members.data?.members ?? []).map((m) => (
              <option key={m.userId} value={`user:${m.userId}`}>
                {m.name ? `${m.name} (${m.email})` : m.email}
              </option>
            ))}
            <option value="cli">Operator CLI</option>
            <option value="system">System</option>
          </select>
        </div>
        <div>
          <label htmlFor={ids.action} className={labelBase}>
            Action
          </label>
          <select
            id={ids.action}
            className={`${selectBase} mt-1`}
            value={action}
            onChange={(e) => {
              setAction(e.target.value);
              restart();
            }}
          >
            <option value="">Any action</option>
            {Object.entries(ACTIONS).map(([code, label]) => (
              <option key={code} value={code}>
                {label} ({code})
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor={ids.limit} className={labelBase}>
            Per page
          </label>
          <select
            id={ids.limit}
            className={`${selectBase} mt-1`}
            value={limit}
            onChange={(e) => {
              setLimit(Number(e.target.value));
              restart();
            }}
          >
            {PAGE_SIZES.map((n) => (
              <option key={n} value={n}>
                {n}
              </option>
            ))}
          </select>
        </div>
      </form>

      {audit.isPending ? (
        <Loading label="Loading the ledger" rows={6} />
      ) : audit.isError ? (
        <LoadError error={audit.error} onRetry={() => void audit.refetch()} what="the ledger" />
      ) : audit.data.entries.length === 0 ? (
        <Empty title={actor || action ? "Nothing matches these filters" : "The ledger is empty"}>
          <p>{actor || action ? "Try another person or action, or clear the filters." : "Changes to keys and people are written here as they happen."}</p>
        </Empty>
      ) : (
        <div className={`${panel} overflow-hidden`}>
          <div className="overflow-x-auto">
            <table className="w-full border-collapse text-sm max-md:block">
              <caption className="sr-only">Ledger entries, newest first{page > 0 ? `, page ${page + 1}` : ""}</caption>
              <thead className={`${tableHead} max-md:sr-only`}>
                <tr>
                  <th scope="col" className="w-44 px-3 py-2 font-medium">When</th>
                  <th scope="col" className="px-3 py-2 font-medium">What happened</th>
                </tr>
              </thead>
              <tbody className={`max-md:block ${audit.isPlaceholderData ? "opacity-60" : ""}`}>
                {audit.data.entries.map((e) => (
                  <tr key={e.id} className="border-t border-rule align-top max-md:block max-md:px-3 max-md:py-2.5">
                    <td className="px-3 py-2.5 max-md:flex max-md:flex-wrap max-md:items-baseline max-md:gap-x-2 max-md:p-0">
                      <time dateTime={e.at} className="whitespace-nowrap md:block">
                        {formatDateTime(e.at)}
                      </time>
                      <span className="text-xs whitespace-nowrap text-ink-2 md:block">
                        {formatRelative(e.at)} · <code className="font-mono">{e.action}</code>
                      </span>
                    </td>
                    <td className="px-3 py-2.5 max-md:block max-md:p-0 max-md:pt-1">
                      <Sentence parts={e.sentence} />
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <CursorPager
            pages={pages}
            nextCursor={audit.data.nextCursor}
            fetching={audit.isFetching}
            stale={audit.isPlaceholderData}
            summary={` · ${audit.data.entries.length} entr${audit.data.entries.length === 1 ? "y" : "ies"}`}
            className="flex flex-wrap items-center justify-between gap-2 border-t border-rule bg-sunken/50 px-3 py-2 text-sm text-ink-2"
          />
        </div>
      )}
    </div>
  );
}

/** /console/{org}/audit: owners only. */
export function AuditView() {
  const org = useCurrentOrg();
  return (
    <SectionGate
      section="audit"
      heading={<PageHeader eyebrow="Ledger" title="Activity ledger" />}
      deniedTitle="The ledger is for owners"
      denied={<p>Owners see who changed which key or member, and when. Ask an owner if you need an entry looked up.</p>}
    >
      <div className="flex flex-col gap-6">
        <PageHeader eyebrow="Ledger" title="Activity ledger" lead="Who did what, when, to which key or member: every change, newest first. Entries cannot be edited." />
        <Ledger org={org.slug} />
      </div>
    </SectionGate>
  );
}
