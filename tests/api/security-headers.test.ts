import { createRequire } from "node:module";
import type { Response } from "supertest";
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { apiRoutes } from "@/lib/api/route-table";
import { api } from "../helpers/api";
import { makeConsoleOrg, SAME_ORIGIN, type ConsoleFixture } from "../helpers/console";
import { makeOrgWithKey } from "../helpers/fixtures";

/**
 * Every route of the route table (lib/api/route-table.ts), every method it serves and OPTIONS, through the real
 * route modules: the security headers on every answer, `no-store` on every answer that used a key or a session,
 * and no cross-origin grant. Expected values are written out here from the OWASP Secure Headers Project's
 * recommendations (owasp.org/www-project-secure-headers, "Best practices"), not read from the code.
 */

vi.mock(import("@/lib/mail/send"), async (orig) => ({ ...(await orig()), sendMail: vi.fn(async () => {}) }));

// next-auth reads next/headers, which has no request scope outside Next.js: answer it with an anonymous visitor.
const nextHeaders = createRequire(import.meta.url)("next/headers") as { headers: () => unknown; cookies: () => unknown };
vi.spyOn(nextHeaders, "headers").mockImplementation(async () => new Headers());
vi.spyOn(nextHeaders, "cookies").mockImplementation(async () => ({ getAll: () => [] }));

// The public origin of these tests (createApp's requests are to http://localhost); one test switches it to https.
beforeEach(() => {
  process.env.NEXTAUTH_URL = "http://localhost";
});
afterAll(() => {
  delete process.env.NEXTAUTH_URL;
});

let fx: ConsoleFixture;
let keyAuth: string;
beforeAll(async () => {
  fx = await makeConsoleOrg();
  keyAuth = (await makeOrgWithKey()).auth;
});

type Verb = "GET" | "HEAD" | "POST" | "PUT" | "PATCH" | "DELETE" | "OPTIONS";
const SAMPLE: Record<string, () => string> = { "[org]": () => fx.org.slug, "[id]": () => "1", "[userId]": () => String(fx.spare.id), "[...nextauth]": () => "session" };
const cases = () =>
  Object.entries(apiRoutes).flatMap(([pattern, served]) => {
    const path = pattern.replace(/\[[^\]]+\]/g, (p) => SAMPLE[p]!());
    return [...served, "OPTIONS" as const].map((method) => ({ pattern, path, method: method as Verb }));
  });

function call(method: Verb, path: string, headers: Record<string, string> = {}): Promise<Response> {
  const client = api();
  let req = method === "OPTIONS" ? client.options(path) : method === "HEAD" ? client.head(path) : client[method.toLowerCase() as "get" | "post" | "put" | "patch" | "delete"](path);
  for (const [k, v] of Object.entries(headers)) req = req.set(k, v);
  if (method === "POST" || method === "PUT" || method === "PATCH") req = req.set("content-type", "application/json").send("{}");
  return req;
}

function expectSecurityHeaders(res: Response, what: string): void {
  const h = res.headers as Record<string, string | undefined>;
  expect(h["x-content-type-options"], what).toBe("nosniff");
  expect(h["referrer-policy"], what).toBe("strict-origin-when-cross-origin");
  expect(h["x-frame-options"], what).toBe("DENY");
  for (const feature of ["camera", "microphone", "geolocation", "payment", "usb"]) expect(h["permissions-policy"], what).toContain(`${feature}=()`);
  // An API answer is data: OWASP's REST cheat sheet asks for frame-ancestors 'none' and nothing loaded from it.
  expect(h["content-security-policy"], what).toBe("default-src 'none'; frame-ancestors 'none'");
  expect(Object.keys(h).filter((k) => k.startsWith("access-control-")), what).toEqual([]);
}

describe("security headers on every /api route (route table)", () => {
  it("are on every answer to every served method and OPTIONS, without credentials; no HSTS over http", async () => {
    const all = cases();
    expect(all.length).toBeGreaterThan(Object.keys(apiRoutes).length);
    for (const c of all) {
      const res = await call(c.method, c.path);
      expect(res.status, `${c.method} ${c.path}`).toBeLessThan(500);
      expectSecurityHeaders(res, `${c.method} ${c.path} → ${res.status}`);
      expect(res.headers["strict-transport-security"], c.path).toBeUndefined();
    }
  });

  it("carry HSTS with includeSubDomains when the public origin is https", async () => {
    process.env.NEXTAUTH_URL = "https://paritas.example";
    for (const path of ["/api/health", "/api/v1/openapi.json", "/api/v1/encode", "/api/console/me", "/api/nothing"]) {
      const res = await call("GET", path);
      expect(res.headers["strict-transport-security"], path).toMatch(/^max-age=(\d+); includeSubDomains$/);
      // OWASP: at least a year (31536000 s).
      expect(Number(/max-age=(\d+)/.exec(res.headers["strict-transport-security"] as string)![1]), path).toBeGreaterThanOrEqual(31_536_000);
    }
  });

  it("a front-door answer (a method Next.js never hands a route) has them too", async () => {
    const res = await call("GET", "/api/v1/%2e%2e/encode");
    expect(res.status).toBe(404);
    expectSecurityHeaders(res, "path trick");
  });
});

describe("no shared cache keeps an answer that used a key or a session", () => {
  it("every /api/v1 route answers a keyed call with Cache-Control: no-store", async () => {
    const keyed = cases().filter((c) => c.pattern.startsWith("/api/v1/") && c.pattern !== "/api/v1/openapi.json" && c.method !== "OPTIONS");
    expect(keyed.length).toBeGreaterThanOrEqual(15);
    for (const c of keyed) {
      const res = await call(c.method, c.path, { authorization: keyAuth });
      // The key was read: not a 401 (a 404 for the sample id or a 422 for the empty body are answers for this key).
      expect(res.status, `${c.method} ${c.path}`).not.toBe(401);
      expect(res.status, `${c.method} ${c.path}`).toBeLessThan(500);
      expect(res.headers["cache-control"], `${c.method} ${c.path} → ${res.status}`).toBe("no-store");
      expectSecurityHeaders(res, `${c.method} ${c.path}`);
    }
  });

  it("a refused key's answer is no-store too", async () => {
    const res = await call("POST", "/api/v1/encode", { authorization: "Bearer test.prt1.not-a-key" });
    expect(res.status).toBe(401);
    expect(res.headers["cache-control"]).toBe("no-store");
  });

  it("every console route answers a signed-in call with Cache-Control: no-store", async () => {
    const signedIn = cases().filter((c) => c.pattern.startsWith("/api/console/") && c.method !== "OPTIONS");
    expect(signedIn.length).toBeGreaterThanOrEqual(25);
    for (const c of signedIn) {
      const res = await call(c.method, c.path, { cookie: fx.owner.cookie, origin: SAME_ORIGIN });
      expect(res.status, `${c.method} ${c.path}`).toBeLessThan(500);
      expect(res.status, `${c.method} ${c.path}`).not.toBe(401);
      expect(res.headers["cache-control"], `${c.method} ${c.path} → ${res.status}`).toBe("no-store");
    }
  });
});

describe("cross-origin: browsers on other origins get no grant", () => {
  it("a CORS preflight from another origin gets no Access-Control-Allow-Origin on any /api/v1 route", async () => {
    for (const c of cases().filter((x) => x.pattern.startsWith("/api/v1/") && x.method !== "OPTIONS")) {
      const res = await call("OPTIONS", c.path, {
        origin: "https://elsewhere.example",
        "access-control-request-method": c.method,
        "access-control-request-headers": "authorization, content-type",
      });
      expect(res.status, c.path).toBe(204);
      expect(res.headers["access-control-allow-origin"], c.path).toBeUndefined();
      expect(res.headers["access-control-allow-headers"], c.path).toBeUndefined();
      expectSecurityHeaders(res, `preflight ${c.path}`);
    }
  });

  it("a keyed call that names another origin is answered without a grant, so a page there cannot read it", async () => {
    const res = await call("POST", "/api/v1/encode", { authorization: keyAuth, origin: "https://elsewhere.example" });
    expect(res.headers["access-control-allow-origin"]).toBeUndefined();
    expect(res.headers["access-control-allow-credentials"]).toBeUndefined();
  });
});
