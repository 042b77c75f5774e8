import { methods } from "@/lib/api/methods";
import { simulationRequest } from "@/lib/api/simulation-spec";
import { ANY_ROLE, consoleRoute, json, readJson, readQuery, sameOrigin, withOrgRole, withSession } from "@/lib/auth/guard";
import { listOrgSimulations, simulationsQuery, startOrgSimulation } from "@/lib/console/simulations";

// Every role reads the simulations (billing sees what is metered); owners and developers start them.
const list = consoleRoute(withSession(withOrgRole(ANY_ROLE, async (req, { db, org }) => json(await listOrgSimulations(db, org, readQuery(req, simulationsQuery))))));

const start = consoleRoute(
  sameOrigin(
    withSession(
      withOrgRole(["owner", "developer"], async (req, { db, org, caller, requestId }) => {
        const input = await readJson(req, simulationRequest);
        return json({ simulation: await startOrgSimulation(db, org, caller, input, requestId) }, 202);
      }),
    ),
  ),
);

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ GET: list, POST: start });
