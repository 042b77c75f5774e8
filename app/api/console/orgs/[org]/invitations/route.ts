import { methods } from "@/lib/api/methods";
import { consoleRoute, json, readJson, sameOrigin, withOrgRole, withSession } from "@/lib/auth/guard";
import { inviteInput, inviteMember } from "@/lib/console/invitations";

const invite = consoleRoute(
  sameOrigin(
    withSession(
      withOrgRole(["owner"], async (req, { db, org, caller, origin }) => {
        const input = await readJson(req, inviteInput);
        return json({ invitation: await inviteMember(db, org, caller, input, origin) }, 201);
      }),
    ),
  ),
);

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ POST: invite });
