import type { Server } from "node:http";
import type { AddressInfo } from "node:net";
import { createRequire } from "node:module";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { frontDoor } from "@/lib/api/front-door";
import { endpoints } from "@/lib/api/registry";
import { allowHeader, apiRoutes } from "@/lib/api/route-table";
import { createApp } from "../helpers/app";
import {
  checkPathTrick,
  checkRouteMethod,
  checkUnknownPath,
  expectProblemAnswer,
  METHODS,
  PATH_TRICKS,
  routeCases,
  UNKNOWN_PATHS,
} from "../helpers/method-matrix";
import { rawRequest } from "../helpers/raw-http";

/**
 * Every route under /api × every method, sent byte for byte over a socket (no client normalises anything):
 * the served methods reach their handlers, HEAD answers as GET without a body, OPTIONS lists the methods,
 * every other method — a standard one, TRACE, WebDAV's PROPFIND, QUERY, a token no parser knows — is a 405
 * problem with Allow; unknown paths and path tricks are 404 problems (tests/helpers/method-matrix.ts).
 * tests/e2e/methods.test.ts checks the same against `next start`.
 */

// next-auth reads next/headers, which has no request scope outside Next.js: answer it with an anonymous visitor.
const nextHeaders = createRequire(import.meta.url)("next/headers") as { headers: () => unknown; cookies: () => unknown };
vi.spyOn(nextHeaders, "headers").mockImplementation(async () => new Headers());
vi.spyOn(nextHeaders, "cookies").mockImplementation(async () => ({ getAll: () => [] }));

let server: Server;
let port: number;
beforeAll(async () => {
  process.env.NEXTAUTH_URL = "http://localhost";
  server = createApp();
  await new Promise<void>((ok) => server.listen(0, "127.0.0.1", ok));
  port = (server.address() as AddressInfo).port;
});
afterAll(async () => {
  delete process.env.NEXTAUTH_URL;
  await new Promise<void>((ok) => server.close(() => ok()));
});

const send = (method: string, target: string, headers: Record<string, string> = {}) => rawRequest(port, method, target, { headers });

describe("the route table (lib/api/route-table.ts)", () => {
  it("names every route module under app/api, with the methods its handlers serve", async () => {
    const files = Object.keys(import.meta.glob("/app/api/**/route.ts"));
    const patterns = files.map((f) => f.replace(/^\/app/, "").replace(/\/route\.ts$/, "")).filter((p) => p !== "/api/[[...path]]");
    expect(patterns.sort()).toEqual(Object.keys(apiRoutes).sort());
  });

  it("lists every public endpoint of the registry under /api/v1 with its method", () => {
    // The reference writes a path parameter {id}; the App Router [id].
    for (const e of endpoints) expect(apiRoutes[`/api/v1${e.path.replace(/\{(\w+)\}/g, "[$1]")}`], e.id).toContain(e.method);
  });

  it("Allow: the served methods, HEAD with GET, OPTIONS always, in one fixed order", () => {
    expect(allowHeader(["POST"])).toBe("POST, OPTIONS");
    expect(allowHeader(["GET"])).toBe("GET, HEAD, OPTIONS");
    expect(allowHeader(["DELETE", "PATCH"])).toBe("PATCH, DELETE, OPTIONS");
    expect(allowHeader(["POST", "GET"])).toBe("GET, HEAD, POST, OPTIONS");
  });
});

describe.each(routeCases)("$pattern", (c) => {
  it.each(METHODS)("%s", (method) => checkRouteMethod(send, c, method));
});

describe("paths no route serves", () => {
  it.each(UNKNOWN_PATHS)("%s → 404 problem for every method", (path) => checkUnknownPath(send, path));

  it("an action next-auth does not have → 404 problem, not its plain-text 400", async () => {
    for (const method of ["GET", "POST"]) expectProblemAnswer(await send(method, "/api/auth/nonsense"), method, 404, "not-found");
  });
});

describe("path tricks under /api → 404 problem, whatever the method", () => {
  it.each(PATH_TRICKS)("%s", (path) => checkPathTrick(send, path));
});

describe("the front door's answers", () => {
  it("carry the caller's X-Request-Id, as every other answer does", async () => {
    const res = await send("TRACE", "/api/v1/encode", { "x-request-id": "trace-check-0001" });
    expect(res.headers["x-request-id"]).toBe("trace-check-0001");
    expect(JSON.parse(res.body).instance).toBe("trace-check-0001");
  });

  it("a method token Node's parser refuses is answered on the socket, which then closes", async () => {
    const res = await send("FROBNICATE", "/api/v1/distance");
    expectProblemAnswer(res, "FROBNICATE", 405, "method-not-allowed");
    expect(res.headers["allow"]).toBe("POST, OPTIONS");
    expect(res.headers["connection"]).toBe("close");
    expect(Number(res.headers["content-length"])).toBe(Buffer.byteLength(res.body));
  });

  it("a method with a body (QUERY) is refused without the body being needed", async () => {
    const res = await rawRequest(port, "QUERY", "/api/v1/usage", { headers: { "content-type": "application/json" }, body: '{"from":"2026-01-01"}' });
    expectProblemAnswer(res, "QUERY", 405, "method-not-allowed");
    expect(res.headers["allow"]).toBe("GET, HEAD, OPTIONS");
  });

  it("leave everything outside /api, and clean paths with the seven methods, to Next.js", () => {
    expect(frontDoor("TRACE", "/")).toBeNull();
    expect(frontDoor("PROPFIND", "/console/acme")).toBeNull();
    expect(frontDoor("GET", "/docs/../x")).toBeNull();
    expect(frontDoor("GET", "/apis/v1/encode")).toBeNull();
    expect(frontDoor("OPTIONS", "*")).toBeNull();
    for (const m of ["GET", "HEAD", "POST", "PUT", "PATCH", "DELETE", "OPTIONS"]) expect(frontDoor(m, "/api/v1/encode?x=%2e%2e")).toBeNull();
    // An escaped unreserved character is that character (RFC 3986 §6.2.2.2): the path is clean.
    expect(frontDoor("POST", "/api/v1/%65ncode")).toBeNull();
  });

  it("read the path of an absolute-form target and of escaped unreserved characters", () => {
    expect(frontDoor("TRACE", "http://paritas.example/api/v1/encode")).toMatchObject({ code: "method-not-allowed", allow: "POST, OPTIONS" });
    expect(frontDoor("TRACE", "/%61pi/v1/%65ncode")).toMatchObject({ code: "method-not-allowed", allow: "POST, OPTIONS" });
    expect(frontDoor("GET", "/%61pi/v1/%2e%2e/encode")).toMatchObject({ code: "not-found" });
    expect(frontDoor("TRACE", "/api/console/orgs/acme/members/7")).toMatchObject({ code: "method-not-allowed", allow: "PATCH, DELETE, OPTIONS" });
  });
});
