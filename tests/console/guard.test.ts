import { beforeAll, describe, expect, it, vi } from "vitest";
import { z } from "zod";
import { ApiError } from "@/lib/api/errors";
import { consoleRoute, json, readJson, sameOrigin } from "@/lib/auth/guard";
import { sessionCookie } from "@/lib/auth/session";
import { expectFieldError, expectNoStackTrace, expectProblem } from "../helpers/api";
import { consoleCall, makeConsoleOrg, type ConsoleFixture } from "../helpers/console";

vi.mock(import("@/lib/mail/send"), async (orig) => ({ ...(await orig()), sendMail: vi.fn(async () => {}) }));

const call = (handler: Parameters<typeof consoleRoute>[0], init: RequestInit & { url?: string } = {}) =>
  consoleRoute(handler)(new Request(init.url ?? "http://console.example/api/console/x", init), { params: Promise.resolve({}) });

describe("consoleRoute", () => {
  it("renders an ApiError as problem+json with the request id, and marks every answer no-store", async () => {
    const res = await call(async () => {
      throw new ApiError("last-owner", "Leaving would leave no owner.");
    });
    expect(res.status).toBe(409);
    expect(res.headers.get("content-type")).toBe("application/problem+json");
    expect(res.headers.get("cache-control")).toBe("no-store");
    const body = await res.json();
    expect(body).toMatchObject({ type: "/problems/last-owner", status: 409, detail: "Leaving would leave no owner." });
    expect(body.instance).toBe(res.headers.get("x-request-id"));
    const ok = await call(async () => json({ fine: true }));
    expect(ok.headers.get("cache-control")).toBe("no-store");
    expect(ok.headers.get("x-request-id")).toMatch(/^req_/);
  });

  it("turns a zod failure anywhere in the handler into 422 with field pointers", async () => {
    const res = await call(async () => json(z.object({ a: z.object({ b: z.number() }) }).parse({ a: { b: "x" } })));
    expect(res.status).toBe(422);
    expect((await res.json()).errors).toEqual([{ pointer: "/a/b", message: expect.any(String) }]);
  });

  it("answers an unexpected failure with a 500 that reveals nothing, and logs it", async () => {
    const log = vi.spyOn(console, "error").mockImplementation(() => {});
    try {
      const res = await call(async () => {
        throw new TypeError("cannot read /work/main/lib/secret.ts:12:3");
      });
      expect(res.status).toBe(500);
      const text = await res.text();
      expect(text).not.toContain("secret");
      expectNoStackTrace(text);
      expect(log).toHaveBeenCalled();
    } finally {
      log.mockRestore();
    }
  });
});

describe("sameOrigin", () => {
  const guarded = (headers: Record<string, string>, url = "http://console.example/api/console/x") =>
    call(sameOrigin(async () => json({ ok: true })), { url, method: "POST", headers });

  it.each([
    ["Origin equal to the URL's origin", { origin: "http://console.example" }],
    ["Origin equal to the Host header's origin", { origin: "http://paritas.internal:8080", host: "paritas.internal:8080" }],
    ["Origin naming the host a TLS proxy forwards for", { origin: "https://console.paritas.example", "x-forwarded-proto": "https", "x-forwarded-host": "console.paritas.example" }],
    ["no Origin but Sec-Fetch-Site: same-origin", { "sec-fetch-site": "same-origin" }],
  ])("accepts %s", async (_name, headers) => {
    expect((await guarded(headers)).status).toBe(200);
  });

  it.each([
    ["another site", { origin: "http://evil.example" }],
    ["the same host on another port", { origin: "http://console.example:8443" }],
    ["the same host over another scheme", { origin: "https://console.example" }],
    ["a look-alike host", { origin: "http://console.example.evil.example" }],
    ["Origin: null", { origin: "null" }],
    ["no Origin and Sec-Fetch-Site: same-site", { "sec-fetch-site": "same-site" }],
    ["no Origin and no Sec-Fetch-Site", {}],
  ])("refuses %s with 403 cross-origin", async (_name, headers) => {
    const res = await guarded(headers);
    expect(res.status).toBe(403);
    expect((await res.json()).type).toBe("/problems/cross-origin");
  });
});

describe("readJson", () => {
  const schema = z.strictObject({ n: z.number() });
  const parse = (init: RequestInit) => call(async (req) => json(await readJson(req, schema)), { method: "POST", ...init });

  it("415 without a JSON content type, 400 for broken or empty JSON, 422 with the pointer for a bad field", async () => {
    expect((await parse({ body: '{"n":1}', headers: { "content-type": "text/plain" } })).status).toBe(415);
    expect((await parse({ body: "{n:", headers: { "content-type": "application/json" } })).status).toBe(400);
    expect((await parse({ body: "", headers: { "content-type": "application/json" } })).status).toBe(400);
    const bad = await parse({ body: '{"n":"one","extra":1}', headers: { "content-type": "application/json" } });
    expect(bad.status).toBe(422);
    expect((await bad.json()).errors.map((e: { pointer: string }) => e.pointer).sort()).toEqual(["/extra", "/n"]);
  });
});

describe("through the routes", () => {
  let fx: ConsoleFixture;
  beforeAll(async () => {
    fx = await makeConsoleOrg();
  });

  it("checks the role before the body: a developer's broken body to an owner route is 403, not 422", async () => {
    const res = await consoleCall("POST", `/api/console/orgs/${fx.org.slug}/invitations`, { cookie: fx.developer.cookie, body: { nonsense: true } });
    expectProblem(res, 403, "role-refused");
  });

  it("validates an allowed caller's body with field pointers", async () => {
    expectFieldError(await consoleCall("POST", `/api/console/orgs/${fx.org.slug}/invitations`, { cookie: fx.owner.cookie, body: { email: 5, role: "owner" } }), "/email");
  });

  it("a session of a user who no longer exists is no session", async () => {
    const ghost = await sessionCookie({ userId: 987654, email: "ghost@example.com" });
    expectProblem(await consoleCall("GET", "/api/console/me", { cookie: ghost }), 401, "signed-out");
  });

  it("reads are not origin-checked, and no CORS header lets another site read the answer", async () => {
    const res = await consoleCall("GET", `/api/console/orgs/${fx.org.slug}/members`, { cookie: fx.owner.cookie, origin: "http://evil.example" });
    expect(res.status).toBe(200);
    expect(res.headers["access-control-allow-origin"]).toBeUndefined();
  });
});
