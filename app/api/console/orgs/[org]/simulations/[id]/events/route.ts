import { simulationEventStream, simulationJob } from "@/lib/api/endpoints/simulations";
import { methods } from "@/lib/api/methods";
import { ANY_ROLE, consoleRoute, withOrgRole, withSession } from "@/lib/auth/guard";

/** The simulation's Server-Sent Events, as GET /api/v1/simulations/{id}/events streams them, for a signed-in member. */
const events = consoleRoute(
  withSession(
    withOrgRole(ANY_ROLE, async (_req, { db, org, params }) => {
      const job = await simulationJob(db, org.id, params.id ?? "");
      return new Response(simulationEventStream(db, org.id, job.id), { headers: { "content-type": "text/event-stream", "x-accel-buffering": "no" } });
    }),
  ),
);

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ GET: events });
