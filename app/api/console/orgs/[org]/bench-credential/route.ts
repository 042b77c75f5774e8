import { methods } from "@/lib/api/methods";
import { consoleRoute, json, sameOrigin, withOrgRole, withSession } from "@/lib/auth/guard";
import { issueBenchCredential } from "@/lib/console/keys";

/** The caller's one bench credential, renewed: a fresh secret for the same credential, an hour from now. */
const renew = consoleRoute(sameOrigin(withSession(withOrgRole(["owner", "developer"], async (_req, { db, org, caller }) => json(await issueBenchCredential(db, org, caller), 201)))));

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ POST: renew });
