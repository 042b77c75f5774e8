import { methods } from "@/lib/api/methods";
import { consoleRoute, json, withSession } from "@/lib/auth/guard";
import { describeMe } from "@/lib/console/account";

const me = consoleRoute(withSession(async (_req, { db, user }) => json(await describeMe(db, user))));

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ GET: me });
