"use client";

import { keepPreviousData, useQuery } from "@tanstack/react-query";
import Link from "next/link";
import { useId, useRef, useState, type ReactNode } from "react";
import { CursorPager, useCursorPages } from "@/components/console/cursor-pages";
import { CodePanel } from "@/components/console/code-panel";
import { SectionGate, useCurrentOrg } from "@/components/console/org-context";
import { PageHeader } from "@/components/console/page-header";
import { Empty, LoadError, Loading } from "@/components/console/states";
import { buttonSecondary, labelBase, panel, selectBase } from "@/components/console/ui";
import { consoleApi } from "@/lib/console-client/api";
import { evidenceWords, formatConfidence, formatCount, formatRate, intervalWords, targetWords } from "@/lib/console-client/claim-words";
import { formatDateTime, formatRelative } from "@/lib/console-client/format";
import { queryKeys } from "@/lib/console-client/query-keys";
import { curlCommand } from "@/lib/console-client/snippets";
import type { ClaimItem, ClaimLabel, ClaimVerdict } from "@/lib/console-client/types";
import { VerdictBadge } from "./verdict-badge";

const VERDICTS: ClaimVerdict[] = ["supported", "refuted", "inconclusive", "pending"];
const PAGE_SIZE = 20;

/** The presentation's verdict as the table knows it: a simulated claim is "pending" until its job decides it. */
const verdictOf = (c: ClaimItem): ClaimVerdict => c.verdict;

function LabelList({ labels, selected, onSelect }: { labels: ClaimLabel[]; selected: string | undefined; onSelect: (label: string | undefined) => void }) {
  const total = labels.reduce((a, l) => a + l.total, 0);
  const item = (active: boolean) =>
    [
      "flex w-full flex-col gap-1 rounded-md px-3 py-2 text-left text-sm",
      active ? "bg-surface font-semibold shadow-sm ring-1 ring-rule" : "text-ink-2 hover:bg-surface/70 hover:text-ink",
    ].join(" ");
  return (
    <nav aria-label="Labels" className="rounded-lg border border-rule bg-sunken/60 p-2 lg:sticky lg:top-6 lg:self-start">
      <p className="px-3 pt-1 pb-2 text-xs font-medium tracking-wide text-ink-2 uppercase">Labels</p>
      <ul className="flex max-h-64 flex-col gap-0.5 overflow-y-auto lg:max-h-[70vh]">
        <li>
          <button type="button" className={item(selected === undefined)} aria-pressed={selected === undefined} onClick={() => onSelect(undefined)}>
            <span>All labels</span>
            <span className="text-xs font-normal text-ink-2">
              {labels.length} label{labels.length === 1 ? "" : "s"} · {formatCount(total)} claim{total === 1 ? "" : "s"}
            </span>
          </button>
        </li>
        {labels.map((l) => {
          const active = selected === l.label;
          return (
            <li key={l.label}>
              <button type="button" className={item(active)} aria-pressed={active} onClick={() => onSelect(l.label)}>
                <span className="font-mono text-[0.8125rem] break-all text-ink">{l.label}</span>
                <span className="flex flex-wrap items-center gap-x-2 gap-y-1 text-xs font-normal text-ink-2">
                  <VerdictBadge verdict={l.latestVerdict} />
                  <span>
                    {l.total} claim{l.total === 1 ? "" : "s"} · <time dateTime={l.latestAt}>{formatRelative(l.latestAt)}</time>
                  </span>
                </span>
              </button>
            </li>
          );
        })}
      </ul>
    </nav>
  );
}

function Row({ term, children }: { term: string; children: ReactNode }) {
  return (
    <div className="sm:grid sm:grid-cols-[11rem_minmax(0,1fr)] sm:gap-3">
      <dt className="text-xs font-medium tracking-wide text-ink-2 uppercase sm:pt-0.5">{term}</dt>
      <dd className="min-w-0 break-words">{children}</dd>
    </div>
  );
}

function ClaimCard({ c, org, showLabel }: { c: ClaimItem; org: string; showLabel: boolean }) {
  const verdict = verdictOf(c);
  const unit = c.target.metric === "ber" ? "bits" : "frames";
  const rateKind = c.exact ? "exact" : c.mode === "measured" ? "observed" : "an estimate";
  return (
    <article className={`${panel} p-4`} aria-label={`${verdict} claim ${c.id}`}>
      <header className="flex flex-wrap items-center gap-x-3 gap-y-1.5">
        <VerdictBadge verdict={verdict} size="md" />
        {showLabel ? <span className="font-mono text-[0.8125rem] break-all">{c.label}</span> : null}
        <span className="text-sm text-ink-2">
          <time dateTime={c.createdAt}>{formatDateTime(c.createdAt)}</time> · {formatRelative(c.createdAt)}
        </span>
      </header>
      {c.statement ? <p className="mt-2 border-l-2 border-brass pl-3 text-sm italic">{c.statement}</p> : null}
      <dl className="mt-3 flex flex-col gap-2 text-sm">
        <Row term="Target">
          {targetWords(c.target)} at {formatConfidence(c.confidence)} confidence
        </Row>
        <Row term="Evidence">{evidenceWords(c)}</Row>
        {c.rate !== null ? (
          <Row term="Rate">
            {formatRate(c.rate)} <span className="text-ink-2">({rateKind})</span>
          </Row>
        ) : null}
        {c.interval !== null ? (
          <Row term="Interval">
            {intervalWords({ interval: c.interval, exact: c.exact })}
            <span className="block text-xs text-ink-2">{c.interval.method}</span>
          </Row>
        ) : null}
        {c.moreTrialsToDecide !== undefined ? (
          <Row term="To decide">
            {formatCount(c.moreTrialsToDecide)} more error-free {unit}
          </Row>
        ) : null}
        {c.jobId ? (
          <Row term="Simulation">
            <Link href={`/console/${org}/simulations/${c.jobId}`} className="font-mono text-[0.8125rem]">
              {c.jobId}
            </Link>
          </Row>
        ) : null}
      </dl>
      <p className="mt-3 leading-relaxed">{c.reasoning}</p>
      <p className="mt-2 font-mono text-xs text-ink-2">{c.id}</p>
    </article>
  );
}

/** What a newcomer needs to make their first claim: the call, and the CI command. */
function NoClaimsYet() {
  const origin = typeof window === "undefined" ? "" : window.location.origin;
  const curl = curlCommand({
    method: "POST",
    path: "/claims",
    origin,
    input: { label: "fw-3.1.0", target: { metric: "ber", atMost: 1e-9 }, evidence: { mode: "measured", trials: 5e9, errors: 2 } },
  });
  return (
    <Empty title="No claims yet">
      <div className="flex flex-col gap-3 text-left">
        <p>
          A claim says what error rate a build keeps, with the evidence: counts from a test rig, or a code and channel the API has a formula for. Make one with a key
          that has the <code className="pa-code">claims</code> scope, and it appears here under its label with its verdict:
        </p>
        <CodePanel label="curl" text={curl} />
        <p>
          From a CI job, list the claims in a file and check them all at once; the command fails the build on a refuted claim (set <code className="pa-code">PARITAS_KEY</code> first):
        </p>
        <CodePanel label="shell" text="npx paritas-claims check claims.yaml --junit claims.xml" />
        <p>
          The <Link href="/docs">API reference</Link> lists every kind of evidence.
        </p>
      </div>
    </Empty>
  );
}

function Claims({ org }: { org: string }) {
  const [label, setLabel] = useState<string | undefined>(undefined);
  const [verdict, setVerdict] = useState<ClaimVerdict | undefined>(undefined);
  const pages = useCursorPages();
  const filters = { label, verdict, cursor: pages.cursor, limit: PAGE_SIZE };
  const verdictId = useId();
  const history = useRef<HTMLElement>(null);
  const claims = useQuery({ queryKey: queryKeys.claims(org, filters), queryFn: ({ signal }) => consoleApi.claims(org, filters, signal), placeholderData: keepPreviousData });

  if (claims.isPending) return <Loading label="Loading the claims" rows={5} />;
  if (claims.isError) return <LoadError error={claims.error} onRetry={() => void claims.refetch()} what="the claims" />;
  const data = claims.data;
  if (data.labels.length === 0) return <NoClaimsYet />;
  const current = data.labels.find((l) => l.label === label);

  return (
    <div className="grid gap-6 lg:grid-cols-[17rem_minmax(0,1fr)]">
      <LabelList
        labels={data.labels}
        selected={label}
        onSelect={(l) => {
          setLabel(l);
          pages.restart();
          // Below the lg breakpoint the labels sit above the history: bring the history into view.
          if (!window.matchMedia("(min-width: 64rem)").matches) history.current?.scrollIntoView({ block: "start" });
        }}
      />
      <section ref={history} aria-labelledby={`${verdictId}-title`} className="flex min-w-0 scroll-mt-4 flex-col gap-4">
        <div className="flex flex-wrap items-end justify-between gap-3">
          <div className="min-w-0">
            <h2 id={`${verdictId}-title`} className="text-lg font-semibold break-all">
              {label ? <span className="font-mono">{label}</span> : "Every label"}
            </h2>
            <p className="text-sm text-ink-2">
              {current
                ? `${current.total} claim${current.total === 1 ? "" : "s"}: ${VERDICTS.filter((v) => current.counts[v] > 0)
                    .map((v) => `${current.counts[v]} ${v}`)
                    .join(", ")}`
                : "Newest first, across every label."}
            </p>
          </div>
          <div className="w-full sm:w-52">
            <label htmlFor={verdictId} className={labelBase}>
              Verdict
            </label>
            <select
              id={verdictId}
              className={`${selectBase} mt-1`}
              value={verdict ?? ""}
              onChange={(e) => {
                setVerdict(e.target.value === "" ? undefined : (e.target.value as ClaimVerdict));
                pages.restart();
              }}
            >
              <option value="">Any verdict</option>
              {VERDICTS.map((v) => (
                <option key={v} value={v}>
                  {v}
                </option>
              ))}
            </select>
          </div>
        </div>

        {data.claims.length === 0 ? (
          <Empty
            title={`No ${verdict ? `${verdict} claims` : "claims"} ${label ? "under this label" : "in this organisation"}`}
            action={
              verdict ? (
                <button type="button" className={buttonSecondary} onClick={() => setVerdict(undefined)}>
                  Show every verdict
                </button>
              ) : undefined
            }
          >
            <p>Try another verdict or label.</p>
          </Empty>
        ) : (
          <ol aria-label="Claims, newest first" className={`flex flex-col gap-3 ${claims.isPlaceholderData ? "opacity-60" : ""}`}>
            {data.claims.map((c) => (
              <li key={c.id} className="relative pl-5">
                {/* The timeline: a rule down the left with a tick per claim. */}
                <span aria-hidden="true" className="absolute top-0 bottom-[-0.75rem] left-1.5 w-px bg-rule" />
                <span aria-hidden="true" className="absolute top-5 left-0 h-3 w-3 rounded-sm border-2 border-ink-2/60 bg-paper" />
                <ClaimCard c={c} org={org} showLabel={label === undefined} />
              </li>
            ))}
          </ol>
        )}
        <CursorPager pages={pages} nextCursor={data.nextCursor} fetching={claims.isFetching} stale={claims.isPlaceholderData} />
      </section>
    </div>
  );
}

/** /console/{org}/claims: every role reads the org's claims. */
export function ClaimsView() {
  const org = useCurrentOrg();
  return (
    <SectionGate section="claims" heading={<PageHeader eyebrow="Claims" title="Error-rate claims" />} deniedTitle="Claims are not open to your role">
      <div className="flex flex-col gap-6">
        <PageHeader
          eyebrow="Claims"
          title="Error-rate claims"
          lead="Each claim made through the API, kept under its label (a firmware version, a branch, a build): its verdict, the evidence behind it, and how a label's verdicts changed over time."
        />
        <Claims org={org.slug} />
      </div>
    </SectionGate>
  );
}
