import { methods } from "@/lib/api/methods";
import { ANY_ROLE, consoleRoute, idParam, json, readJson, readQuery, sameOrigin, withOrgRole, withSession } from "@/lib/auth/guard";
import { requireRecentConfirmation } from "@/lib/auth/reauth";
import { changeRole, removeMember, removeQuery, roleChangeInput } from "@/lib/console/members";

const changeMemberRole = consoleRoute(
  sameOrigin(
    withSession(
      withOrgRole(["owner"], async (req, ctx) => {
        const { role } = await readJson(req, roleChangeInput);
        return json({ member: await changeRole(ctx.db, ctx.org, ctx.caller, idParam(ctx, "userId"), role) });
      }),
    ),
  ),
);

// Every role gets this far: anyone may leave; removing someone else is the service's owner-only case.
const removeMemberRoute = consoleRoute(
  sameOrigin(
    withSession(
      withOrgRole(ANY_ROLE, async (req, ctx) => {
        const { revokeKeys } = readQuery(req, removeQuery);
        const userId = idParam(ctx, "userId");
        // Removing someone else asks for the password; a non-owner is refused that by the service, so is not asked for it first.
        if (userId !== ctx.caller.id && ctx.caller.role === "owner") requireRecentConfirmation(ctx);
        return json(await removeMember(ctx.db, ctx.org, ctx.caller, userId, { revokeKeys }));
      }),
    ),
  ),
);

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ PATCH: changeMemberRole, DELETE: removeMemberRoute });
