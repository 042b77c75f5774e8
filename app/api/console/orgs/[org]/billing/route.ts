import { methods } from "@/lib/api/methods";
import { BILLING_ROLES, consoleRoute, json, withOrgRole, withSession } from "@/lib/auth/guard";
import { billingOverview } from "@/lib/console/billing";

// Money is for owners and billing admins; developers are refused (403) like on every billing route.
const overview = consoleRoute(withSession(withOrgRole(BILLING_ROLES, async (_req, { db, org }) => json(await billingOverview(db, org)))));

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ GET: overview });
