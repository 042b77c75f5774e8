"use client";

import { CodePanel } from "@/components/console/code-panel";
import { ProblemView } from "@/components/console/problem-view";
import { panel } from "@/components/console/ui";
import { formatDateTime, formatRelative } from "@/lib/console-client/format";
import { decodeLayout } from "@/lib/console-client/decode-rows";
import { isProblemBody } from "@/lib/console-client/problem";
import { clientSnippet, curlCommand } from "@/lib/console-client/snippets";
import { DecodeView } from "./decode-view";
import { highlightJson } from "./json-view";
import type { RunResult } from "./run";

/** Headers worth reading first, in this order; the rest are under "all headers". */
const NOTABLE = ["x-request-id", "x-compute-units", "ratelimit", "ratelimit-policy", "retry-after", "idempotency-replayed", "content-type", "location"];
const DISPLAY: Record<string, string> = {
  "x-request-id": "X-Request-Id",
  "x-compute-units": "X-Compute-Units",
  ratelimit: "RateLimit",
  "ratelimit-policy": "RateLimit-Policy",
  "retry-after": "Retry-After",
  "idempotency-replayed": "Idempotency-Replayed",
  "content-type": "Content-Type",
  location: "Location",
};
const headerName = (h: string) => DISPLAY[h] ?? h.replace(/(^|-)([a-z])/g, (_, d: string, c: string) => d + c.toUpperCase());

/** Longest response the page draws in full; copying always takes everything. */
const MAX_DRAWN = 200_000;

function statusTone(status: number) {
  if (status >= 200 && status < 300) return "border-accent/50 bg-accent-soft text-accent";
  if (status >= 500) return "border-[#a3261c]/50 bg-[#f7e1dd] text-[#7a1d14] dark:border-[#f08a7e]/50 dark:bg-[#3a1714] dark:text-[#f5b4ab]";
  return "border-caution-rule bg-caution-bg text-caution-ink";
}

/** One bench run: status, headers, the body (problem details drawn as such), and the same call as curl and as typed-client code. */
export function ResultView({ result, origin }: { result: RunResult; origin: string }) {
  const text = typeof result.body === "string" ? result.body : JSON.stringify(result.body, null, 2);
  const drawn = text.length > MAX_DRAWN ? text.slice(0, MAX_DRAWN) : text;
  const problem = result.status >= 400 && isProblemBody(result.body) ? result.body : null;
  const headers = new Map(result.headers);
  const notable = NOTABLE.filter((h) => headers.has(h));
  const request = { method: result.method, path: result.path, input: result.input, origin };
  const decoded = result.path === "/decode" && result.status === 200 ? decodeLayout(result.input, result.body) : null;

  return (
    <section aria-labelledby="result-heading" className="flex flex-col gap-4">
      <div className={`${panel} p-4`}>
        <h2 id="result-heading" className="sr-only">
          Response
        </h2>
        <div className="flex flex-wrap items-center gap-x-4 gap-y-2">
          <span className={`inline-flex items-center gap-2 rounded-md border px-2.5 py-1 font-mono text-sm font-medium ${statusTone(result.status)}`}>
            {result.status} {result.statusText}
          </span>
          <span className="font-mono text-sm text-ink-2">
            {result.method} /api/v1{result.path}
          </span>
          <span className="text-sm text-ink-2">{result.ms} ms</span>
        </div>
        <p className="mt-2 text-xs text-ink-2">
          Sent with the bench key <code className="font-mono">{result.key.prefix}…</code> (test mode, valid until {formatDateTime(result.key.expiresAt)},{" "}
          {formatRelative(result.key.expiresAt)}). Calls are metered like any other.
        </p>
        {notable.length > 0 ? (
          <dl className="mt-3 grid gap-x-4 gap-y-1 text-sm sm:grid-cols-[max-content_minmax(0,1fr)]">
            {notable.map((h) => (
              <div key={h} className="contents">
                <dt className="font-mono text-xs leading-6 text-ink-2">{headerName(h)}</dt>
                <dd className="font-mono text-xs leading-6 break-all">{headers.get(h)}</dd>
              </div>
            ))}
          </dl>
        ) : null}
        <details className="mt-2 text-sm">
          <summary className="cursor-pointer text-accent">All {result.headers.length} response headers</summary>
          <dl className="mt-2 grid gap-x-4 gap-y-1 sm:grid-cols-[max-content_minmax(0,1fr)]">
            {result.headers.map(([k, v]) => (
              <div key={k} className="contents">
                <dt className="font-mono text-xs leading-6 text-ink-2">{headerName(k)}</dt>
                <dd className="font-mono text-xs leading-6 break-all">{v}</dd>
              </div>
            ))}
          </dl>
        </details>
      </div>

      {problem ? (
        <div role="alert">
          <ProblemView problem={problem} />
        </div>
      ) : null}

      {decoded ? <DecodeView layout={decoded} /> : null}

      <CodePanel label={problem ? "problem+json" : "response"} text={text} maxHeight="28rem">
        {typeof result.body === "string" ? drawn : highlightJson(drawn)}
        {drawn.length < text.length ? `\n… ${text.length - drawn.length} more characters; copy to get all of it` : null}
      </CodePanel>

      <div className="grid gap-4 2xl:grid-cols-2">
        <CodePanel label="curl" text={curlCommand(request)} />
        <CodePanel label="TypeScript" text={clientSnippet(request)} />
      </div>
      <p className="-mt-2 text-xs text-ink-2">
        Both read the key from <code className="font-mono">$PARITAS_KEY</code>; put one of your own keys there. The snippet uses the typed client package{" "}
        <code className="font-mono">@paritas/client</code> (packages/client in the repository), so paths and bodies are checked at compile time.
      </p>
    </section>
  );
}
