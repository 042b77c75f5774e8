import { methods } from "@/lib/api/methods";
import { consoleRoute, idParam, json, readJson, sameOrigin, withOrgRole, withSession } from "@/lib/auth/guard";
import { requireRecentConfirmation } from "@/lib/auth/reauth";
import { rotateInput, rotateOrgKey, visibleKey } from "@/lib/console/keys";

const rotate = consoleRoute(
  sameOrigin(
    withSession(
      withOrgRole(["owner", "developer"], async (req, ctx) => {
        const overlapMinutes = await readJson(req, rotateInput);
        const id = idParam(ctx, "id");
        // Rotating a live key issues a new live secret: as sensitive as creating one (a key not there is 404 first).
        if ((await visibleKey(ctx.db, ctx.org, ctx.caller, id)).mode === "live") requireRecentConfirmation(ctx);
        return json(await rotateOrgKey(ctx.db, ctx.org, ctx.caller, id, overlapMinutes), 201);
      }),
    ),
  ),
);

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ POST: rotate });
