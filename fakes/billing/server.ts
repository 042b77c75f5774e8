import type { IncomingMessage, ServerResponse } from "node:http";
import qs from "qs";
import { ApiError, expand, Page, strings, type Ctx, type Route } from "./objects";
import { pageSecurityHeaders } from "./checkout-page";
import { catalogRoutes } from "./resources/catalog";
import { checkoutRoutes } from "./resources/checkout";
import { customerRoutes } from "./resources/customers";
import { invoiceRoutes } from "./resources/invoices";
import { subscriptionRoutes } from "./resources/subscriptions";
import { newId, type Store } from "./state";
import type { Env } from "./webhooks";

/** The one router table: `:id` matches one path segment. */
const routes = [...customerRoutes, ...catalogRoutes, ...checkoutRoutes, ...subscriptionRoutes, ...invoiceRoutes].map((r: Route) => ({
  method: r[0],
  regex: new RegExp(`^${r[1].replace(/:id/g, "(?<id>[^/]+)")}$`),
  handler: r[2],
  open: r[3] === "no-auth",
}));

const idempotencyTtlMs = 24 * 3600 * 1000;
const maxBody = 1 << 20;

/** Form bodies and query strings in the SDK's bracket notation (`items[0][price]=…`). */
const parseForm = (text: string) => qs.parse(text, { arrayLimit: 1000, depth: 10 });

async function readBody(req: IncomingMessage): Promise<string> {
  const chunks: Buffer[] = [];
  let size = 0;
  for await (const chunk of req as AsyncIterable<Buffer>) {
    size += chunk.length;
    if (size > maxBody) throw new ApiError(400, "invalid_request_error", "request_too_large", "The request body is larger than 1 MB.");
    chunks.push(chunk);
  }
  return Buffer.concat(chunks).toString("utf8");
}

function send(res: ServerResponse, status: number, payload: unknown): void {
  res.writeHead(status, { "content-type": "application/json; charset=utf-8", "request-id": newId("request") });
  res.end(JSON.stringify(payload));
}

/**
 * Handles one request: route, key check, form parsing, idempotency replay, the handler, then the
 * state written to disk. Handlers are synchronous, so requests never interleave on the state.
 */
export function handler(env: Env & { setApiVersion(v: string | undefined): void }, secretKey: string, afterChange: () => void) {
  const serve = serveOne(env, secretKey, afterChange);
  // A failure outside the handlers (a dropped connection, say) must not become an unhandled rejection that stops the process.
  return (req: IncomingMessage, res: ServerResponse) => {
    serve(req, res).catch((e: unknown) => {
      console.error("billing stand-in:", e);
      if (!res.headersSent) send(res, 500, { error: { type: "api_error", code: "internal", message: "The stand-in failed on this request." } });
      else res.destroy();
    });
  };
}

/** `%zz` in a path segment is kept as written rather than failing the request. */
function decodeSegment(v: string): string {
  try {
    return decodeURIComponent(v);
  } catch {
    return v;
  }
}

function serveOne(env: Env & { setApiVersion(v: string | undefined): void }, secretKey: string, afterChange: () => void) {
  const store: Store = env.store;
  return async (req: IncomingMessage, res: ServerResponse) => {
    const method = req.method ?? "GET";
    const url = new URL(req.url ?? "/", "http://stand-in");
    let body: string;
    try {
      body = await readBody(req);
    } catch (e) {
      if (e instanceof ApiError) return send(res, e.status, e.body);
      throw e;
    }
    let params: Record<string, string> = {};
    const route = routes.find((r) => {
      const m = r.method === method ? r.regex.exec(url.pathname) : null;
      if (m) params = Object.fromEntries(Object.entries(m.groups ?? {}).map(([k, v]) => [k, decodeSegment(v)]));
      return m !== null;
    });
    if (!route) return send(res, 404, new ApiError(404, "invalid_request_error", "unrecognized_url", `The stand-in has no ${method} ${url.pathname}.`).body);
    if (!route.open && req.headers.authorization !== `Bearer ${secretKey}`) {
      return send(res, 401, new ApiError(401, "invalid_request_error", "api_key_invalid", "Missing or wrong secret key: send 'Authorization: Bearer <secret key>'.").body);
    }

    const key = method === "POST" && !route.open ? req.headers["idempotency-key"] : undefined;
    const now = Date.now();
    if (typeof key === "string") {
      for (const [k, rec] of Object.entries(store.state.idempotency)) if (now - rec.at_ms > idempotencyTtlMs) delete store.state.idempotency[k];
      const rec = store.state.idempotency[key];
      if (rec) {
        if (rec.method === method && rec.path === url.pathname && rec.body === body) return send(res, rec.status, rec.payload);
        return send(res, 400, new ApiError(400, "invalid_request_error", "idempotency_key_in_use", `Idempotency key '${key}' was used with another request; use a new key for a new request.`, "Idempotency-Key").body);
      }
    }

    const ctx: Ctx = { env, params, q: parseForm(method === "POST" ? body : url.search.slice(1)) };
    let status = 200;
    let payload: unknown;
    env.setApiVersion(typeof req.headers["stripe-version"] === "string" ? req.headers["stripe-version"] : undefined);
    try {
      const out = route.handler(ctx);
      if (out instanceof Page) {
        if (method !== "GET") {
          store.save();
          afterChange();
        }
        const page = out.location ? { location: out.location } : { "content-type": "text/html; charset=utf-8" };
        res.writeHead(out.status, { ...page, ...pageSecurityHeaders(params.id ? store.state.sessions[params.id] : undefined) });
        return res.end(out.html);
      }
      payload = expand(store, JSON.parse(JSON.stringify(out)), strings(ctx.q, "expand"));
    } catch (e) {
      if (!(e instanceof ApiError)) throw e;
      status = e.status;
      payload = e.body;
    } finally {
      env.setApiVersion(undefined);
    }
    if (method !== "GET") {
      if (typeof key === "string") store.remember(key, { method, path: url.pathname, body, status, payload, at_ms: now });
      store.save();
      afterChange();
    }
    send(res, status, payload);
  };
}
