import { methods } from "@/lib/api/methods";
import { consoleRoute, idParam, json, sameOrigin, withOrgRole, withSession } from "@/lib/auth/guard";
import { revokeInvitation } from "@/lib/console/invitations";

const revoke = consoleRoute(
  sameOrigin(withSession(withOrgRole(["owner"], async (_req, ctx) => json({ invitation: await revokeInvitation(ctx.db, ctx.org, ctx.caller, idParam(ctx, "id")) })))),
);

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ DELETE: revoke });
