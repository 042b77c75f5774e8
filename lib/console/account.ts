import { z } from "zod";
import type { Db } from "@/db";
import { listOrgsOfUser } from "@/db/queries/members";
import { endpoints } from "@/lib/api/registry";

/** The signed-in user and every org they belong to, with their role in each. */
export async function describeMe(db: Db, user: { id: number; email: string; name: string | null }) {
  return { user: { id: user.id, email: user.email, name: user.name }, orgs: await listOrgsOfUser(db, user.id) };
}

export interface EndpointExample {
  summary: string;
  value: unknown;
}

/** One public endpoint as the console's try page needs it. */
export interface EndpointInfo {
  id: string;
  method: "GET" | "POST" | "DELETE";
  /** The full path, including /api/v1. */
  path: string;
  scope: string;
  tag?: string;
  summary: string;
  description: string;
  examples: Record<string, EndpointExample>;
  /** JSON Schema (2020-12) of the request body, or of the query parameters of a GET. */
  inputSchema: Record<string, unknown>;
}

let catalogue: EndpointInfo[] | undefined;

/** The path's {parameters} (e.g. a claim's id) as required fields of the form, before the query or body fields. */
function withPathParams(input: Record<string, unknown>, params: Record<string, unknown> | undefined): Record<string, unknown> {
  if (!params) return input;
  return {
    ...input,
    properties: { ...(params.properties as object), ...(input.properties as object) },
    required: [...((params.required as string[]) ?? []), ...((input.required as string[]) ?? [])],
  };
}

/** The public endpoints as the console's try page needs them: the full path, examples and the JSON Schema of the input. */
export function endpointCatalogue(): EndpointInfo[] {
  catalogue ??= endpoints.map((e) => ({
    id: e.id,
    method: e.method,
    path: `/api/v1${e.path}`,
    scope: e.scope,
    tag: e.tag,
    summary: e.summary,
    description: e.description,
    examples: e.examples,
    inputSchema: withPathParams(z.toJSONSchema(e.input, { io: "input" }) as Record<string, unknown>, e.params ? (z.toJSONSchema(e.params, { io: "input" }) as Record<string, unknown>) : undefined),
  }));
  return catalogue;
}
