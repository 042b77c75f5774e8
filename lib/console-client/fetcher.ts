import { isProblemBody, ProblemError } from "./problem";

type Method = "GET" | "POST" | "PATCH" | "DELETE";

export interface FetchOptions {
  method?: Method;
  body?: unknown;
  signal?: AbortSignal;
}

/**
 * A small typed fetcher over the console's JSON routes. Same-origin only (the browser sends
 * Origin / Sec-Fetch-Site, which the routes check on mutations). Any non-2xx answer is thrown
 * as a ProblemError: the problem+json body when there is one, otherwise a problem built from the status.
 */
export async function consoleFetch<T>(path: string, opts: FetchOptions = {}): Promise<T> {
  const method = opts.method ?? "GET";
  const res = await fetch(path, {
    method,
    credentials: "same-origin",
    cache: "no-store",
    signal: opts.signal,
    headers: {
      accept: "application/json, application/problem+json",
      ...(opts.body !== undefined ? { "content-type": "application/json" } : {}),
    },
    body: opts.body !== undefined ? JSON.stringify(opts.body) : undefined,
  });
  const text = await res.text();
  let parsed: unknown = undefined;
  if (text) {
    try {
      parsed = JSON.parse(text);
    } catch {
      parsed = undefined;
    }
  }
  if (!res.ok) {
    if (isProblemBody(parsed)) throw new ProblemError({ ...parsed, type: parsed.type ?? "about:blank", status: parsed.status ?? res.status });
    throw new ProblemError({
      type: "about:blank",
      title: res.status === 404 ? "Not found" : res.status >= 500 ? "The server failed to answer" : `Request refused (HTTP ${res.status})`,
      status: res.status,
      detail: res.headers.get("x-request-id") ? `Request id ${res.headers.get("x-request-id")}.` : undefined,
    });
  }
  if (parsed === undefined && text) {
    throw new ProblemError({ type: "about:blank", title: "The server sent an answer the console cannot read", status: res.status });
  }
  return parsed as T;
}

/** Where the sign-in page is, with a way back to `path` (the current page by default). */
export function signInUrl(path?: string): string {
  const back = path ?? (typeof window !== "undefined" ? window.location.pathname + window.location.search : "/console");
  return `/signin?callbackUrl=${encodeURIComponent(back)}`;
}
