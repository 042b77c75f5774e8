import { methods } from "@/lib/api/methods";
import { consoleRoute, idParam, json, readJson, sameOrigin, withOrgRole, withSession } from "@/lib/auth/guard";
import { rotateInput, rotateOrgKey } from "@/lib/console/keys";

const rotate = consoleRoute(
  sameOrigin(
    withSession(
      withOrgRole(["owner", "developer"], async (req, ctx) => {
        const overlapMinutes = await readJson(req, rotateInput);
        return json(await rotateOrgKey(ctx.db, ctx.org, ctx.caller, idParam(ctx, "id"), overlapMinutes), 201);
      }),
    ),
  ),
);

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ POST: rotate });
