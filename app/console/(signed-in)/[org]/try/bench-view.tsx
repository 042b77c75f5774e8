"use client";

import { useMutation, useQuery } from "@tanstack/react-query";
import { useId, useMemo, useState } from "react";
import { InlineCode } from "@/components/inline-code";
import { SectionGate, useCurrentOrg } from "@/components/console/org-context";
import { PageHeader } from "@/components/console/page-header";
import { ProblemView } from "@/components/console/problem-view";
import { Empty, LoadError, Loading } from "@/components/console/states";
import { panel, selectBase } from "@/components/console/ui";
import { consoleApi } from "@/lib/console-client/api";
import { isProblemBody, toProblem, type FieldProblem } from "@/lib/console-client/problem";
import { queryKeys } from "@/lib/console-client/query-keys";
import type { EndpointInfo } from "@/lib/console-client/types";
import { EndpointForm } from "./endpoint-form";
import { ResultView } from "./result-view";
import { apiPath, runEndpoint, type RunResult } from "./run";

function groupByTag(list: EndpointInfo[]): [string, EndpointInfo[]][] {
  const groups = new Map<string, EndpointInfo[]>();
  for (const e of list) {
    const tag = e.tag ?? "Endpoints";
    groups.set(tag, [...(groups.get(tag) ?? []), e]);
  }
  return [...groups];
}

function EndpointList({ groups, selected, onSelect }: { groups: [string, EndpointInfo[]][]; selected: string; onSelect: (id: string) => void }) {
  return (
    <nav aria-label="Endpoints" className="hidden xl:block">
      {groups.map(([tag, list]) => (
        <div key={tag} className="mb-4">
          <h2 className="px-2 text-xs font-medium tracking-wide text-ink-2 uppercase">{tag}</h2>
          <ul className="mt-1 flex flex-col gap-0.5">
            {list.map((e) => {
              const active = e.id === selected;
              return (
                <li key={e.id}>
                  <button
                    type="button"
                    onClick={() => onSelect(e.id)}
                    aria-current={active ? "true" : undefined}
                    className={`flex w-full flex-col rounded-md px-2 py-1.5 text-left ${active ? "bg-surface shadow-sm ring-1 ring-accent/50" : "hover:bg-surface/70"}`}
                  >
                    <span className="font-mono text-[0.8125rem]">
                      <span className={active ? "text-accent" : "text-ink-2"}>{e.method}</span> {apiPath(e)}
                    </span>
                  </button>
                </li>
              );
            })}
          </ul>
        </div>
      ))}
    </nav>
  );
}

/** An endpoint's description: its first paragraph, and the rest (work, cost, limits) behind a disclosure, so the form stays near the top on a phone. */
function Description({ text }: { text: string }) {
  const [first, ...rest] = text.split(/\n\n+/);
  return (
    <div className="mt-1 text-sm text-ink-2">
      <p>
        <InlineCode text={first!} />
      </p>
      {rest.length ? (
        <details className="mt-1">
          <summary className="cursor-pointer text-ink">Work, cost and limits</summary>
          {rest.map((para, i) => (
            <p key={i} className="mt-1">
              <InlineCode text={para} />
            </p>
          ))}
        </details>
      ) : null}
    </div>
  );
}

function Bench({ org }: { org: string }) {
  const endpoints = useQuery({ queryKey: queryKeys.endpoints, queryFn: ({ signal }) => consoleApi.endpoints(signal), staleTime: 10 * 60_000 });
  const list = endpoints.data?.endpoints;
  const groups = useMemo(() => groupByTag(list ?? []), [list]);
  const [chosen, setChosen] = useState<string | null>(null);
  const selected = chosen ?? list?.[0]?.id ?? "";
  const endpoint = list?.find((e) => e.id === selected);
  const [results, setResults] = useState<Record<string, RunResult>>({});
  const pickerId = useId();

  const run = useMutation({
    mutationFn: ({ e, input }: { e: EndpointInfo; input: Record<string, unknown> }) => runEndpoint(org, e, input),
    onSuccess: (r, { e }) => setResults((all) => ({ ...all, [e.id]: r })),
  });

  if (endpoints.isPending) return <Loading label="Loading the endpoints" rows={6} />;
  if (endpoints.isError) return <LoadError error={endpoints.error} onRetry={() => void endpoints.refetch()} what="the endpoint list" />;
  if (!list || list.length === 0) return <Empty title="No public endpoints are registered">The server lists none; nothing to try.</Empty>;

  const result = endpoint ? results[endpoint.id] : undefined;
  const serverErrors: FieldProblem[] | undefined = result && result.status === 422 && isProblemBody(result.body) ? result.body.errors : undefined;
  const origin = typeof window !== "undefined" ? window.location.origin : "";

  return (
    <div className="xl:grid xl:grid-cols-[14rem_minmax(0,1fr)] xl:gap-6">
      <EndpointList groups={groups} selected={selected} onSelect={setChosen} />
      <div className="flex min-w-0 flex-col gap-5">
        <div className="xl:hidden">
          <label htmlFor={pickerId} className="block text-sm font-medium">
            Endpoint
          </label>
          <select id={pickerId} className={`${selectBase} mt-1 font-mono`} value={selected} onChange={(e) => setChosen(e.target.value)}>
            {groups.map(([tag, items]) => (
              <optgroup key={tag} label={tag}>
                {items.map((e) => (
                  <option key={e.id} value={e.id}>
                    {e.method} {apiPath(e)}
                  </option>
                ))}
              </optgroup>
            ))}
          </select>
        </div>

        {endpoint ? (
          <>
            <section aria-labelledby="endpoint-heading" className={`${panel} p-4 sm:p-5`}>
              <div className="flex flex-wrap items-baseline justify-between gap-2">
                <h2 id="endpoint-heading" className="font-mono text-base font-medium">
                  <span className="text-accent">{endpoint.method}</span> /api/v1{apiPath(endpoint)}
                </h2>
                <span className="text-xs text-ink-2">
                  scope <code className="pa-code">{endpoint.scope}</code>
                </span>
              </div>
              <p className="mt-1 font-medium">{endpoint.summary}</p>
              {endpoint.description ? <Description text={endpoint.description} /> : null}
              <div className="mt-4 border-t border-rule pt-4">
                <EndpointForm
                  key={endpoint.id}
                  endpoint={endpoint}
                  running={run.isPending}
                  serverErrors={serverErrors}
                  onRun={(input) => run.mutate({ e: endpoint, input })}
                />
              </div>
            </section>
            <div aria-live="polite" className="sr-only">
              {run.isPending ? "Running…" : result ? `Response ${result.status} ${result.statusText}` : ""}
            </div>
            {run.isError ? (
              <div role="alert" className="flex flex-col gap-2">
                <p className="text-sm text-ink-2">The request did not get as far as the API.</p>
                <ProblemView problem={toProblem(run.error)} />
              </div>
            ) : null}
            {result ? <ResultView result={result} origin={origin} /> : null}
          </>
        ) : null}
      </div>
    </div>
  );
}

/** /console/{org}/try: owners and developers run any public endpoint with a short-lived test key. */
export function BenchView() {
  const org = useCurrentOrg();
  const header = (
    <PageHeader
      eyebrow="Bench"
      title="Try the endpoints"
      lead="Every public endpoint, with a form made from its request schema. Runs use your bench credential, a test key kept for you alone and renewed hourly (it is not among the organisation's keys); each run also gives you curl and typed-client code."
    />
  );
  return (
    <SectionGate section="try" heading={header} deniedTitle="The bench is for owners and developers" denied={<p>It runs requests with a test key, and the billing role has no keys.</p>}>
      <div className="flex flex-col gap-6">
        {header}
        <Bench org={org.slug} />
      </div>
    </SectionGate>
  );
}
