import { NextResponse, type NextRequest } from "next/server";
import { readSession } from "@/lib/auth/session";

/**
 * Console pages need a session: a visitor without one is redirected here, on the server, to
 * /signin?callbackUrl=<the page asked for> (path and query: an invitation link survives the detour),
 * so a signed-out console page never renders. The check reads the session cookie by the same rules
 * as every console route (lib/auth/session.ts), which check it again with the role.
 */
export default async function proxy(req: NextRequest): Promise<NextResponse> {
  if (await readSession(req)) return NextResponse.next();
  const back = req.nextUrl.pathname + req.nextUrl.search;
  const to = new URL("/signin", req.nextUrl);
  to.searchParams.set("callbackUrl", back);
  return NextResponse.redirect(to);
}

// Console pages only; the dev mailbox must open before anyone can sign in.
export const config = { matcher: ["/console", "/console/((?!dev(?:/|$)).*)"] };
