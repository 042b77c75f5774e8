import { isProblem, isProblemBody, ProblemError } from "./problem";

type Method = "GET" | "POST" | "PATCH" | "DELETE";

export interface FetchOptions {
  method?: Method;
  body?: unknown;
  signal?: AbortSignal;
}

/** Asks the person to confirm their password: true once confirmed, false when they decline. */
export type ReauthHandler = (problem: ProblemError) => Promise<boolean>;

let reauthHandler: ReauthHandler | null = null;

/** The console shell registers the one dialog that answers `reauth-required`; the returned function unregisters it. */
export function setReauthHandler(handler: ReauthHandler): () => void {
  reauthHandler = handler;
  return () => {
    if (reauthHandler === handler) reauthHandler = null;
  };
}

/**
 * A small typed fetcher over the console's JSON routes. Same-origin only (the browser sends
 * Origin / Sec-Fetch-Site, which the routes check on mutations). Any non-2xx answer is thrown
 * as a ProblemError: the problem+json body when there is one, otherwise a problem built from the status.
 * A `reauth-required` refusal goes to the registered handler first; once the password is
 * confirmed the request is sent once more (the refusal changed nothing), else the refusal is thrown.
 */
export async function consoleFetch<T>(path: string, opts: FetchOptions = {}): Promise<T> {
  try {
    return await send<T>(path, opts);
  } catch (err) {
    if (!isProblem(err, 403, "reauth-required") || !reauthHandler || !(await reauthHandler(err))) throw err;
    return send<T>(path, opts);
  }
}

async function send<T>(path: string, opts: FetchOptions): Promise<T> {
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
