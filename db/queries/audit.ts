import type { Db } from "@/db";
import { nowIso } from "@/db";

export interface AuditInput {
  orgId: number;
  /** Who acted: "user:<id>", "cli" or "system". */
  actor: string;
  action: string;
  targetType: string;
  targetId: string | number;
  details?: Record<string, unknown>;
  /** When the recorded change happened; now unless a seed replays a past one. */
  at?: string;
}

export const insertAudit = (db: Db, a: AuditInput) =>
  db
    .insertInto("audit_log")
    .values({
      org_id: a.orgId,
      actor: a.actor,
      action: a.action,
      target_type: a.targetType,
      target_id: String(a.targetId),
      details: JSON.stringify(a.details ?? {}),
      created_at: a.at ?? nowIso(),
    })
    .execute();

export const listAudit = (db: Db, orgId: number) =>
  db.selectFrom("audit_log").selectAll().where("org_id", "=", orgId).orderBy("id").execute();

/** One page of an org's audit log, newest first, below `beforeId` when given; actor and action match exactly. */
export const listAuditPage = (db: Db, q: { orgId: number; actor?: string; action?: string; beforeId?: number; limit: number }) => {
  let query = db.selectFrom("audit_log").selectAll().where("org_id", "=", q.orgId);
  if (q.actor !== undefined) query = query.where("actor", "=", q.actor);
  if (q.action !== undefined) query = query.where("action", "=", q.action);
  if (q.beforeId !== undefined) query = query.where("id", "<", q.beforeId);
  return query.orderBy("id", "desc").limit(q.limit).execute();
};
