import Ajv2020, { type ValidateFunction } from "ajv/dist/2020";
import addFormats from "ajv-formats";
import { expect } from "vitest";
import { api } from "./api";

export type Json = null | boolean | number | string | Json[] | { [k: string]: Json };
export type SchemaObject = { [keyword: string]: Json };

export interface Operation {
  path: string;
  method: "get" | "post" | "delete";
  operationId: string;
  parameters?: { name: string; in: string; required?: boolean; schema: SchemaObject; examples?: Record<string, { value: Json }> }[];
  requestBody?: { content: Record<string, { schema: SchemaObject; examples?: Record<string, { value: Json }> }> };
  responses: Record<string, { description: string; content?: Record<string, { schema: SchemaObject }> }>;
  security?: unknown[];
}

export interface OpenApiDocument {
  openapi: string;
  paths: Record<string, Record<string, Omit<Operation, "path" | "method">>>;
  components: { schemas: Record<string, SchemaObject> };
}

/** The document the app serves at /api/v1/openapi.json. */
export async function servedDocument(): Promise<OpenApiDocument> {
  const res = await api().get("/api/v1/openapi.json");
  expect(res.status).toBe(200);
  expect(res.headers["content-type"]).toMatch(/^application\/json/);
  return JSON.parse(res.text) as OpenApiDocument;
}

export function operationsOf(doc: OpenApiDocument): Operation[] {
  return Object.entries(doc.paths).flatMap(([path, item]) =>
    Object.entries(item).map(([method, op]) => ({ ...op, path, method: method as Operation["method"] })),
  );
}

const escape = (s: string) => s.replace(/~/g, "~0").replace(/\//g, "~1");
const DOC = "paritas-openapi";

/**
 * ajv (JSON Schema 2020-12, the dialect of OpenAPI 3.1 schemas) over the whole document, so that schemas
 * anywhere in it compile with their $refs into components. `strict` also refuses unknown keywords and
 * formats; the OpenAPI vocabulary's own annotations (discriminator, example) are declared.
 */
export function documentValidator(doc: OpenApiDocument, opts: { strict?: boolean } = {}) {
  const ajv = new Ajv2020({ strict: opts.strict ?? false, strictTypes: false, strictTuples: false, allErrors: true, validateSchema: false });
  addFormats(ajv);
  ajv.addKeyword({ keyword: "discriminator" });
  ajv.addKeyword({ keyword: "example" });
  ajv.addSchema(doc as unknown as object, DOC);
  const cache = new Map<string, ValidateFunction>();
  /** The compiled schema at this JSON pointer into the document. */
  const at = (pointer: string): ValidateFunction => {
    let v = cache.get(pointer);
    if (!v) {
      v = ajv.compile({ $ref: `${DOC}#${pointer}` });
      cache.set(pointer, v);
    }
    return v;
  };
  const opPointer = (op: Pick<Operation, "path" | "method">) => `/paths/${escape(op.path)}/${op.method}`;
  return {
    at,
    /** The request body schema of an operation, or undefined for one without a body. */
    body: (op: Operation) => (op.requestBody ? at(`${opPointer(op)}/requestBody/content/application~1json/schema`) : undefined),
    /** A parameter's schema. */
    parameter: (op: Operation, index: number) => at(`${opPointer(op)}/parameters/${index}/schema`),
    /** The schema of a response's JSON body (application/json or application/problem+json). */
    response: (op: Operation, status: string) => {
      const content = op.responses[status]?.content ?? {};
      const type = Object.keys(content)[0];
      return type ? at(`${opPointer(op)}/responses/${status}/content/${escape(type)}/schema`) : undefined;
    },
    errorsText: (v: ValidateFunction) => ajv.errorsText(v.errors),
  };
}
