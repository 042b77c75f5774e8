import { createParitasClient } from "@paritas/client";
import { obtainTryKey } from "@/lib/console-client/try-key";
import type { EndpointInfo, TryKey } from "@/lib/console-client/types";

export interface RunResult {
  method: EndpointInfo["method"];
  /** Path below /api/v1. */
  path: string;
  input: Record<string, unknown>;
  status: number;
  statusText: string;
  headers: [string, string][];
  /** Parsed JSON, or the text when the body is not JSON. */
  body: unknown;
  ms: number;
  key: { prefix: string; expiresAt: string };
  at: string;
}

/** Path of an endpoint below the client's base URL (the catalogue lists it with /api/v1 in front). */
export const apiPath = (e: EndpointInfo) => e.path.replace(/^\/api\/v1(?=\/)/, "");

/** The form's values split into the path's {parameters} and the rest (query or body). */
export function splitPathParams(e: EndpointInfo, input: Record<string, unknown>): { path: Record<string, string>; rest: Record<string, unknown>; concrete: string } {
  const names = [...apiPath(e).matchAll(/\{(\w+)\}/g)].map((m) => m[1]!);
  const path = Object.fromEntries(names.map((n) => [n, String(input[n] ?? "")]));
  const rest = Object.fromEntries(Object.entries(input).filter(([k]) => !names.includes(k)));
  const concrete = apiPath(e).replace(/\{(\w+)\}/g, (_, n: string) => encodeURIComponent(path[n]!));
  return { path, rest, concrete };
}

type Call = (p: string, o: object) => Promise<{ response: Response; data?: unknown; error?: unknown }>;

async function call(e: EndpointInfo, input: Record<string, unknown>, key: string) {
  const paritas = createParitasClient({ baseUrl: `${window.location.origin}/api/v1`, key });
  const { path: params, rest } = splitPathParams(e, input);
  const path = apiPath(e);
  const started = performance.now();
  // The path comes from the catalogue at run time, so TypeScript cannot pick its operation: call through one signature.
  const send = (e.method === "GET" ? paritas.GET : e.method === "DELETE" ? paritas.DELETE : paritas.POST) as unknown as Call;
  const r = await send(path, {
    params: { path: params, ...(e.method === "GET" ? { query: rest } : {}) },
    ...(e.method === "POST" ? { body: rest } : {}),
    parseAs: "text",
  });
  const ms = Math.round(performance.now() - started);
  // Success bodies come back as text (parseAs); openapi-fetch has already tried JSON on error bodies.
  const raw: unknown = r.data ?? r.error ?? null;
  let body: unknown = raw;
  if (typeof raw === "string") {
    try {
      body = raw ? JSON.parse(raw) : null;
    } catch {
      // not JSON: show the text
    }
  }
  return { response: r.response, body, ms };
}

/**
 * Send one request with the caller's bench credential (a test key renewed hourly, shared by their
 * tabs). A 401 means it ended early (revoked, or renewed elsewhere): take the current one and try once more.
 */
export async function runEndpoint(org: string, e: EndpointInfo, input: Record<string, unknown>): Promise<RunResult> {
  let tk: TryKey = await obtainTryKey(org);
  let out = await call(e, input, tk.key);
  if (out.response.status === 401) {
    tk = await obtainTryKey(org, { stale: tk.key });
    out = await call(e, input, tk.key);
  }
  const { rest, concrete } = splitPathParams(e, input);
  return {
    method: e.method,
    path: concrete,
    input: rest,
    status: out.response.status,
    statusText: out.response.statusText,
    headers: [...out.response.headers.entries()],
    body: out.body,
    ms: out.ms,
    key: { prefix: tk.key.slice(0, "test.prt1.".length + 4), expiresAt: tk.expiresAt },
    at: new Date().toISOString(),
  };
}
