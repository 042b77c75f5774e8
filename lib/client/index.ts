import createClient from "openapi-fetch";
import type { paths } from "./paritas";

/**
 * The typed Paritas client: paths and bodies checked against the OpenAPI document at compile time.
 * `createParitasClient({ baseUrl: "https://host/api/v1", key })`.
 */
export function createParitasClient(opts: { baseUrl: string; key: string; fetch?: typeof fetch }) {
  return createClient<paths>({ baseUrl: opts.baseUrl, headers: { authorization: `Bearer ${opts.key}` }, fetch: opts.fetch });
}

export type { paths };
