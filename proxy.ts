import { NextResponse, type NextRequest } from "next/server";
import { getDb } from "@/db";
import { readSession } from "@/lib/auth/session";
import { baseSecurityHeaders, newNonce, pageCsp } from "@/lib/api/security-headers";

const isConsole = (path: string) => (path === "/console" || path.startsWith("/console/")) && !/^\/console\/dev(?:\/|$)/.test(path);

/**
 * Every page gets the security headers (lib/api/security-headers.ts) and a Content-Security-Policy with a nonce
 * of its own; the policy also goes on the request, where Next.js reads the nonce for its own scripts.
 * /docs writes its own policy (its page is a route handler, which Next.js gives no nonce).
 *
 * Console pages need a session: a visitor without one is redirected here, on the server, to
 * /signin?callbackUrl=<the page asked for> (path and query: an invitation link survives the detour),
 * so a signed-out console page never renders. The check is the one every console route makes
 * (lib/auth/session.ts): the cookie, and the user's session epoch in the database, so a session ended
 * by a password reset or a removal goes to sign-in with its way back; the routes check the role too.
 * The dev mailbox must open before anyone can sign in.
 */
export default async function proxy(req: NextRequest): Promise<NextResponse> {
  const path = req.nextUrl.pathname;
  let res: NextResponse;
  if (isConsole(path) && !(await readSession(req, await getDb()))) {
    const to = new URL("/signin", req.nextUrl);
    to.searchParams.set("callbackUrl", path + req.nextUrl.search);
    res = NextResponse.redirect(to);
  } else if (path === "/docs") {
    res = NextResponse.next();
  } else {
    const csp = pageCsp(newNonce());
    const headers = new Headers(req.headers);
    headers.set("content-security-policy", csp);
    res = NextResponse.next({ request: { headers } });
    res.headers.set("content-security-policy", csp);
  }
  for (const [k, v] of Object.entries(baseSecurityHeaders())) res.headers.set(k, v);
  return res;
}

// Pages only: /api answers set their own headers (lib/api/methods.ts), and built assets need no policy.
export const config = { matcher: ["/((?!api/|_next/static/|_next/image|favicon\\.ico).*)"] };
