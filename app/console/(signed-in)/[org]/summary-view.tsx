"use client";

import { planOf } from "@/lib/billing/plans";
import { useQuery } from "@tanstack/react-query";
import Link from "next/link";
import type { ReactNode } from "react";
import { RoleBadge } from "@/components/console/badges";
import { useCurrentOrg } from "@/components/console/org-context";
import { PageHeader } from "@/components/console/page-header";
import { sectionsFor } from "@/components/console/shell";
import { panel } from "@/components/console/ui";
import { consoleApi } from "@/lib/console-client/api";
import { formatDay, formatInt, utcToday } from "@/lib/console-client/format";
import { mayOpen } from "@/lib/console-client/hooks";
import { queryKeys } from "@/lib/console-client/query-keys";

function Stat({ label, children, foot }: { label: string; children: ReactNode; foot?: ReactNode }) {
  return (
    <div className={`${panel} p-4`}>
      <dt className="text-xs font-medium tracking-wide text-ink-2 uppercase">{label}</dt>
      <dd className="mt-1">
        <span className="block text-2xl font-semibold tracking-tight tabular-nums">{children}</span>
        {foot ? <span className="mt-1 block text-sm text-ink-2">{foot}</span> : null}
      </dd>
    </div>
  );
}

const Pending = () => (
  <span className="text-ink-2" data-loading="">
    <span aria-hidden="true">…</span>
    <span className="sr-only">loading</span>
  </span>
);

/** /console/{org}: the plan, this calendar month's metered units, and the way into each section. */
export function OrgSummaryView() {
  const org = useCurrentOrg();
  const to = utcToday();
  const from = `${to.slice(0, 7)}-01`;
  const usage = useQuery({ queryKey: queryKeys.usage(org.slug, from, to), queryFn: ({ signal }) => consoleApi.usage(org.slug, from, to, signal) });
  const canKeys = mayOpen("keys", org.role);
  const keys = useQuery({ queryKey: queryKeys.keys(org.slug), queryFn: ({ signal }) => consoleApi.keys(org.slug, signal), enabled: canKeys });
  const members = useQuery({ queryKey: queryKeys.members(org.slug), queryFn: ({ signal }) => consoleApi.members(org.slug, signal) });
  const liveKeys = keys.data?.keys.filter((k) => k.state === "active" || k.state === "expiring").length;

  return (
    <div className="flex flex-col gap-8">
      <PageHeader
        eyebrow="Summary"
        title={org.name}
        lead={
          <>
            Your role here is <RoleBadge role={org.role} />. Slug <code className="pa-code">{org.slug}</code>.
          </>
        }
      />

      <section aria-labelledby="month-heading">
        <h2 id="month-heading" className="text-lg font-semibold">
          This month so far{" "}
          <span className="text-sm font-normal text-ink-2">
            ({formatDay(from, true)} – {formatDay(to, true)}, UTC)
          </span>
        </h2>
        <dl className="mt-3 grid gap-3 sm:grid-cols-2 xl:grid-cols-4">
          <Stat label="Plan" foot={`${formatInt(planOf(org.plan).includedUnits)} live units a month`}>
            {planOf(org.plan).name}
          </Stat>
          <Stat label="Compute units" foot={usage.data ? `${formatInt(usage.data.totals.calls)} calls` : usage.isError ? "could not load usage" : undefined}>
            {usage.data ? formatInt(usage.data.totals.units) : usage.isError ? "—" : <Pending />}
          </Stat>
          {canKeys ? (
            <Stat label={org.role === "owner" ? "Usable keys" : "Your usable keys"} foot="active or in a rotation overlap">
              {liveKeys !== undefined ? formatInt(liveKeys) : keys.isError ? "—" : <Pending />}
            </Stat>
          ) : null}
          <Stat label="Members" foot={members.data && members.data.invitations.length > 0 ? `${members.data.invitations.length} invitation(s) pending` : undefined}>
            {members.data ? formatInt(members.data.members.length) : members.isError ? "—" : <Pending />}
          </Stat>
        </dl>
      </section>

      <section aria-labelledby="go-heading">
        <h2 id="go-heading" className="text-lg font-semibold">
          Sections
        </h2>
        <ul className="mt-3 grid gap-3 sm:grid-cols-2 xl:grid-cols-3">
          {sectionsFor(org.role)
            .filter((s) => s.segment !== "")
            .map(({ segment, label, hint, Icon }) => (
              <li key={segment}>
                <Link
                  href={`/console/${org.slug}/${segment}`}
                  className={`${panel} group flex h-full items-start gap-3 p-4 text-ink no-underline hover:border-accent/60 hover:bg-accent-soft/40`}
                >
                  <span className="mt-0.5 flex h-9 w-9 shrink-0 items-center justify-center rounded-md bg-sunken text-accent">
                    <Icon className="h-5 w-5" />
                  </span>
                  <span>
                    <span className="block font-semibold group-hover:underline">{label}</span>
                    <span className="block text-sm text-ink-2">{hint}</span>
                  </span>
                </Link>
              </li>
            ))}
        </ul>
      </section>
    </div>
  );
}
