import { beforeAll, describe, expect, it } from "vitest";
import { endpoints } from "@/lib/api/registry";
import { unitsOf } from "@/lib/api/endpoint";
import { api, getQuery, postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey());
});

/** The status a call succeeds with: the first the definition documents, else 200. */
const successOf = (e: (typeof endpoints)[number]) => Number(Object.keys(e.statuses ?? { 200: "" })[0]);

const cases = endpoints.flatMap((e) => Object.entries(e.examples).map(([name, ex]) => ({ e, name, ex, label: `${e.method} ${e.path} example "${name}"` })));

type Json = Record<string, unknown>;
type Operation = {
  operationId?: string;
  parameters?: { name: string; in: string; examples?: Record<string, { value: unknown }>; example?: unknown }[];
  requestBody?: { content?: Record<string, { examples?: Record<string, { summary?: string; value: unknown }>; schema?: unknown }> };
  responses?: Record<string, unknown>;
  security?: Record<string, unknown>[];
};

describe("every documented request example runs", () => {
  it("the registry has endpoints, each with at least one example (but those that read one resource by its id, which a call makes first)", () => {
    expect(endpoints.length).toBeGreaterThan(0);
    for (const e of endpoints) expect(Object.keys(e.examples).length, e.id).toBe(e.params ? 0 : Math.max(1, Object.keys(e.examples).length));
  });

  it.each(cases)("$label: the example passes the input schema", ({ e, ex }) => {
    const parsed = e.input.safeParse(ex.value);
    expect(parsed.success, parsed.error?.message).toBe(true);
  });

  it.each(cases)("$label → a documented success status with a body that passes the output schema", async ({ e, ex }) => {
    const url = `/api/v1${e.path}`;
    const res =
      e.method === "GET"
        ? await getQuery(url, Object.fromEntries(Object.entries(ex.value as Json).map(([k, v]) => [k, String(v)])), auth)
        : await postJson(url, ex.value, auth);
    expect(Object.keys(e.statuses ?? { 200: "" }), res.text).toContain(String(res.status));
    expect(res.headers["content-type"]).toMatch(/^application\/json/);
    const out = e.output.safeParse(res.body);
    expect(out.success, out.error?.message).toBe(true);
    // The charge is a whole number of units, and the definition's cost gives the same number.
    const units = Number(res.headers["x-compute-units"]);
    expect(Number.isInteger(units) && units >= 0).toBe(true);
    const expected = unitsOf(e, e.input.parse(ex.value));
    expect(units).toBe(expected);
  });
});

describe("GET /api/v1/openapi.json", () => {
  let doc: Json & { paths: Record<string, Record<string, Operation>>; components: Record<string, Record<string, unknown>> };
  beforeAll(async () => {
    const res = await api().get("/api/v1/openapi.json");
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toMatch(/^application\/json/);
    doc = JSON.parse(res.text);
  });

  it("is served without a key, as an OpenAPI 3.1.0 document with info, servers, paths and components", () => {
    expect(doc.openapi).toBe("3.1.0");
    const info = doc.info as Json;
    expect(typeof info.title).toBe("string");
    expect(typeof info.version).toBe("string");
    expect(doc.servers).toEqual([{ url: "/api/v1" }]);
    expect(typeof doc.paths).toBe("object");
    for (const p of Object.keys(doc.paths)) expect(p.startsWith("/")).toBe(true);
  });

  it("has a path and operation for every registry endpoint, with its operationId, security and responses", () => {
    const ids = new Set<string>();
    for (const e of endpoints) {
      const op = doc.paths[e.path]?.[e.method.toLowerCase()];
      expect(op, `${e.method} ${e.path}`).toBeDefined();
      expect(op!.operationId).toBe(e.id);
      ids.add(op!.operationId!);
      expect(op!.responses).toHaveProperty(String(successOf(e)));
      expect(op!.responses).toHaveProperty("401");
      expect(op!.responses).toHaveProperty("422");
      expect(op!.responses).toHaveProperty("429");
      expect(op!.security).toEqual([{ apiKey: [] }]);
    }
    // Operation ids are unique across the document.
    const all = Object.values(doc.paths).flatMap((ops) => Object.values(ops).map((o) => o.operationId));
    expect(new Set(all).size).toBe(all.length);
    expect(ids.size).toBe(endpoints.length);
  });

  it("declares the bearer security scheme it uses", () => {
    expect(doc.components.securitySchemes!.apiKey).toMatchObject({ type: "http", scheme: "bearer" });
  });

  it("every $ref points at a component that exists", () => {
    const refs: string[] = [];
    const walk = (v: unknown) => {
      if (Array.isArray(v)) v.forEach(walk);
      else if (v && typeof v === "object") {
        for (const [k, x] of Object.entries(v)) {
          if (k === "$ref" && typeof x === "string") refs.push(x);
          else walk(x);
        }
      }
    };
    walk(doc);
    expect(refs.length).toBeGreaterThan(0);
    for (const ref of refs) {
      expect(ref.startsWith("#/")).toBe(true);
      const target = ref
        .slice(2)
        .split("/")
        .map((s) => s.replace(/~1/g, "/").replace(/~0/g, "~"))
        .reduce<unknown>((node, key) => (node && typeof node === "object" ? (node as Json)[key] : undefined), doc);
      expect(target, ref).toBeDefined();
    }
  });

  it.each(endpoints.filter((e) => e.method === "POST"))("$method $path: the request body carries every registry example", (e) => {
    const examples = doc.paths[e.path]![e.method.toLowerCase()]!.requestBody?.content?.["application/json"]?.examples;
    expect(examples).toBeDefined();
    for (const [name, ex] of Object.entries(e.examples)) {
      expect(examples![name], name).toBeDefined();
      expect(examples![name]!.value).toEqual(ex.value);
      expect(examples![name]!.summary).toBe(ex.summary);
    }
  });

  it.each(endpoints.filter((e) => e.method === "GET"))("$method $path: every registry example appears on the query parameters it sets", (e) => {
    const params = doc.paths[e.path]![e.method.toLowerCase()]!.parameters ?? [];
    for (const [name, ex] of Object.entries(e.examples)) {
      for (const [param, value] of Object.entries(ex.value as Json)) {
        const p = params.find((x) => x.name === param && x.in === "query");
        expect(p, `${name}: parameter ${param}`).toBeDefined();
        expect(p!.examples?.[name]?.value, `example "${name}" on parameter ${param}`).toEqual(value);
      }
    }
  });
});
