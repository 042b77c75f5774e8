import { methods } from "@/lib/api/methods";
import { BILLING_ROLES, consoleRoute, json, withOrgRole, withSession } from "@/lib/auth/guard";
import { orgInvoice } from "@/lib/console/billing";

const one = consoleRoute(withSession(withOrgRole(BILLING_ROLES, async (_req, { db, org, params }) => json(await orgInvoice(db, org, params.id ?? "")))));

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ GET: one });
