import { methods } from "@/lib/api/methods";
import { consoleRoute, idParam, json, sameOrigin, withOrgRole, withSession } from "@/lib/auth/guard";
import { revokeOrgKey } from "@/lib/console/keys";

const revoke = consoleRoute(
  sameOrigin(withSession(withOrgRole(["owner", "developer"], async (_req, ctx) => json(await revokeOrgKey(ctx.db, ctx.org, ctx.caller, idParam(ctx, "id")))))),
);

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ POST: revoke });
