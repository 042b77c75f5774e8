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

async function call(e: EndpointInfo, input: Record<string, unknown>, key: string) {
  const paritas = createParitasClient({ baseUrl: `${window.location.origin}/api/v1`, key });
  const path = apiPath(e);
  const started = performance.now();
  // The path comes from the catalogue at run time, so TypeScript cannot pick its operation: cast to one.
  const r =
    e.method === "GET"
      ? await paritas.GET(path as "/usage", { params: { query: input as never }, parseAs: "text" })
      : e.method === "DELETE"
        ? await (paritas.DELETE as unknown as (p: string, o: object) => Promise<{ response: Response; data?: unknown; error?: unknown }>)(path, { parseAs: "text" })
        : await paritas.POST(path as "/encode", { body: input as never, parseAs: "text" });
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
  return {
    method: e.method,
    path: apiPath(e),
    input,
    status: out.response.status,
    statusText: out.response.statusText,
    headers: [...out.response.headers.entries()],
    body: out.body,
    ms: out.ms,
    key: { prefix: tk.key.slice(0, "test.prt1.".length + 4), expiresAt: tk.expiresAt },
    at: new Date().toISOString(),
  };
}
