import { consoleRoute, json, readQuery, withOrgRole, withSession } from "@/lib/auth/guard";
import { auditQuery, listAuditEntries } from "@/lib/console/audit";

export const GET = consoleRoute(withSession(withOrgRole(["owner"], async (req, { db, org }) => json(await listAuditEntries(db, org.id, readQuery(req, auditQuery))))));
