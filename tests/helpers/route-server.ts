import { createServer, type IncomingMessage, type Server } from "node:http";
import { NextRequest } from "next/server";
import { installFrontDoor } from "@/lib/api/front-door";
import { bySpecificity } from "@/lib/api/route-table";

/**
 * A node:http server over the real route modules under app/api, routed the way the App Router does it
 * (static segments, [param], [...catchAll] and [[...optionalCatchAll]]) and behind the same front door as
 * the production server. tests/helpers/app.ts feeds it the modules through vite; serve.ts through plain imports.
 */
type Handler = (req: Request, ctx: { params: Promise<Record<string, string | string[]>> }) => Promise<Response> | Response;
export type RouteModule = Partial<Record<string, Handler>>;

interface Route {
  segments: string[];
  module: RouteModule;
}

/** `modules`: route file path ("/app/api/…/route.ts") → its module; the first route that matches a path is the one Next.js picks. */
function routeTable(modules: Record<string, RouteModule>): Route[] {
  return Object.entries(modules)
    .map(([file, module]) => ({ segments: file.replace(/^\/app/, "").replace(/\/route\.ts$/, "").split("/").filter(Boolean), module }))
    .sort((a, b) => bySpecificity(a.segments, b.segments));
}

function match(table: Route[], pathname: string): { module: RouteModule; params: Record<string, string | string[]> } | undefined {
  const parts = pathname.split("/").filter(Boolean).map(decodeURIComponent);
  for (const r of table) {
    const params: Record<string, string | string[]> = {};
    let ok = true;
    for (let i = 0; i < r.segments.length && ok; i++) {
      const s = r.segments[i]!;
      if (s.startsWith("[[...")) {
        params[s.slice(5, -2)] = parts.slice(i);
        return { module: r.module, params };
      }
      if (s.startsWith("[...")) {
        if (parts.length <= i) break;
        params[s.slice(4, -1)] = parts.slice(i);
        return { module: r.module, params };
      }
      if (parts[i] === undefined) ok = false;
      else if (s.startsWith("[")) params[s.slice(1, -1)] = parts[i]!;
      else if (s !== parts[i]) ok = false;
    }
    if (ok && parts.length === r.segments.length) return { module: r.module, params };
  }
  return undefined;
}

// A NextRequest, as Next.js passes route handlers (next-auth reads its nextUrl).
async function toRequest(req: IncomingMessage): Promise<NextRequest> {
  const chunks: Buffer[] = [];
  for await (const c of req) chunks.push(c as Buffer);
  const body = Buffer.concat(chunks);
  const headers = new Headers();
  for (const [k, v] of Object.entries(req.headers)) if (v !== undefined) headers.set(k, Array.isArray(v) ? v.join(", ") : v);
  const hasBody = req.method !== "GET" && req.method !== "HEAD" && body.length > 0;
  return new NextRequest(`http://localhost${req.url}`, { method: req.method, headers, body: hasBody ? body : undefined });
}

export function createRouteServer(modules: Record<string, RouteModule>): Server {
  const table = routeTable(modules);
  const server = createServer(async (req, res) => {
    const url = new URL(req.url ?? "/", "http://localhost");
    const hit = match(table, url.pathname);
    const handler = hit?.module[req.method ?? "GET"];
    if (!hit || !handler) {
      res.writeHead(404).end();
      return;
    }
    let response: Response;
    try {
      response = await handler(await toRequest(req), { params: Promise.resolve(hit.params) });
    } catch (err) {
      // What Next.js does with a handler that throws.
      console.error(err);
      response = new Response("Internal Server Error", { status: 500, headers: { "content-type": "text/plain" } });
    }
    res.writeHead(response.status, Object.fromEntries(response.headers));
    res.end(Buffer.from(await response.arrayBuffer()));
  });
  installFrontDoor(server);
  return server;
}
