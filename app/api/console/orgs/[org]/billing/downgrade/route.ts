import { methods } from "@/lib/api/methods";
import { BILLING_ROLES, consoleRoute, json, sameOrigin, withOrgRole, withSession } from "@/lib/auth/guard";
import { orgDowngrade } from "@/lib/console/billing";

const downgrade = consoleRoute(sameOrigin(withSession(withOrgRole(BILLING_ROLES, async (_req, { db, org, caller }) => json(await orgDowngrade(db, org, caller))))));

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ POST: downgrade });
