import { consoleRoute, json, sameOrigin, withOrgRole, withSession } from "@/lib/auth/guard";
import { createTryKey } from "@/lib/console/keys";

export const POST = consoleRoute(sameOrigin(withSession(withOrgRole(["owner", "developer"], async (_req, { db, org, caller }) => json(await createTryKey(db, org, caller), 201)))));
