import { consoleRoute, json, withSession } from "@/lib/auth/guard";
import { describeMe } from "@/lib/console/account";

export const GET = consoleRoute(withSession(async (_req, { db, user }) => json(await describeMe(db, user))));
