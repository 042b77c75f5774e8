/**
 * Every route under /api and the methods it serves, as plain data: the front door (front-door.ts) answers
 * methods that never reach a route handler from it, without loading the handlers. tests/api/methods.test.ts
 * checks it against the route modules in app/api, so the two cannot drift apart.
 */

/** The methods Next.js hands to a route handler. Every other method is answered by the front door. */
export const HANDLED_METHODS = ["GET", "HEAD", "POST", "PUT", "PATCH", "DELETE", "OPTIONS"] as const;
export type HandledMethod = (typeof HANDLED_METHODS)[number];
/** What a route may serve; HEAD and OPTIONS follow from it. */
export type ServedMethod = "GET" | "POST" | "PUT" | "PATCH" | "DELETE";

/** Route pattern (App Router syntax) → the methods its handlers serve. */
export const apiRoutes: Readonly<Record<string, readonly ServedMethod[]>> = {
  "/api/auth/[...nextauth]": ["GET", "POST"],
  "/api/console/auth/confirm": ["POST"],
  "/api/console/auth/reset-confirm": ["POST"],
  "/api/console/auth/reset-request": ["POST"],
  "/api/console/auth/signup": ["POST"],
  "/api/console/dev/mailbox": ["GET"],
  "/api/console/endpoints": ["GET"],
  "/api/console/invitations/accept": ["POST"],
  "/api/console/me": ["GET"],
  "/api/console/orgs/[org]/audit": ["GET"],
  "/api/console/orgs/[org]/claims": ["GET"],
  "/api/console/orgs/[org]/invitations": ["POST"],
  "/api/console/orgs/[org]/invitations/[id]": ["DELETE"],
  "/api/console/orgs/[org]/keys": ["GET", "POST"],
  "/api/console/orgs/[org]/keys/[id]/revoke": ["POST"],
  "/api/console/orgs/[org]/keys/[id]/rotate": ["POST"],
  "/api/console/orgs/[org]/members": ["GET"],
  "/api/console/orgs/[org]/members/[userId]": ["PATCH", "DELETE"],
  "/api/console/orgs/[org]/transfer": ["POST"],
  "/api/console/orgs/[org]/simulations": ["GET", "POST"],
  "/api/console/orgs/[org]/simulations/[id]": ["GET", "DELETE"],
  "/api/console/orgs/[org]/simulations/[id]/events": ["GET"],
  "/api/console/orgs/[org]/bench-credential": ["POST"],
  "/api/console/orgs/[org]/usage": ["GET"],
  "/api/health": ["GET"],
  "/api/webhooks/billing": ["POST"],
  "/api/console/orgs/[org]/billing": ["GET"],
  "/api/console/orgs/[org]/billing/checkout": ["POST"],
  "/api/console/orgs/[org]/billing/downgrade": ["POST"],
  "/api/console/orgs/[org]/billing/invoices": ["GET"],
  "/api/console/orgs/[org]/billing/invoices/[id]": ["GET"],
  "/api/console/orgs/[org]/billing/invoices/[id]/document": ["GET"],
  "/api/v1/capacity": ["POST"],
  "/api/v1/claims": ["GET", "POST"],
  "/api/v1/claims/[id]": ["GET"],
  "/api/v1/channels/bsc": ["POST"],
  "/api/v1/codes/analyze": ["POST"],
  "/api/v1/decode": ["POST"],
  "/api/v1/distance": ["POST"],
  "/api/v1/encode": ["POST"],
  "/api/v1/links/ber": ["POST"],
  "/api/v1/tests/plan": ["POST"],
  "/api/v1/openapi.json": ["GET"],
  "/api/v1/simulations": ["GET", "POST"],
  "/api/v1/simulations/[id]": ["GET", "DELETE"],
  "/api/v1/simulations/[id]/events": ["GET"],
  "/api/v1/usage": ["GET"],
};

const ORDER: readonly string[] = HANDLED_METHODS;

/** The Allow field value (RFC 9110 §10.2.1) of a route serving `served`: HEAD comes with GET, OPTIONS always. */
export function allowHeader(served: readonly string[]): string {
  const all = new Set([...served, ...(served.includes("GET") ? ["HEAD"] : []), "OPTIONS"]);
  return ORDER.filter((m) => all.has(m)).join(", ");
}

/** Segment kinds in the App Router's order of precedence: static, [param], [...rest], [[...optionalRest]]. */
const segmentKind = (s: string) => (s.startsWith("[[...") ? 3 : s.startsWith("[...") ? 2 : s.startsWith("[") ? 1 : 0);

/** Orders route patterns so that the first one matching a path is the one the App Router picks: at the first segment where they differ, the more specific kind wins. */
export function bySpecificity(a: string[], b: string[]): number {
  for (let i = 0; i < Math.min(a.length, b.length); i++) {
    const d = segmentKind(a[i]!) - segmentKind(b[i]!);
    if (d !== 0) return d;
  }
  return a.length - b.length;
}

const compiled = Object.entries(apiRoutes)
  .map(([pattern, served]) => ({ pattern, segments: pattern.split("/").filter(Boolean), served }))
  .sort((a, b) => bySpecificity(a.segments, b.segments));

function matches(route: string[], parts: string[]): boolean {
  for (let i = 0; i < route.length; i++) {
    const s = route[i]!;
    if (s.startsWith("[...")) return parts.length > i;
    if (parts[i] === undefined || (!s.startsWith("[") && s !== parts[i])) return false;
  }
  return parts.length === route.length;
}

/** The route a path (already percent-decoded, segment by segment) names, if any. */
export function matchApiRoute(pathname: string): { pattern: string; served: readonly ServedMethod[] } | undefined {
  const parts = pathname.split("/").filter(Boolean);
  const hit = compiled.find((r) => matches(r.segments, parts));
  return hit && { pattern: hit.pattern, served: hit.served };
}
