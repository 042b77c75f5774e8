"use client";

import { useQuery } from "@tanstack/react-query";
import { useId, useMemo, useState } from "react";
import { KeyStateBadge, ModeBadge } from "@/components/console/badges";
import { Email } from "@/components/console/email";
import { IconBan, IconPlus, IconRotate } from "@/components/console/icons";
import { SectionGate, useCurrentOrg } from "@/components/console/org-context";
import { PageHeader } from "@/components/console/page-header";
import { Empty, LoadError, Loading, NotForRole } from "@/components/console/states";
import { buttonPrimary, buttonQuiet, buttonQuietDanger, buttonSmall, panel, tableHead } from "@/components/console/ui";
import { consoleApi } from "@/lib/console-client/api";
import { formatDateTime, formatRelative } from "@/lib/console-client/format";
import { isProblem } from "@/lib/console-client/problem";
import { queryKeys } from "@/lib/console-client/query-keys";
import type { KeyRecord } from "@/lib/console-client/types";
import { CreateKeyDialog } from "./create-key-dialog";
import { RevokeKeyDialog } from "./revoke-key-dialog";
import { RotateKeyDialog } from "./rotate-key-dialog";

const BILLING_NOTE = (
  <p>
    The billing role sees usage, the plan and invoices, but no API keys. An owner can give you the developer role if you need keys.
  </p>
);

const ORDER = { active: 0, expiring: 1, expired: 2, revoked: 3 } as const;

function When({ iso, empty = "never" }: { iso: string | null; empty?: string }) {
  if (!iso) return <span className="text-ink-2">{empty}</span>;
  return (
    <time dateTime={iso} title={formatDateTime(iso)}>
      {formatRelative(iso)}
    </time>
  );
}

function Ends({ k }: { k: KeyRecord }) {
  if (k.revokedAt) return <span className="text-ink-2">revoked <When iso={k.revokedAt} /></span>;
  if (!k.expiresAt) return <span className="text-ink-2">no end</span>;
  return (
    <span className={k.state === "expiring" ? "font-medium text-caution-ink" : undefined}>
      <When iso={k.expiresAt} />
    </span>
  );
}

function Actions({ k, onRotate, onRevoke }: { k: KeyRecord; onRotate: () => void; onRevoke: () => void }) {
  if (k.state === "revoked" || k.state === "expired") return <span className="text-xs text-ink-2">—</span>;
  return (
    <div className="flex flex-wrap gap-1 md:flex-col md:items-start">
      {k.state === "active" ? (
        <button type="button" className={`${buttonQuiet} ${buttonSmall}`} onClick={onRotate} aria-label={`Rotate ${k.name} (${k.prefix})`}>
          <IconRotate className="h-4 w-4" />
          Rotate
        </button>
      ) : null}
      <button type="button" className={`${buttonQuietDanger} ${buttonSmall}`} onClick={onRevoke} aria-label={`Revoke ${k.name} (${k.prefix})`}>
        <IconBan className="h-4 w-4" />
        Revoke
      </button>
    </div>
  );
}

function KeyName({ k, byId, withMode = false }: { k: KeyRecord; byId: Map<number, KeyRecord>; withMode?: boolean }) {
  const from = k.rotatedFromKeyId !== null ? byId.get(k.rotatedFromKeyId) : undefined;
  return (
    <div className="min-w-0">
      <div className="flex flex-wrap items-center gap-2">
        <span className="font-medium">{k.name}</span>
        {withMode ? <ModeBadge mode={k.mode} /> : null}
      </div>
      <code className="font-mono text-xs text-ink-2">{k.prefix}…</code>
      {k.rotatedFromKeyId !== null ? (
        <span className="block text-xs text-ink-2">replaces {from ? <code className="font-mono">{from.prefix}…</code> : `key #${k.rotatedFromKeyId}`}</span>
      ) : null}
    </div>
  );
}

function KeyList({ org }: { org: string }) {
  const { role } = useCurrentOrg();
  const keys = useQuery({ queryKey: queryKeys.keys(org), queryFn: ({ signal }) => consoleApi.keys(org, signal) });
  const [creating, setCreating] = useState(false);
  const [rotating, setRotating] = useState<KeyRecord | null>(null);
  const [revoking, setRevoking] = useState<KeyRecord | null>(null);
  const [showEnded, setShowEnded] = useState(true);
  const toggleId = useId();

  const all = keys.data?.keys;
  const byId = useMemo(() => new Map((all ?? []).map((k) => [k.id, k])), [all]);
  const rows = useMemo(
    () =>
      (all ?? [])
        .filter((k) => showEnded || k.state === "active" || k.state === "expiring")
        .sort((a, b) => ORDER[a.state] - ORDER[b.state] || b.createdAt.localeCompare(a.createdAt)),
    [all, showEnded],
  );
  const ended = (all ?? []).filter((k) => k.state === "revoked" || k.state === "expired").length;

  const header = (
    <PageHeader
      eyebrow="Keys"
      title="API keys"
      lead={
        role === "owner"
          ? "Every key of the organisation. A key is shown once, when it is made; after that only its prefix. The bench's own credentials (one per person, renewed hourly, test mode) are not listed here."
          : "The keys you created. A key is shown once, when it is made; after that only its prefix. The bench uses a credential of its own, not listed here."
      }
      actions={
        <button type="button" className={buttonPrimary} onClick={() => setCreating(true)}>
          <IconPlus className="h-4 w-4" />
          Create a key
        </button>
      }
    />
  );

  let body;
  if (keys.isPending) body = <Loading label="Loading keys" />;
  else if (keys.isError && isProblem(keys.error, 403)) body = <NotForRole title="Keys are not available to your role">{BILLING_NOTE}</NotForRole>;
  else if (keys.isError) body = <LoadError error={keys.error} onRetry={() => void keys.refetch()} what="the keys" />;
  else if (keys.data.keys.length === 0)
    body = (
      <Empty
        title="No keys yet"
        action={
          <button type="button" className={buttonPrimary} onClick={() => setCreating(true)}>
            Create the first key
          </button>
        }
      >
        <p>A test key is enough to try every endpoint; create a live key for production jobs.</p>
      </Empty>
    );
  else
    body = (
      <div className="flex flex-col gap-3">
        <div className="flex flex-wrap items-center justify-between gap-2 text-sm">
          <p className="text-ink-2" aria-live="polite">
            {rows.length} of {keys.data.keys.length} key{keys.data.keys.length === 1 ? "" : "s"} shown
          </p>
          {ended > 0 ? (
            <label htmlFor={toggleId} className="flex items-center gap-2">
              <input id={toggleId} type="checkbox" checked={showEnded} onChange={(e) => setShowEnded(e.target.checked)} className="h-4 w-4 accent-accent" />
              Show revoked and expired ({ended})
            </label>
          ) : null}
        </div>

        {/* Wide screens: a table. */}
        <div className={`${panel} hidden overflow-x-auto md:block`}>
          <table className="w-full border-collapse text-sm">
            <caption className="sr-only">API keys of {org}</caption>
            <thead className={tableHead}>
              <tr>
                <th scope="col" className="px-3 py-2 font-medium">Key</th>
                <th scope="col" className="px-3 py-2 font-medium">Mode · scopes</th>
                <th scope="col" className="px-3 py-2 font-medium">Created</th>
                <th scope="col" className="px-3 py-2 font-medium">Last used</th>
                <th scope="col" className="px-3 py-2 font-medium">Ends</th>
                <th scope="col" className="px-3 py-2 font-medium">State</th>
                <th scope="col" className="px-3 py-2 font-medium"><span className="sr-only">Actions</span></th>
              </tr>
            </thead>
            <tbody>
              {rows.map((k) => (
                <tr key={k.id} className={`border-t border-rule align-top ${k.state === "revoked" || k.state === "expired" ? "text-ink-2" : ""}`}>
                  <td className="min-w-[10rem] px-3 py-2.5"><KeyName k={k} byId={byId} /></td>
                  <td className="px-3 py-2.5">
                    <ModeBadge mode={k.mode} />
                    <ul className="mt-1 flex flex-col gap-0.5">
                      {k.scopes.map((s) => (
                        <li key={s}><code className="font-mono text-xs">{s}</code></li>
                      ))}
                    </ul>
                  </td>
                  <td className="px-3 py-2.5">
                    <When iso={k.createdAt} />
                    <span className="block max-w-[12rem] text-xs text-ink-2">
                      {k.createdBy ? (
                        <>
                          by <Email address={k.createdBy.email} />
                        </>
                      ) : (
                        "by the operator CLI"
                      )}
                    </span>
                  </td>
                  <td className="px-3 py-2.5"><When iso={k.lastUsedAt} /></td>
                  <td className="px-3 py-2.5 whitespace-nowrap"><Ends k={k} /></td>
                  <td className="px-3 py-2.5"><KeyStateBadge state={k.state} /></td>
                  <td className="px-3 py-2">
                    <Actions k={k} onRotate={() => setRotating(k)} onRevoke={() => setRevoking(k)} />
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>

        {/* Narrow screens: one card a key. */}
        <ul className="flex flex-col gap-3 md:hidden" aria-label={`API keys of ${org}`}>
          {rows.map((k) => (
            <li key={k.id} className={`${panel} p-4`}>
              <div className="flex items-start justify-between gap-3">
                <KeyName k={k} byId={byId} withMode />
                <KeyStateBadge state={k.state} />
              </div>
              <dl className="mt-3 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
                <dt className="text-ink-2">Scopes</dt>
                <dd className="font-mono text-xs leading-5">{k.scopes.join(", ")}</dd>
                <dt className="text-ink-2">Created</dt>
                <dd>
                  <When iso={k.createdAt} /> <span className="text-ink-2">{k.createdBy ? `by ${k.createdBy.email}` : "by the operator CLI"}</span>
                </dd>
                <dt className="text-ink-2">Last used</dt>
                <dd><When iso={k.lastUsedAt} /></dd>
                <dt className="text-ink-2">Ends</dt>
                <dd><Ends k={k} /></dd>
              </dl>
              <div className="mt-3">
                <Actions k={k} onRotate={() => setRotating(k)} onRevoke={() => setRevoking(k)} />
              </div>
            </li>
          ))}
        </ul>
      </div>
    );

  return (
    <div className="flex flex-col gap-6">
      {header}
      {body}
      <CreateKeyDialog org={org} open={creating} onClose={() => setCreating(false)} />
      <RotateKeyDialog org={org} target={rotating} onClose={() => setRotating(null)} />
      <RevokeKeyDialog org={org} target={revoking} onClose={() => setRevoking(null)} />
    </div>
  );
}

/** /console/{org}/keys: owners and developers; billing gets a note instead (the API would answer 403). */
export function KeysView() {
  const org = useCurrentOrg();
  return (
    <SectionGate
      section="keys"
      heading={<PageHeader eyebrow="Keys" title="API keys" />}
      deniedTitle="Keys are not available to the billing role"
      denied={BILLING_NOTE}
    >
      <KeyList org={org.slug} />
    </SectionGate>
  );
}
