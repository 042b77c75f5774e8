import { methods } from "@/lib/api/methods";
import { ANY_ROLE, consoleRoute, json, readQuery, withOrgRole, withSession } from "@/lib/auth/guard";
import { claimsQuery, listOrgClaims } from "@/lib/console/claims";

// Every role reads the claims: they are the org's results, not its secrets.
const readClaims = consoleRoute(withSession(withOrgRole(ANY_ROLE, async (req, { db, org }) => json(await listOrgClaims(db, org, readQuery(req, claimsQuery))))));

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ GET: readClaims });
