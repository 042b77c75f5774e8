import { z } from "zod";
import { getDb, type Db } from "@/db";
import { findOrgBySlug } from "@/db/queries/orgs";
import { findMembership } from "@/db/queries/users";
import type { Org, Role } from "@/db/schema";
import { parseJsonBody, readBodyText } from "@/lib/api/body";
import { requestIdFor } from "@/lib/api/http";
import { ApiError, fieldErrorsFromZod, problemResponse, type FieldError } from "@/lib/api/errors";
import type { Caller } from "@/lib/console/common";
import { readSession, renewalCookie, type SessionToken } from "./session";

/**
 * Console route plumbing: small wrappers, each doing one thing, nested from the outside in:
 *   consoleRoute(sameOrigin(withSession(withOrgRole(["owner"], handler))))
 * consoleRoute maps every error to problem+json; the rest narrow the context they pass inward.
 */

/** What Next.js passes a route handler as its second argument. */
interface RouteContext {
  params: Promise<Record<string, string | string[] | undefined>>;
}
export type RouteHandler = (req: Request, route: RouteContext) => Promise<Response>;

export interface ConsoleCtx {
  db: Db;
  requestId: string;
  params: Record<string, string>;
  /** The console's public origin (NEXTAUTH_URL when set, never a forged Host header), for links in e-mails. */
  origin: string;
}
export interface SessionCtx extends ConsoleCtx {
  user: { id: number; email: string; name: string | null };
  /** The session cookie as withSession decoded it: its sign-in, last confirmation and epoch. */
  token: SessionToken;
}
export interface OrgCtx extends SessionCtx {
  org: Org;
  /** The signed-in user with their role in `org`, read from memberships on this request. */
  caller: Caller;
}
type Handler<C> = (req: Request, ctx: C) => Promise<Response>;

export const ANY_ROLE: readonly Role[] = ["owner", "developer", "billing"];
/** Who may see and change what the organisation pays. */
export const BILLING_ROLES: readonly Role[] = ["owner", "billing"];

function validationFailed(errors: FieldError[]): ApiError {
  const first = errors[0];
  const detail = errors.length === 1 && first ? `${first.pointer || "the body"}: ${first.message}` : `${errors.length} fields are invalid; see errors.`;
  return new ApiError("validation-failed", detail, { errors });
}

/** Origins the request counts as its own: the URL's, and the one the Host (or a proxy's X-Forwarded-*) header names. */
function ownOrigins(req: Request): string[] {
  const url = new URL(req.url);
  const first = (h: string) => req.headers.get(h)?.split(",")[0]?.trim() || undefined;
  const proto = first("x-forwarded-proto")?.replace(/:?$/, ":") ?? url.protocol;
  const host = first("x-forwarded-host") ?? first("host") ?? url.host;
  return [`${proto}//${host}`, url.origin];
}

/** Request id, the database, params as strings, and one place that renders every failure as problem+json. */
export function consoleRoute(handler: Handler<ConsoleCtx>): RouteHandler {
  return async (req, route) => {
    const requestId = requestIdFor(req);
    let res: Response;
    try {
      const raw = (await route.params) ?? {};
      const params = Object.fromEntries(Object.entries(raw).map(([k, v]) => [k, Array.isArray(v) ? v.join("/") : (v ?? "")]));
      res = await handler(req, { db: await getDb(), requestId, params, origin: process.env.NEXTAUTH_URL ? new URL(process.env.NEXTAUTH_URL).origin : ownOrigins(req)[0]! });
    } catch (err) {
      res = problemResponse(err instanceof z.ZodError ? validationFailed(fieldErrorsFromZod(err)) : err, requestId);
    }
    res.headers.set("x-request-id", requestId);
    // Console answers depend on who is signed in: never let a shared cache keep one.
    res.headers.set("cache-control", "no-store");
    return res;
  };
}

/**
 * Mutations only from the console's own pages: `Origin` must be the request's own origin; without
 * Origin, `Sec-Fetch-Site: same-origin` will do. Everything else (other sites, `Origin: null`, no header) is refused.
 */
export function sameOrigin<C extends ConsoleCtx>(handler: Handler<C>): Handler<C> {
  return async (req, ctx) => {
    const origin = req.headers.get("origin");
    const ok = origin !== null ? ownOrigins(req).includes(origin) : req.headers.get("sec-fetch-site") === "same-origin";
    if (!ok) throw new ApiError("cross-origin", origin !== null ? `Requests from ${origin} may not change anything here.` : "The request does not show that it comes from the console (no Origin header).");
    return handler(req, ctx);
  };
}

/**
 * The signed-in user, from the session cookie and then the database (a deleted user's session, or one
 * ended by a password reset or a removal, is no session). Each use renews the cookie's idle deadline.
 */
export function withSession(handler: Handler<SessionCtx>): Handler<ConsoleCtx> {
  return async (req, ctx) => {
    const session = await readSession(req, ctx.db);
    if (!session) throw new ApiError("signed-out", "Sign in to use the console.");
    const res = await handler(req, { ...ctx, user: { id: session.userId, email: session.email, name: session.name }, token: session.token });
    // A handler that issued the session cookie itself (the password confirmation) set the newer one.
    const reissued = res.headers.getSetCookie().some((c) => c.startsWith(`${session.token.cookieName}=`));
    const renewed = reissued ? null : await renewalCookie(session.token);
    if (renewed) res.headers.append("set-cookie", renewed);
    return res;
  };
}

/**
 * The org named by the `org` route param and the caller's role in it, loaded on every request.
 * Not a member → 404, the same as no such org, so membership of others is not revealed; a role outside `roles` → 403.
 */
export function withOrgRole(roles: readonly Role[], handler: Handler<OrgCtx>): Handler<SessionCtx> {
  return async (req, ctx) => {
    const slug = ctx.params.org ?? "";
    const org = await findOrgBySlug(ctx.db, slug);
    const membership = org ? await findMembership(ctx.db, org.id, ctx.user.id) : undefined;
    if (!org || !membership) throw new ApiError("not-found", `You have no organisation \`${slug}\`.`);
    if (!roles.includes(membership.role)) {
      throw new ApiError("role-refused", `This needs the role ${roles.join(" or ")}; your role in ${org.slug} is ${membership.role}.`);
    }
    return handler(req, { ...ctx, org, caller: { id: ctx.user.id, email: ctx.user.email, role: membership.role } });
  };
}

/** The JSON body, validated: 415/400 for no JSON, 413 when too large, 422 with field pointers when the schema refuses it. */
export async function readJson<S extends z.ZodType>(req: Request, schema: S): Promise<z.output<S>> {
  return schema.parse(parseJsonBody(req, await readBodyText(req)));
}

/** The query parameters, validated; an empty parameter (`?actor=`) counts as absent. */
export function readQuery<S extends z.ZodType>(req: Request, schema: S): z.output<S> {
  const params = [...new URL(req.url).searchParams].filter(([, v]) => v !== "");
  return schema.parse(Object.fromEntries(params));
}

/** A numeric id route param; anything else names no resource (404). */
export function idParam(ctx: ConsoleCtx, name: string): number {
  const raw = ctx.params[name] ?? "";
  const id = /^[1-9]\d{0,15}$/.test(raw) ? Number(raw) : NaN;
  if (!Number.isSafeInteger(id)) throw new ApiError("not-found", `No ${name} \`${raw}\`.`);
  return id;
}

export const json = (body: unknown, status = 200) => new Response(JSON.stringify(body), { status, headers: { "content-type": "application/json" } });
