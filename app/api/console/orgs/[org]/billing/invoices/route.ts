import { methods } from "@/lib/api/methods";
import { BILLING_ROLES, consoleRoute, json, readQuery, withOrgRole, withSession } from "@/lib/auth/guard";
import { invoicesQuery, orgInvoices } from "@/lib/console/billing";

const list = consoleRoute(withSession(withOrgRole(BILLING_ROLES, async (req, { db, org }) => json(await orgInvoices(db, org, readQuery(req, invoicesQuery))))));

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ GET: list });
