import { z } from "zod";
import type { Db } from "@/db";
import { listAuditPage } from "@/db/queries/audit";
import { findUsersByIds } from "@/db/queries/members";
import type { AuditEntry } from "@/db/schema";
import { cursorParam, decodeCursor, encodeCursor, limitParam } from "@/lib/api/pagination";
import { invalidField } from "./common";

export const auditQuery = z.strictObject({
  actor: z
    .string()
    .regex(/^(user:\d+|[a-z]+)$/, 'An actor id as listed in entries: "user:<id>", "cli", "system", …')
    .optional(),
  action: z
    .string()
    .max(64)
    .regex(/^[a-z_]+(\.[a-z_]+)*$/, 'An action such as "key.rotated".')
    .optional(),
  limit: limitParam(200, 50),
  cursor: cursorParam,
});

const cursorShape = z.object({ id: z.number().int().positive() });

/**
 * Who acted. `id` is the raw actor string, the value the `actor` filter takes. People are "user";
 * the operator CLI is "cli"; the product's own scripts (seeding, demo, benchmarks) are "system".
 */
export type AuditActor = { kind: "user"; id: string; userId: number; email?: string } | { kind: "cli" | "system"; id: string };

const userActor = /^user:(\d+)$/;

function actorOf(actor: string, emails: Map<number, string>): AuditActor {
  const m = userActor.exec(actor);
  if (m) {
    const userId = Number(m[1]);
    const email = emails.get(userId);
    return { kind: "user", id: actor, userId, ...(email !== undefined ? { email } : {}) };
  }
  return { kind: actor === "cli" ? "cli" : "system", id: actor };
}

/** One page of the org's audit log, newest first, with user actors resolved to their e-mail. */
export async function listAuditEntries(db: Db, orgId: number, q: z.output<typeof auditQuery>) {
  const after = q.cursor === undefined ? undefined : decodeCursor(q.cursor, cursorShape);
  if (q.cursor !== undefined && !after) throw invalidField("/cursor", "The cursor is not one this list returned.");
  const rows: AuditEntry[] = await listAuditPage(db, { orgId, actor: q.actor, action: q.action, beforeId: after?.id, limit: q.limit + 1 });
  const page = rows.slice(0, q.limit);
  const ids = [...new Set(page.flatMap((r) => userActor.exec(r.actor)?.slice(1).map(Number) ?? []))];
  const emails = new Map((await findUsersByIds(db, ids)).map((u) => [u.id, u.email]));
  const last = page.at(-1);
  return {
    entries: page.map((r) => ({
      id: r.id,
      at: r.created_at,
      actor: actorOf(r.actor, emails),
      action: r.action,
      targetType: r.target_type,
      targetId: r.target_id,
      details: JSON.parse(r.details) as unknown,
    })),
    nextCursor: rows.length > q.limit && last ? encodeCursor({ id: last.id }) : null,
  };
}
