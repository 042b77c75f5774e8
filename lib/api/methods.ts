import type { Endpoint } from "./endpoint";
import { ApiError, problemResponse } from "./errors";
import { endpointRoute } from "./http";
import { requestIdFor } from "./request-id";
import { allowHeader, type HandledMethod, type ServedMethod } from "./route-table";
import { withSecurityHeaders } from "./security-headers";

/**
 * What a route module under app/api exports: a handler for each of the seven methods Next.js hands to
 * route handlers, so that none of them falls to Next's bodiless defaults. The front door (front-door.ts)
 * answers every other method.
 */

type Handler<R extends Request, C> = (req: R, ctx: C) => Response | Promise<Response>;
export type RouteExports<R extends Request, C> = Record<HandledMethod, Handler<R, C>>;

/** The served methods' handlers, HEAD as GET (the server sends no body), OPTIONS 204 with Allow, and a 405 problem with Allow for the rest. */
export function methods<R extends Request, C>(served: Partial<Record<ServedMethod, Handler<R, C>>>): RouteExports<R, C> {
  const allow = allowHeader(Object.keys(served));
  const notAllowed: Handler<R, C> = (req) =>
    problemResponse(
      new ApiError("method-not-allowed", `${req.method} is not allowed on ${new URL(req.url).pathname}; allowed: ${allow}.`, { headers: { allow } }),
      requestIdFor(req),
    );
  const options: Handler<R, C> = (req) => new Response(null, { status: 204, headers: { allow, "x-request-id": requestIdFor(req) } });
  // No Access-Control-* header on any answer, OPTIONS included: the API grants browsers on other origins nothing (see README, "Security headers").
  return secured({
    GET: served.GET ?? notAllowed,
    HEAD: served.GET ?? notAllowed,
    POST: served.POST ?? notAllowed,
    PUT: served.PUT ?? notAllowed,
    PATCH: served.PATCH ?? notAllowed,
    DELETE: served.DELETE ?? notAllowed,
    OPTIONS: options,
  });
}

/** Every handler's answer with the security headers (lib/api/security-headers.ts). */
function secured<R extends Request, C>(exports: RouteExports<R, C>): RouteExports<R, C> {
  return Object.fromEntries(Object.entries(exports).map(([m, h]) => [m, async (req: R, ctx: C) => withSecurityHeaders(await h(req, ctx))])) as RouteExports<R, C>;
}

/** The exports of a public API route: its endpoints (one per method) through the HTTP machinery. */
export function routes(...endpoints: Endpoint[]): RouteExports<Request, unknown> {
  return methods(Object.fromEntries(endpoints.map((e) => [e.method, endpointRoute(e)])));
}

const unknownPath: Handler<Request, unknown> = (req) =>
  problemResponse(new ApiError("not-found", `There is no endpoint ${new URL(req.url).pathname}. The API reference is at /docs.`), requestIdFor(req));

/** The exports of the catch-all under /api: a 404 problem for every method, so no path under /api gets an HTML page. */
export const noRoute: RouteExports<Request, unknown> = secured({
  GET: unknownPath,
  HEAD: unknownPath,
  POST: unknownPath,
  PUT: unknownPath,
  PATCH: unknownPath,
  DELETE: unknownPath,
  OPTIONS: unknownPath,
});
