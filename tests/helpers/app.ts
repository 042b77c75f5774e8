/// <reference types="vite/client" />
import type { Server } from "node:http";
import { createRouteServer, type RouteModule } from "./route-server";

/** The real route modules under app/api on a node:http server (see route-server.ts); supertest drives it. */
const modules = import.meta.glob<RouteModule>("/app/api/**/route.ts", { eager: true });

export function createApp(): Server {
  return createRouteServer(modules);
}
