import { beforeAll, describe, expect, it, vi } from "vitest";
import { z } from "zod";
import { insertMembership } from "@/db/queries/users";
import { endpoints } from "@/lib/api/registry";
import { consoleCall, makeConsoleOrg, type ConsoleFixture } from "../helpers/console";

vi.mock(import("@/lib/mail/send"), async (orig) => ({ ...(await orig()), sendMail: vi.fn(async () => {}) }));

let fx: ConsoleFixture;
beforeAll(async () => {
  fx = await makeConsoleOrg();
});

describe("GET /api/console/me", () => {
  it("the user from the database and every org they belong to, with their role there", async () => {
    await insertMembership(fx.db, { orgId: fx.other.id, userId: fx.developer.id, role: "billing" });
    const res = await consoleCall("GET", "/api/console/me", { cookie: fx.developer.cookie });
    expect(res.status, res.text).toBe(200);
    expect(res.body.user).toEqual({ id: fx.developer.id, email: fx.developer.email, name: "developer" });
    expect(res.body.orgs).toEqual([
      { slug: fx.other.slug, name: "Another org", plan: "lighthouse", role: "billing" },
      { slug: fx.org.slug, name: "Console org", plan: "lighthouse", role: "developer" },
    ]);
  });
});

describe("GET /api/console/endpoints", () => {
  it("lists every public endpoint with its full path, scope, examples and the JSON Schema of its input", async () => {
    const res = await consoleCall("GET", "/api/console/endpoints", { cookie: fx.billing.cookie });
    expect(res.status, res.text).toBe(200);
    const listed = res.body.endpoints as { id: string; method: string; path: string; scope: string; summary: string; examples: Record<string, { value: unknown }>; inputSchema: Record<string, unknown> }[];
    expect(listed.map((e) => e.id)).toEqual(endpoints.map((e) => e.id));
    for (const e of endpoints) {
      const l = listed.find((x) => x.id === e.id)!;
      expect(l).toMatchObject({ method: e.method, path: `/api/v1${e.path}`, scope: e.scope, summary: e.summary });
      expect(l.inputSchema.$schema).toBe("https://json-schema.org/draft/2020-12/schema");
      // A path parameter (a claim's or a simulation's id) is a form field too, required, beside the query or body.
      const own = JSON.parse(JSON.stringify(z.toJSONSchema(e.input, { io: "input" })));
      const params = e.params ? JSON.parse(JSON.stringify(z.toJSONSchema(e.params, { io: "input" }))) : undefined;
      expect(l.inputSchema).toEqual(params ? { ...own, properties: { ...params.properties, ...own.properties }, required: [...params.required, ...(own.required ?? [])] } : own);
      // The examples the try page offers pass the endpoint's own validation.
      for (const ex of Object.values(l.examples)) expect(e.input.safeParse(ex.value).success).toBe(true);
    }
    expect(listed.find((e) => e.id === "capacity")!.path).toBe("/api/v1/capacity");
  });
});
