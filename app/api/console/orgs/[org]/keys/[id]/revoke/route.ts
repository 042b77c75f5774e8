import { consoleRoute, idParam, json, sameOrigin, withOrgRole, withSession } from "@/lib/auth/guard";
import { revokeOrgKey } from "@/lib/console/keys";

export const POST = consoleRoute(
  sameOrigin(withSession(withOrgRole(["owner", "developer"], async (_req, ctx) => json(await revokeOrgKey(ctx.db, ctx.org, ctx.caller, idParam(ctx, "id")))))),
);
