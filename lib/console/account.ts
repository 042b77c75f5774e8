import { z } from "zod";
import type { Db } from "@/db";
import { listOrgsOfUser } from "@/db/queries/members";
import { endpoints } from "@/lib/api/registry";

/** The signed-in user and every org they belong to, with their role in each. */
export async function describeMe(db: Db, user: { id: number; email: string; name: string | null }) {
  return { user: { id: user.id, email: user.email, name: user.name }, orgs: await listOrgsOfUser(db, user.id) };
}

let catalogue: unknown[] | undefined;

/** The public endpoints as the console's try page needs them: the full path, examples and the JSON Schema of the input. */
export function endpointCatalogue() {
  catalogue ??= endpoints.map((e) => ({
    id: e.id,
    method: e.method,
    path: `/api/v1${e.path}`,
    scope: e.scope,
    tag: e.tag,
    summary: e.summary,
    description: e.description,
    examples: e.examples,
    inputSchema: z.toJSONSchema(e.input, { io: "input" }),
  }));
  return catalogue;
}
