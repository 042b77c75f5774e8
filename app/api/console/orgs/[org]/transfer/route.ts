import { methods } from "@/lib/api/methods";
import { consoleRoute, json, readJson, sameOrigin, withOrgRole, withSession } from "@/lib/auth/guard";
import { requireRecentConfirmation } from "@/lib/auth/reauth";
import { transferInput, transferOwnership } from "@/lib/console/members";

const transfer = consoleRoute(
  sameOrigin(
    withSession(
      withOrgRole(["owner"], async (req, ctx) => {
        const { userId } = await readJson(req, transferInput);
        requireRecentConfirmation(ctx);
        return json(await transferOwnership(ctx.db, ctx.org, ctx.caller, userId));
      }),
    ),
  ),
);

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ POST: transfer });
