/**
 * The 200 response examples in the document are what the API really answers: each math endpoint's
 * request example is sent again through the HTTP stack and the body must equal the stored example
 * exactly (numbers included: the math is deterministic). A stale openapi/response-examples.json fails
 * here; `npm run gen:response-examples` rewrites it. GET /usage depends on the caller's metering rows,
 * so its example is illustrative, says so, and is checked only against the response schema.
 */
import { beforeAll, describe, expect, it } from "vitest";
import { computeEndpoints } from "@/lib/api/compute-endpoints";
import { endpoints } from "@/lib/api/registry";
import stored from "@/openapi/response-examples.json";
import type { ResponseExamples } from "@/openapi/response-examples";
import { postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";
import { documentValidator, operationsOf, servedDocument, type Json, type OpenApiDocument, type Operation } from "../helpers/openapi";

const examples: ResponseExamples = stored;
let auth: string;
let doc: OpenApiDocument;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey());
  doc = await servedDocument();
});

type Examples = Record<string, { summary?: string; value: Json }>;
const okExamples = (o: Operation) => (o.responses["200"]?.content?.["application/json"] as { examples?: Examples } | undefined)?.examples ?? {};
const cases = computeEndpoints.flatMap((e) => Object.entries(e.examples).map(([name, ex]) => ({ e, name, ex, label: `${e.method} ${e.path} "${name}"` })));

describe("stored response examples", () => {
  it("cover exactly the math endpoints' request examples", () => {
    expect(Object.keys(examples).sort()).toEqual(computeEndpoints.map((e) => e.id).sort());
    for (const e of computeEndpoints) expect(Object.keys(examples[e.id] ?? {}).sort(), e.id).toEqual(Object.keys(e.examples).sort());
  });

  it.each(cases)("$label: the request example, sent again, gets exactly the stored body", async ({ e, name, ex }) => {
    const res = await postJson(`/api/v1${e.path}`, ex.value, auth);
    expect(res.status, res.text).toBe(200);
    expect(res.body, "stale: run `npm run gen:response-examples`").toEqual(examples[e.id]![name]);
  });
});

describe("the served document's 200 responses", () => {
  it("every endpoint's 200 response has examples, and each passes the 200 schema", () => {
    const v = documentValidator(doc);
    let checked = 0;
    for (const e of endpoints) {
      const o = operationsOf(doc).find((x) => x.operationId === e.id)!;
      const shown = okExamples(o);
      expect(Object.keys(shown).length, e.id).toBeGreaterThan(0);
      const schema = v.response(o, "200")!;
      for (const [name, ex] of Object.entries(shown)) {
        expect(schema(ex.value), `${e.id} ${name}: ${v.errorsText(schema)}`).toBe(true);
        checked++;
      }
    }
    expect(checked).toBe(cases.length + 1);
  });

  it("shows the stored body under each math request example's name and summary", () => {
    for (const { e, name, ex } of cases) {
      const o = operationsOf(doc).find((x) => x.operationId === e.id)!;
      expect(okExamples(o)[name], `${e.id} ${name}`).toEqual({ summary: ex.summary, value: examples[e.id]![name] });
    }
  });

  it("marks the GET /usage example as illustrative", () => {
    const shown = okExamples(operationsOf(doc).find((x) => x.operationId === "usage")!);
    expect(Object.keys(shown)).toEqual(["illustrative"]);
    expect(shown.illustrative!.summary).toMatch(/^Illustrative only/);
  });
});
