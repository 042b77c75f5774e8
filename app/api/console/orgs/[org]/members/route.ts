import { ANY_ROLE, consoleRoute, json, withOrgRole, withSession } from "@/lib/auth/guard";
import { listMembersOf } from "@/lib/console/members";

export const GET = consoleRoute(withSession(withOrgRole(ANY_ROLE, async (_req, { db, org, caller }) => json(await listMembersOf(db, org, caller)))));
