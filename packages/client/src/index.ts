import createClient from "openapi-fetch";
import type { paths } from "./paritas.js";

export interface ParitasClientOptions {
  /** The API's base URL, ending in the version path, e.g. "https://host/api/v1". */
  baseUrl: string;
  /** An API key; sent as `Authorization: Bearer <key>` on every call. */
  key: string;
  /** A fetch to use instead of the global one (tests, proxies, older runtimes). */
  fetch?: typeof fetch;
}

/**
 * The typed Paritas client: paths, bodies and responses checked against the OpenAPI document at compile time.
 * Each call resolves to `{ data }` on success or `{ error }` with the problem+json body, plus the raw `response`.
 */
export function createParitasClient(opts: ParitasClientOptions) {
  return createClient<paths>({ baseUrl: opts.baseUrl, headers: { authorization: `Bearer ${opts.key}` }, fetch: opts.fetch });
}

export type { paths };
