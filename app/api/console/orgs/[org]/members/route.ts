import { methods } from "@/lib/api/methods";
import { ANY_ROLE, consoleRoute, json, withOrgRole, withSession } from "@/lib/auth/guard";
import { listMembersOf } from "@/lib/console/members";

const listMembers = consoleRoute(withSession(withOrgRole(ANY_ROLE, async (_req, { db, org, caller }) => json(await listMembersOf(db, org, caller)))));

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ GET: listMembers });
