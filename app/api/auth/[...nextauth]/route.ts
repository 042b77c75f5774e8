import NextAuth from "next-auth";
import { NextRequest } from "next/server";
import { ApiError, problemResponse } from "@/lib/api/errors";
import { requestIdFor } from "@/lib/api/http";
import { methods } from "@/lib/api/methods";
import { authOptions } from "@/lib/auth/options";

type Context = { params: Promise<{ nextauth: string[] }> };

// next-auth's own actions; it answers any other path with a plain-text 400, so those get the API's 404 problem instead.
const ACTIONS: Record<string, ReadonlySet<string>> = {
  GET: new Set(["providers", "session", "csrf", "signin", "signout", "callback", "verify-request", "error"]),
  POST: new Set(["signin", "signout", "callback", "session", "_log"]),
};

// next-auth's App Router handler, with the options built per request (see authOptions). HEAD is answered as GET.
async function handler(req: NextRequest, ctx: Context): Promise<Response> {
  const asGet = req.method === "HEAD" ? new NextRequest(req, { method: "GET" }) : req;
  const action = (await ctx.params).nextauth[0] ?? "";
  if (!ACTIONS[asGet.method]?.has(action)) {
    return problemResponse(new ApiError("not-found", `There is no endpoint ${req.method} ${new URL(req.url).pathname}.`), requestIdFor(req));
  }
  const res: Response = await NextAuth(asGet, ctx, authOptions());
  if (res.status < 400 || /json/.test(res.headers.get("content-type") ?? "")) return res;
  // next-auth answers its own protocol errors in plain text (a missing CSRF token even as "[object Object]").
  const problem = problemResponse(
    new ApiError("bad-request", "The sign-in service refused the request: its CSRF token is missing or stale, or the action does not take this method."),
    requestIdFor(req),
  );
  for (const cookie of res.headers.getSetCookie()) problem.headers.append("set-cookie", cookie);
  return problem;
}

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ GET: handler, POST: handler });
