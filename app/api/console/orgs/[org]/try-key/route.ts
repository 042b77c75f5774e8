import { methods } from "@/lib/api/methods";
import { consoleRoute, json, sameOrigin, withOrgRole, withSession } from "@/lib/auth/guard";
import { createTryKey } from "@/lib/console/keys";

const mintTryKey = consoleRoute(sameOrigin(withSession(withOrgRole(["owner", "developer"], async (_req, { db, org, caller }) => json(await createTryKey(db, org, caller), 201)))));

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ POST: mintTryKey });
