import { consoleRoute, idParam, json, sameOrigin, withOrgRole, withSession } from "@/lib/auth/guard";
import { revokeInvitation } from "@/lib/console/invitations";

export const DELETE = consoleRoute(
  sameOrigin(withSession(withOrgRole(["owner"], async (_req, ctx) => json({ invitation: await revokeInvitation(ctx.db, ctx.org, ctx.caller, idParam(ctx, "id")) })))),
);
