import { methods } from "@/lib/api/methods";
import { ANY_ROLE, consoleRoute, json, sameOrigin, withOrgRole, withSession } from "@/lib/auth/guard";
import { cancelOrgSimulation, orgSimulation } from "@/lib/console/simulations";

const one = consoleRoute(withSession(withOrgRole(ANY_ROLE, async (_req, { db, org, params }) => json({ simulation: await orgSimulation(db, org, params.id ?? "") }))));

// A running job is ended by its runner within about a second: 202, as the API answers.
const cancel = consoleRoute(
  sameOrigin(
    withSession(
      withOrgRole(["owner", "developer"], async (_req, { db, org, caller, params }) => {
        const out = await cancelOrgSimulation(db, org, caller, params.id ?? "");
        return json({ simulation: out.simulation }, out.ending ? 202 : 200);
      }),
    ),
  ),
);

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ GET: one, DELETE: cancel });
