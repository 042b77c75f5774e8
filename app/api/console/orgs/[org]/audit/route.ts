import { methods } from "@/lib/api/methods";
import { consoleRoute, json, readQuery, withOrgRole, withSession } from "@/lib/auth/guard";
import { auditQuery, listAuditEntries } from "@/lib/console/audit";

const listAudit = consoleRoute(withSession(withOrgRole(["owner"], async (req, { db, org }) => json(await listAuditEntries(db, org, readQuery(req, auditQuery))))));

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ GET: listAudit });
