import { methods } from "@/lib/api/methods";
import { consoleRoute, json, readJson, sameOrigin, withSession } from "@/lib/auth/guard";
import { acceptInput, acceptInvitation } from "@/lib/console/invitations";

// Any signed-in user may try; the service checks that the invitation was sent to their address.
const accept = consoleRoute(
  sameOrigin(
    withSession(async (req, { db, user }) => {
      const { token } = await readJson(req, acceptInput);
      return json(await acceptInvitation(db, user, token));
    }),
  ),
);

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ POST: accept });
