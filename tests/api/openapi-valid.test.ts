/**
 * The served OpenAPI document is a valid OpenAPI 3.1 document (the official schema, through
 * @seriousme/openapi-schema-validator), every schema in it is valid JSON Schema 2020-12 (ajv in strict
 * mode: no unknown keywords or formats, every pattern a valid regular expression), the documented
 * examples are valid against it, and for the rules the server enforces on one field or between fields
 * the document and the server give the same verdict on the same request.
 */
import { Validator } from "@seriousme/openapi-schema-validator";
import Ajv2020 from "ajv/dist/2020";
import addFormats from "ajv-formats";
import { beforeAll, describe, expect, it } from "vitest";
import { getQuery, postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";
import { documentValidator, operationsOf, servedDocument, type OpenApiDocument, type Operation } from "../helpers/openapi";

let doc: OpenApiDocument;
let v: ReturnType<typeof documentValidator>;
let auth: string;
beforeAll(async () => {
  doc = await servedDocument();
  v = documentValidator(doc);
  ({ auth } = await makeOrgWithKey());
});

const op = (path: string) => operationsOf(doc).find((o) => o.path === path)!;

describe("the served document", () => {
  it("is a valid OpenAPI 3.1 document", async () => {
    const res = await new Validator().validate(doc as unknown as Record<string, unknown>);
    expect(res.errors ?? []).toEqual([]);
    expect(res.valid).toBe(true);
    expect(doc.openapi).toMatch(/^3\.1\./);
  });

  it("every schema in it compiles as JSON Schema 2020-12 in ajv's strict mode", () => {
    // `required` may name properties that another subschema defines (a oneOf or if/then next to `properties`).
    const ajv = new Ajv2020({ strict: true, strictTypes: false, strictTuples: false, strictRequired: false });
    addFormats(ajv);
    // OpenAPI's own annotations on schemas.
    ajv.addKeyword({ keyword: "discriminator" });
    ajv.addKeyword({ keyword: "example" });
    // Components become $defs of one schema resource, so that each schema compiles on its own with its $refs.
    const rebase = (node: unknown): unknown =>
      Array.isArray(node)
        ? node.map(rebase)
        : typeof node === "object" && node !== null
          ? Object.fromEntries(Object.entries(node).map(([k, v]) => [k, k === "$ref" && typeof v === "string" ? v.replace("#/components/schemas/", "components#/$defs/") : rebase(v)]))
          : node;
    ajv.addSchema({ $id: "components", $defs: rebase(doc.components.schemas) as Record<string, object> });
    const schemas: [string, unknown][] = [
      ...Object.keys(doc.components.schemas).map((id): [string, unknown] => [id, { $ref: `components#/$defs/${id}` }]),
      ...operationsOf(doc).flatMap((o) => [
        ...(o.parameters ?? []).map((p): [string, unknown] => [`${o.operationId} ${p.name}`, p.schema]),
        ...Object.entries(o.requestBody?.content ?? {}).map(([type, c]): [string, unknown] => [`${o.operationId} ${type}`, c.schema]),
        ...Object.entries(o.responses).flatMap(([status, r]) => Object.entries(r.content ?? {}).map(([type, c]): [string, unknown] => [`${o.operationId} ${status} ${type}`, c.schema])),
      ]),
    ];
    expect(schemas.length).toBeGreaterThan(40);
    for (const [where, schema] of schemas) expect(() => ajv.compile(rebase(schema) as object), where).not.toThrow();
  });

  it("every documented example is valid against its operation's schema", () => {
    let checked = 0;
    for (const o of operationsOf(doc)) {
      const body = v.body(o);
      for (const [name, ex] of Object.entries(o.requestBody?.content["application/json"]?.examples ?? {})) {
        expect(body!(ex.value), `${o.operationId} ${name}: ${v.errorsText(body!)}`).toBe(true);
        checked++;
      }
      (o.parameters ?? []).forEach((p, i) => {
        for (const [name, ex] of Object.entries(p.examples ?? {})) {
          expect(v.parameter(o, i)(ex.value), `${o.operationId} ${p.name} ${name}`).toBe(true);
          checked++;
        }
      });
    }
    expect(checked).toBeGreaterThan(25);
  });

  // The reference page's renderer (@scalar/api-reference 1.46) reported "document validation errors" for
  // every component holding a schema without `type` (CodeSpec, Word, MatrixRow, HammingCode's
  // `{ required: [...] }` branches, BchCode's if/then): it accepts a schema only with a `type` or a $ref.
  it("every component schema and subschema that constrains anything names its type (the renderer refuses one without)", () => {
    const untyped: string[] = [];
    const walk = (s: unknown, where: string): void => {
      if (typeof s !== "object" || s === null) return;
      const o = s as Record<string, unknown>;
      if (!("$ref" in o) && !("type" in o) && Object.keys(o).some((k) => k !== "description")) untyped.push(where);
      for (const k of ["anyOf", "oneOf", "allOf", "prefixItems"]) ((o[k] as unknown[] | undefined) ?? []).forEach((x, i) => walk(x, `${where}/${k}/${i}`));
      for (const k of ["items", "not", "if", "then", "else", "additionalProperties"]) walk(o[k], `${where}/${k}`);
      for (const [k, x] of Object.entries((o.properties as Record<string, unknown> | undefined) ?? {})) walk(x, `${where}/properties/${k}`);
    };
    for (const [id, schema] of Object.entries(doc.components.schemas)) walk(schema, id);
    expect(untyped).toEqual([]);
    for (const id of ["CodeSpec", "Word", "MatrixRow", "CodebookWord"]) expect(doc.components.schemas[id]!.type, id).toBeDefined();
  });

  it("states the Idempotency-Key header of every POST: 1 to 255 visible ASCII characters", () => {
    for (const o of operationsOf(doc).filter((x) => x.method === "post")) {
      const i = o.parameters!.findIndex((p) => p.name === "Idempotency-Key" && p.in === "header");
      expect(i, o.operationId).toBeGreaterThanOrEqual(0);
      const key = v.parameter(o, i);
      for (const ok of ["a", "ci-run-4711/step:2", "~".repeat(255)]) expect(key(ok), ok).toBe(true);
      for (const bad of ["", "a b", "tab\there", "é", "~".repeat(256)]) expect(key(bad), JSON.stringify(bad)).toBe(false);
    }
  });
});

/**
 * Requests on either side of a rule. Each is checked against the document and sent to the server: a
 * request the document accepts gets 200, one it refuses gets a 4xx problem. The limits are the server's
 * own (lib/core and the endpoint definitions); the BER ceilings are worked by hand from
 * (M − 1)/(M·log2 M) for M-PSK (8-PSK: 7/24 = 0.291666…).
 */
const cases: [string, string, unknown, boolean][] = [
  // The three disagreements a generated client ran into.
  ["awgn with snrDb", "/capacity", { channel: "awgn", snrDb: 3 }, true],
  ["awgn with snrDb and snr", "/capacity", { channel: "awgn", snrDb: 3, snr: 2 }, false],
  ["awgn with none of snrDb, snr, ebN0Db", "/capacity", { channel: "awgn" }, false],
  ["awgn with ebN0Db but no rate", "/capacity", { channel: "awgn", ebN0Db: 3 }, false],
  ["awgn with ebN0Db and rate", "/capacity", { channel: "awgn", ebN0Db: 3, rate: 0.5 }, true],
  ["bpsk-awgn with esN0Db and ebN0Db", "/capacity", { channel: "bpsk-awgn", esN0Db: 1, ebN0Db: 1, rate: 0.5 }, false],
  ["1024-PSK", "/links/ber", { modulation: "psk", order: 1024, ebN0Db: 20 }, true],
  ["2048-PSK", "/links/ber", { modulation: "psk", order: 2048, ebN0Db: 20 }, false],
  ["4096-QAM", "/links/ber", { modulation: "qam", order: 4096, ebN0Db: 20 }, true],
  ["8-QAM (not square)", "/links/ber", { modulation: "qam", order: 8, ebN0Db: 3 }, false],
  ["6-PSK", "/links/ber", { modulation: "psk", order: 6, ebN0Db: 3 }, false],
  ["psk without order", "/links/ber", { modulation: "psk", ebN0Db: 3 }, false],
  ["qpsk with order 4", "/links/ber", { modulation: "qpsk", order: 4, ebN0Db: 3 }, true],
  ["bpsk with order 4", "/links/ber", { modulation: "bpsk", order: 4, ebN0Db: 3 }, false],
  ["8-PSK nearest-neighbour target 0.29 (below 7/24)", "/links/ber", { modulation: "psk", order: 8, berFormula: "nearest-neighbour", targetBer: 0.29 }, true],
  ["8-PSK nearest-neighbour target 0.2917 (above 7/24)", "/links/ber", { modulation: "psk", order: 8, berFormula: "nearest-neighbour", targetBer: 0.2917 }, false],
  ["8-PSK exact target 0.4 (below ½)", "/links/ber", { modulation: "psk", order: 8, targetBer: 0.4 }, true],
  ["32-PSK target 0.19 (below 31/160)", "/links/ber", { modulation: "psk", order: 32, targetBer: 0.19 }, true],
  ["32-PSK target 0.2 (above 31/160)", "/links/ber", { modulation: "psk", order: 32, targetBer: 0.2 }, false],
  ["32-PSK exact", "/links/ber", { modulation: "psk", order: 32, berFormula: "exact", ebN0Db: 3 }, false],
  ["16-QAM exact target 0.4", "/links/ber", { modulation: "qam", order: 16, targetBer: 0.4 }, true],
  ["16-QAM nearest-neighbour target 0.4 (above 3/8)", "/links/ber", { modulation: "qam", order: 16, berFormula: "nearest-neighbour", targetBer: 0.4 }, false],
  ["nothing to compute", "/links/ber", { modulation: "bpsk" }, false],
  // Pairs, codebooks and codes.
  ["a and b", "/distance", { a: "101", b: "011" }, true],
  ["a without b", "/distance", { a: "101" }, false],
  ["a pair and a codebook", "/distance", { a: "1", b: "0", codebook: ["0", "1"] }, false],
  ["a bad character", "/distance", { a: "10x", b: "011" }, false],
  ["a CRC code without crcMessageBits", "/distance", { code: { family: "crc", preset: "CRC-8" } }, false],
  ["odd parity's minimum distance", "/distance", { code: { family: "parity", n: 4, parity: "odd" } }, false],
  ["a codebook word of 4,097 bits", "/distance", { codebook: [new Array(4097).fill(0), new Array(4097).fill(1)] }, false],
  // Code specs, per family and per field size.
  ["BCH m = 4, t = 7", "/codes/analyze", { code: { family: "bch", m: 4, t: 7 } }, true],
  ["BCH m = 4, t = 8", "/codes/analyze", { code: { family: "bch", m: 4, t: 8 } }, false],
  ["RS m = 4, n = 15", "/codes/analyze", { code: { family: "rs", m: 4, n: 15, k: 11 } }, true],
  ["RS m = 4, n = 16", "/codes/analyze", { code: { family: "rs", m: 4, n: 16, k: 11 } }, false],
  ["RS m = 4, firstRoot 15", "/codes/analyze", { code: { family: "rs", m: 4, k: 11, firstRoot: 15 } }, false],
  ["RS m = 4 with 0x13 (degree 4)", "/codes/analyze", { code: { family: "rs", m: 4, k: 11, primitivePoly: "0x13" } }, true],
  ["RS m = 4 with 0x25 (degree 5)", "/codes/analyze", { code: { family: "rs", m: 4, k: 11, primitivePoly: "0x25" } }, false],
  ["RS m = 4 with 37 = 0x25", "/codes/analyze", { code: { family: "rs", m: 4, k: 11, primitivePoly: 37 } }, false],
  ["p on a Reed–Solomon analysis", "/codes/analyze", { code: { family: "rs", m: 4, k: 11 }, p: 0.01 }, false],
  ["CRC analysis with crcMessageBits", "/codes/analyze", { code: { family: "crc", preset: "CRC-8/SMBUS" }, crcMessageBits: 16 }, true],
  ["CRC analysis without crcMessageBits", "/codes/analyze", { code: { family: "crc", preset: "CRC-8/SMBUS" } }, false],
  ["odd parity analysis", "/codes/analyze", { code: { family: "parity", n: 5, parity: "odd" } }, false],
  ["CRC without preset or width", "/codes/analyze", { code: { family: "crc", poly: 7 }, crcMessageBits: 8 }, false],
  ["CRC poly 0", "/codes/analyze", { code: { family: "crc", width: 8, poly: 0 }, crcMessageBits: 8 }, false],
  ["CRC poly 0x00", "/codes/analyze", { code: { family: "crc", width: 8, poly: "0x00" }, crcMessageBits: 8 }, false],
  ["an unknown CRC preset", "/codes/analyze", { code: { family: "crc", preset: "CRC-99/NOPE" }, crcMessageBits: 8 }, false],
  ["a linear code with both matrices", "/codes/analyze", { code: { family: "linear", generator: ["11"], parityCheck: ["11"] } }, false],
  ["a linear code with an empty row", "/codes/analyze", { code: { family: "linear", generator: ["_"] } }, false],
  ["a linear code with a row in hex", "/codes/analyze", { code: { family: "linear", generator: [{ hex: "e" }] } }, true],
  // Words per family.
  ["a {text} message for CRC", "/encode", { code: { family: "crc", preset: "CRC-8" }, messages: [{ text: "abc" }] }, true],
  ["a {text} message for Hamming", "/encode", { code: { family: "hamming", r: 3 }, messages: [{ text: "abc" }] }, false],
  ["CRC bytes in hex, odd digits", "/encode", { code: { family: "crc", preset: "CRC-8" }, messages: [{ hex: "abc" }] }, false],
  ["RS m = 4 symbol 16", "/encode", { code: { family: "rs", m: 4, k: 3 }, messages: [[1, 2, 16]] }, false],
  ["symbols for a binary code", "/encode", { code: { family: "hamming", r: 3 }, messages: [[1, 2, 0, 1]] }, false],
  ["erasures on Hamming", "/decode", { code: { family: "hamming", r: 3 }, words: ["1011010"], erasures: [[1]] }, false],
  ["empty erasures on Hamming", "/decode", { code: { family: "hamming", r: 3 }, words: ["1011010"], erasures: [[]] }, true],
  ["RS m = 4 erasure at 14", "/decode", { code: { family: "rs", m: 4, k: 9 }, words: [new Array(15).fill(0)], erasures: [[14]] }, true],
  ["RS m = 4 erasure at 15", "/decode", { code: { family: "rs", m: 4, k: 9 }, words: [new Array(15).fill(0)], erasures: [[15]] }, false],
  ["a position erased twice", "/decode", { code: { family: "rs", m: 4, k: 9 }, words: [new Array(15).fill(0)], erasures: [[2, 2]] }, false],
  // BSC.
  ["flips 10 in n = 1,000,000", "/channels/bsc", { n: 1_000_000, p: 0.1, flips: 10 }, true],
  ["flips above 10^6", "/channels/bsc", { n: 7, p: 0.1, flips: 1_000_001 }, false],
];

describe("the document and the server agree", () => {
  it.each(cases)("%s (%s)", async (_name, path, body, valid) => {
    const check = v.body(op(path))!;
    expect(check(body), v.errorsText(check)).toBe(valid);
    const res = await postJson(`/api/v1${path}`, body, auth);
    if (valid) expect(res.status, res.text).toBe(200);
    else expect([400, 422], res.text).toContain(res.status);
  });

  it.each([
    ["2028-02-29", true],
    ["2026-02-30", false],
    ["2026-13-01", false],
    ["2026-1-1", false],
  ])("usage from %s", async (from, valid) => {
    const usage = op("/usage");
    expect(v.parameter(usage, usage.parameters!.findIndex((p) => p.name === "from"))(from)).toBe(valid);
    const res = await getQuery("/api/v1/usage", { from, to: "2028-03-01" }, auth);
    expect(res.status, res.text).toBe(valid ? 200 : 422);
  });

  it.each([
    ["a visible-ASCII key", "run-1/step-2", 200],
    ["a key with a space", "run 1", 400],
    ["a key of 256 characters", "k".repeat(256), 400],
  ])("Idempotency-Key: %s", async (_name, key, status) => {
    const capacity: Operation = op("/capacity");
    const i = capacity.parameters!.findIndex((p) => p.name === "Idempotency-Key");
    expect(v.parameter(capacity, i)(key)).toBe(status === 200);
    const res = await postJson("/api/v1/capacity", { channel: "bsc", p: 0.11 }, auth, { "idempotency-key": key });
    expect(res.status, res.text).toBe(status);
  });
});
