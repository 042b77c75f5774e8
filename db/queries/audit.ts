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
      created_at: nowIso(),
    })
    .execute();

export const listAudit = (db: Db, orgId: number) =>
  db.selectFrom("audit_log").selectAll().where("org_id", "=", orgId).orderBy("id").execute();
