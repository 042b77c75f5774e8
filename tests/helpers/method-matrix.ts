import { expect } from "vitest";
import { allowHeader, apiRoutes } from "@/lib/api/route-table";
import { expectNoStackTrace, type ProblemBody } from "./api";
import type { RawResponse } from "./raw-http";

/**
 * What every route under /api answers to every method, unknown paths and path tricks: one set of
 * expectations, checked against the route modules (tests/api/methods.test.ts) and against `next start`
 * (tests/e2e/methods.test.ts).
 */

/** The seven methods Next.js hands to handlers, TRACE (no fetch Request can carry it), WebDAV's PROPFIND, QUERY, and a token no HTTP parser knows. */
export const METHODS = ["GET", "HEAD", "POST", "PUT", "PATCH", "DELETE", "OPTIONS", "TRACE", "PROPFIND", "QUERY", "FROBNICATE"] as const;

const SAMPLE_PARAMS: Record<string, string> = { "[org]": "acme", "[id]": "1", "[userId]": "1", "[...nextauth]": "session" };

/** Every route of the table with a concrete path and its Allow value. */
export const routeCases = Object.entries(apiRoutes).map(([pattern, served]) => ({
  pattern,
  path: pattern.replace(/\[[^\]]+\]/g, (p) => SAMPLE_PARAMS[p]!),
  served: served as readonly string[],
  allow: allowHeader(served),
}));
export type RouteCase = (typeof routeCases)[number];

export const UNKNOWN_PATHS = ["/api", "/api/nothing", "/api/v1", "/api/v1/nothing", "/api/v2/encode", "/api/v1/encode/more", "/api/console/nothing", "/api/console/orgs/acme/nothing"];

export const PATH_TRICKS = [
  "/api/v1/%2e%2e/encode",
  "/api/v1/%2E%2E/%2e%2E/%2e%2e/etc/passwd",
  "/api/v1/../v1/encode",
  "/api/v1/./encode",
  "/api/v1/%2e/encode",
  "/api/v1%2fencode",
  "/api/v1/encode%2F",
  "/api//v1/encode",
  "//api/v1/encode",
  "/api/v1/encode//",
  "/api/v1\\encode",
  "/api%5cv1/encode",
  "/api/v1/%ZZ",
  "/api/v1/encode%",
  "/api/v1/%C3%28",
];
export const TRICK_METHODS = ["GET", "HEAD", "POST", "OPTIONS", "TRACE", "FROBNICATE"];

export type Send = (method: string, target: string, headers?: Record<string, string>) => Promise<RawResponse>;

/** A problem+json answer with this status and type; for HEAD, only the status and the content type (no body). */
export function expectProblemAnswer(res: RawResponse, method: string, status: number, code: string): ProblemBody | undefined {
  expect(res.status, `${method}: ${res.body}`).toBe(status);
  expect(res.headers["content-type"], method).toMatch(/^application\/problem\+json/);
  expect(res.headers["x-request-id"], method).toBeTruthy();
  if (method === "HEAD") {
    expect(res.body, method).toBe("");
    return undefined;
  }
  const body = JSON.parse(res.body) as ProblemBody;
  expect(body.type).toBe(`/problems/${code}`);
  expect(body.status).toBe(status);
  expect(body.instance).toBe(res.headers["x-request-id"]);
  expectNoStackTrace(res.body);
  return body;
}

/**
 * One route, one method: a served method reaches the route's own handler (whatever it answers without a key
 * or a session, it is not a 405, a 5xx or the catch-all's 404); HEAD answers as GET without a body; OPTIONS is
 * 204 with Allow; any other method is a 405 problem with Allow.
 */
export async function checkRouteMethod(send: Send, c: RouteCase, method: string): Promise<void> {
  const res = await send(method, c.path);
  const asGet = method === "HEAD" && c.served.includes("GET");
  if (c.served.includes(method) || asGet) {
    expect(res.status, res.body).not.toBe(405);
    expect(res.status, res.body).toBeLessThan(500);
    expect(res.body).not.toContain("There is no endpoint");
    if (asGet) {
      const get = await send("GET", c.path);
      expect(res.status).toBe(get.status);
      expect(res.headers["content-type"]).toBe(get.headers["content-type"]);
      expect(res.body).toBe("");
    } else {
      expect(res.headers["content-type"]).toMatch(/^application\/(problem\+)?json/);
    }
  } else if (method === "OPTIONS") {
    expect(res.status).toBe(204);
    expect(res.headers["allow"]).toBe(c.allow);
    expect(res.headers["x-request-id"]).toBeTruthy();
    expect(res.body).toBe("");
  } else {
    const p = expectProblemAnswer(res, method, 405, "method-not-allowed");
    expect(res.headers["allow"]).toBe(c.allow);
    if (p) expect(p.detail).toContain(`${method} is not allowed on `);
  }
}

/** An unknown path: a 404 problem for every method, without Allow. */
export async function checkUnknownPath(send: Send, path: string): Promise<void> {
  for (const method of METHODS) {
    const res = await send(method, path);
    expectProblemAnswer(res, method, 404, "not-found");
    expect(res.headers["allow"], method).toBeUndefined();
  }
}

/** A path trick: a 404 problem for every method, never a redirect or the resolved path's answer. */
export async function checkPathTrick(send: Send, path: string): Promise<void> {
  for (const method of TRICK_METHODS) {
    const p = expectProblemAnswer(await send(method, path), method, 404, "not-found");
    if (p) expect(p.detail).toContain("names nothing");
  }
}
