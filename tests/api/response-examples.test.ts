/**
 * The 200 response examples in the document are what the API really answers: each math endpoint's
 * request example is sent again through the HTTP stack and the body must equal the stored example
 * exactly (numbers included: the math is deterministic). A stale openapi/response-examples.json fails
 * here; `npm run gen:response-examples` rewrites it. A data endpoint's answer depends on the caller's own
 * rows (metering, claims), so its example is illustrative, says so, and is checked against the response schema.
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
/** The examples of the operation's success response (its first documented 2xx). */
const okExamples = (o: Operation) => {
  const status = Object.keys(o.responses).find((s) => s.startsWith("2"))!;
  // JSON, or the stream's own media type (Server-Sent Events).
  const content = Object.values(o.responses[status]?.content ?? {})[0] as { examples?: Examples } | undefined;
  return content?.examples ?? {};
};
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

describe("the served document's success responses", () => {
  it("every endpoint's success response has examples, and each passes its schema", () => {
    const v = documentValidator(doc);
    let checked = 0;
    for (const e of endpoints) {
      const o = operationsOf(doc).find((x) => x.operationId === e.id)!;
      const shown = okExamples(o);
      expect(Object.keys(shown).length, e.id).toBeGreaterThan(0);
      const schema = v.response(o, Object.keys(o.responses).find((s) => s.startsWith("2"))!)!;
      for (const [name, ex] of Object.entries(shown)) {
        expect(schema(ex.value), `${e.id} ${name}: ${v.errorsText(schema)}`).toBe(true);
        checked++;
      }
    }
    expect(checked).toBe(cases.length + endpoints.filter((e) => e.kind === "data").length);
  });

  it("shows the stored body under each math request example's name and summary", () => {
    for (const { e, name, ex } of cases) {
      const o = operationsOf(doc).find((x) => x.operationId === e.id)!;
      expect(okExamples(o)[name], `${e.id} ${name}`).toEqual({ summary: ex.summary, value: examples[e.id]![name] });
    }
  });

  it("marks each data endpoint's example as illustrative", () => {
    for (const e of endpoints.filter((x) => x.kind === "data")) {
      const shown = okExamples(operationsOf(doc).find((x) => x.operationId === e.id)!);
      expect(Object.keys(shown), e.id).toEqual(["illustrative"]);
      expect(shown.illustrative!.summary, e.id).toMatch(/^Illustrative only/);
    }
  });
});
