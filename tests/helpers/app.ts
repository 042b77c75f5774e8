/// <reference types="vite/client" />
import { createServer, type IncomingMessage, type Server } from "node:http";

/**
 * A node:http adapter around the real route modules under app/api, routed the way the
 * App Router does it: static segments, [param], [...catchAll] and [[...optionalCatchAll]]. supertest drives it.
 */
type Handler = (req: Request, ctx: { params: Promise<Record<string, string | string[]>> }) => Promise<Response> | Response;
type RouteModule = Partial<Record<string, Handler>>;

const modules = import.meta.glob<RouteModule>("/app/api/**/route.ts", { eager: true });

interface Route {
  segments: string[];
  module: RouteModule;
  rank: number;
}

const routeTable: Route[] = Object.entries(modules)
  .map(([file, module]) => {
    const segments = file.replace(/^\/app/, "").replace(/\/route\.ts$/, "").split("/").filter(Boolean);
    // Static segments win over [param], which wins over [...catchAll].
    const rank = segments.reduce((r, s) => r * 3 + (s.startsWith("[...") || s.startsWith("[[...") ? 2 : s.startsWith("[") ? 1 : 0), 0);
    return { segments, module, rank };
  })
  .sort((a, b) => a.rank - b.rank);

function match(pathname: string): { module: RouteModule; params: Record<string, string | string[]> } | undefined {
  const parts = pathname.split("/").filter(Boolean).map(decodeURIComponent);
  for (const r of routeTable) {
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

async function toRequest(req: IncomingMessage): Promise<Request> {
  const chunks: Buffer[] = [];
  for await (const c of req) chunks.push(c as Buffer);
  const body = Buffer.concat(chunks);
  const headers = new Headers();
  for (const [k, v] of Object.entries(req.headers)) if (v !== undefined) headers.set(k, Array.isArray(v) ? v.join(", ") : v);
  const hasBody = req.method !== "GET" && req.method !== "HEAD" && body.length > 0;
  return new Request(`http://localhost${req.url}`, { method: req.method, headers, body: hasBody ? body : undefined });
}

export function createApp(): Server {
  return createServer(async (req, res) => {
    const url = new URL(req.url ?? "/", "http://localhost");
    const hit = match(url.pathname);
    const handler = hit?.module[req.method ?? "GET"];
    if (!hit || !handler) {
      res.writeHead(404).end();
      return;
    }
    const response = await handler(await toRequest(req), { params: Promise.resolve(hit.params) });
    res.writeHead(response.status, Object.fromEntries(response.headers));
    res.end(Buffer.from(await response.arrayBuffer()));
  });
}
