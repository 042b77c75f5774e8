/**
 * The route modules under app/api behind the front door, as a server process of its own, for tests that
 * need one they can kill (tests/api/crash.test.ts). A production `next build` takes minutes; this starts in
 * seconds and runs the same handlers, database code and worker pool.
 *
 *   node --import tsx tests/helpers/serve.ts      # PORT (default 0: a free one) on 127.0.0.1; PARITAS_* as for the app
 *
 * Prints `listening <port>` once the database is migrated and the port is open.
 */
import { readdirSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { getDb } from "@/db";
import { createRouteServer, type RouteModule } from "./route-server";

const root = fileURLToPath(new URL("../../", import.meta.url));
const apiDir = join(root, "app", "api");
const files = readdirSync(apiDir, { recursive: true, encoding: "utf8" }).filter((f) => f === "route.ts" || f.endsWith("/route.ts"));
const modules: Record<string, RouteModule> = {};
for (const f of files) modules[`/app/api/${f}`] = (await import(pathToFileURL(join(apiDir, f)).href)) as RouteModule;

await getDb();
const server = createRouteServer(modules);
server.listen(Number(process.env.PORT ?? 0), "127.0.0.1", () => {
  const addr = server.address();
  console.log(`listening ${typeof addr === "object" && addr ? addr.port : ""}`);
});
