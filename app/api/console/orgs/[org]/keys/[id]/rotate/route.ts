import { consoleRoute, idParam, json, readJson, sameOrigin, withOrgRole, withSession } from "@/lib/auth/guard";
import { rotateInput, rotateOrgKey } from "@/lib/console/keys";

export const POST = consoleRoute(
  sameOrigin(
    withSession(
      withOrgRole(["owner", "developer"], async (req, ctx) => {
        const { overlapHours } = await readJson(req, rotateInput);
        return json(await rotateOrgKey(ctx.db, ctx.org, ctx.caller, idParam(ctx, "id"), overlapHours), 201);
      }),
    ),
  ),
);
