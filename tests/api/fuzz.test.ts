/**
 * Schema-driven fuzzing of every operation in the served OpenAPI document. Requests come from the
 * document's own request schemas through fast-check (fixed seeds, so every run sends the same
 * requests): bodies and queries the document accepts, the documented examples, and mutations of both
 * (wrong types, out-of-range numbers, missing required and unknown fields, broken JSON, other content
 * types, odd Idempotency-Key values, replays). Sizes stay small (tests/helpers/schema-arbitrary.ts):
 * how heavy requests are bounded is tested elsewhere.
 *
 * Every answer must carry an X-Request-Id, never be a 5xx, have a status the document lists for the
 * operation, and be either a 2xx whose body is valid against the operation's 200 schema (ajv, JSON
 * Schema 2020-12) or an application/problem+json with type, title, status and detail, valid against
 * the Problem schema, whose validation failures list `errors` with JSON pointers that lead into the
 * request. A request the document refuses must not be answered with a 2xx.
 *
 * A longer run: PARITAS_FUZZ_VALID=600 PARITAS_FUZZ_MUTATED=1500 (per operation), another PARITAS_FUZZ_SEED,
 * and PARITAS_FUZZ_REPORT=1 to print how many answers of each status every kind of request got.
 */
import type { Server } from "node:http";
import fc from "fast-check";
import request, { type Response } from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { buildOpenApiDocument } from "@/openapi/document";
import { createApp } from "../helpers/app";
import { makeOrgWithKey } from "../helpers/fixtures";
import { documentValidator, operationsOf, servedDocument, type Json, type OpenApiDocument, type Operation } from "../helpers/openapi";
import { arbitraryFor, type Limits } from "../helpers/schema-arbitrary";

/** Cheap sizes: codes of a few dozen bits, fields up to GF(2^5), short words and lists. */
const limits: Limits = {
  caps: { n: 24, k: 20, m: 5, r: 5, t: 6, shorten: 6, dmin: 24, flips: 24, firstRoot: 30, primitiveElement: 31, crcMessageBits: 64, length: 64 },
  maxItems: 4,
  maxLength: 24,
};
/** Requests per POST operation: generated valid bodies, then mutations of those and of the examples. */
const VALID = Number(process.env.PARITAS_FUZZ_VALID ?? 100);
const MUTATED = Number(process.env.PARITAS_FUZZ_MUTATED ?? 220);
/** Calls per key, below the 600 a minute the rate limiter allows. */
const CALLS_PER_KEY = 400;

let server: Server;
let doc: OpenApiDocument;
let v: ReturnType<typeof documentValidator>;
let auth = "";
let calls = CALLS_PER_KEY;

beforeAll(async () => {
  server = createApp().listen(0);
  doc = await servedDocument();
  // Generate from the document as the schemas state it: the types added for the reference renderer only
  // restate each schema's keywords, and the generator would read a bare `type` as "any value of it".
  const plain = JSON.parse(JSON.stringify(buildOpenApiDocument({ explicitTypes: false }))) as OpenApiDocument;
  expect(Object.keys(plain.paths)).toEqual(Object.keys(doc.paths));
  doc = plain;
  v = documentValidator(doc);
});
afterAll(() => new Promise<void>((done) => server.close(() => done())));

async function currentAuth(): Promise<string> {
  if (calls++ >= CALLS_PER_KEY) {
    ({ auth } = await makeOrgWithKey());
    calls = 1;
  }
  return auth;
}

interface Sent {
  label: string;
  method: "get" | "post" | "delete" | "put";
  path: string;
  headers: Record<string, string>;
  /** The body as sent (POST). */
  text?: string;
  /** The query (GET). */
  query?: Record<string, string>;
  /** What a pointer in a validation failure must lead into: the parsed body, or the query. */
  target?: Json;
  /** The document's verdict on the request, where it has one. */
  documentValid?: boolean;
}

async function send(s: Sent): Promise<Response> {
  let req = request(server)[s.method](`/api/v1${s.path}`);
  for (const [k, val] of Object.entries(s.headers)) req = req.set(k, val);
  if (s.query) req = req.query(s.query);
  return s.text === undefined ? req : req.send(s.text);
}

const documented = (op: Operation, status: number) => String(status) in op.responses;

/** Does the JSON pointer's parent lead to something in the request? (The pointer itself may name a missing field.) */
function leadsInto(pointer: string, target: Json | undefined): boolean {
  if (pointer === "") return true;
  if (!pointer.startsWith("/")) return false;
  const keys = pointer.slice(1).split("/").map((p) => p.replace(/~1/g, "/").replace(/~0/g, "~"));
  let node: Json | undefined = target;
  for (const key of keys.slice(0, -1)) {
    if (node === null || typeof node !== "object") return false;
    node = Array.isArray(node) ? node[Number(key)] : node[key];
  }
  return node !== undefined;
}

/** What is wrong with the answer to a request; empty when nothing is. */
function problemsWith(op: Operation, sent: Sent, res: Response): string[] {
  const out: string[] = [];
  if (res.status >= 500) out.push(`status ${res.status}`);
  const requestId = res.headers["x-request-id"];
  if (!requestId) out.push("no X-Request-Id");
  if (!documented(op, res.status)) out.push(`status ${res.status} is not documented for ${op.operationId}`);
  const type = String(res.headers["content-type"] ?? "");
  if (res.status >= 200 && res.status < 300) {
    if (sent.documentValid === false) out.push("the document refuses this request, the server accepted it");
    const media = Object.keys((op.responses[String(res.status)] as { content?: Record<string, unknown> } | undefined)?.content ?? {})[0] ?? "application/json";
    if (!type.startsWith(media)) out.push(`2xx with content-type ${type}, documented ${media}`);
    // A stream's events are checked by the jobs tests; here, that it is one.
    if (media !== "application/json") return out;
    const check = v.response(op, String(res.status));
    if (check && !check(JSON.parse(res.text))) out.push(`2xx body does not match the 200 schema: ${v.errorsText(check)}`);
    return out;
  }
  if (!type.startsWith("application/problem+json")) return [...out, `${res.status} with content-type ${type}`];
  const body = JSON.parse(res.text) as Record<string, Json>;
  for (const f of ["type", "title", "detail"]) if (typeof body[f] !== "string" || body[f] === "") out.push(`problem without ${f}`);
  if (body.status !== res.status) out.push(`problem status ${String(body.status)} on a ${res.status}`);
  // Each problem a status can carry is named, with its title, in that response's description.
  if (documented(op, res.status) && !op.responses[String(res.status)]!.description.includes(String(body.title))) out.push(`problem ${String(body.type)} is not documented for ${res.status}`);
  // A replay is the stored answer, instance and all; X-Request-Id names the request that got it.
  if (body.instance !== requestId && res.headers["idempotency-replayed"] !== "true") out.push("problem instance is not the request id");
  const problem = v.at("/components/schemas/Problem");
  if (!problem(body)) out.push(`problem does not match the Problem schema: ${v.errorsText(problem)}`);
  if (body.type === "/problems/validation-failed") {
    const errors = body.errors as { pointer: string; message: string }[] | undefined;
    if (!Array.isArray(errors) || errors.length === 0) out.push("validation failure without errors");
    for (const e of errors ?? []) if (!leadsInto(e.pointer, sent.target)) out.push(`pointer ${JSON.stringify(e.pointer)} does not lead into the request`);
  }
  return out;
}

/** Every path to a value inside a JSON value, the root first. */
function pathsOf(value: Json, at: (string | number)[] = []): (string | number)[][] {
  const inner =
    value !== null && typeof value === "object"
      ? Array.isArray(value)
        ? value.flatMap((x, i) => pathsOf(x, [...at, i]))
        : Object.entries(value).flatMap(([k, x]) => pathsOf(x, [...at, k]))
      : [];
  return [at, ...inner];
}

function setAt(value: Json, path: (string | number)[], f: (old: Json) => Json | undefined): Json {
  if (path.length === 0) return f(value) ?? null;
  const copy = structuredClone(value) as Record<string, Json> & Json[];
  let node: Json = copy;
  for (const key of path.slice(0, -1)) node = (node as Record<string, Json>)[key]!;
  const last = path[path.length - 1]!;
  const next = f((node as Record<string, Json>)[last]!);
  if (next === undefined) {
    if (Array.isArray(node)) node.splice(Number(last), 1);
    else delete (node as Record<string, Json>)[last];
  } else (node as Record<string, Json>)[last] = next;
  return copy;
}

const OTHER_TYPES: Json[] = [null, true, 7, -2.5, "7", "", [], {}, [[0]]];
const BAD_NUMBERS = [-1, 0, 1, 0.5, 1e300, -1e300, 2 ** 53 + 2, 1e-320, 65536, 4097];
const ODD_KEYS = ["", " ", "a b", "x\ty", "k".repeat(256), "é", "clé-1"];
const OTHER_TYPES_OF_BODY = ["text/plain", "application/xml", "application/x-www-form-urlencoded", "multipart/form-data; boundary=x", ""];

type Mutation = "wrong-type" | "bad-number" | "drop-field" | "extra-field" | "broken-json" | "content-type" | "not-object" | "odd-key" | "replay";
const MUTATIONS: Mutation[] = ["wrong-type", "wrong-type", "bad-number", "bad-number", "drop-field", "drop-field", "extra-field", "broken-json", "content-type", "not-object", "odd-key", "replay"];

/** A change to a JSON value at one of its paths, picked by `pick`. */
function mutate(kind: Mutation, base: Json, pick: number, alt: number): Json {
  const paths = pathsOf(base);
  const at = (filter: (p: (string | number)[], x: Json) => boolean) => {
    const candidates = paths.filter((p) => filter(p, p.reduce<Json>((n, k) => (n as Record<string, Json>)[k]!, base)));
    return candidates.length ? candidates[pick % candidates.length]! : [];
  };
  switch (kind) {
    case "wrong-type":
      return setAt(base, paths[pick % paths.length]!, (old) => {
        const others = OTHER_TYPES.filter((t) => typeof t !== typeof old || Array.isArray(t) !== Array.isArray(old));
        return others[alt % others.length]!;
      });
    case "bad-number":
      return setAt(base, at((_, x) => typeof x === "number"), () => BAD_NUMBERS[alt % BAD_NUMBERS.length]!);
    case "drop-field":
      return setAt(base, at((p) => p.length > 0 && typeof p[p.length - 1] === "string"), () => undefined);
    case "extra-field":
      return setAt(base, at((_, x) => x !== null && typeof x === "object" && !Array.isArray(x)), (o) => ({ ...(o as Record<string, Json>), [alt % 2 ? "zz" : "family"]: alt % 3 ? 1 : "x" }));
    case "not-object":
      return OTHER_TYPES[alt % OTHER_TYPES.length]!;
    default:
      return base;
  }
}

/** JSON text that does not parse. */
function broken(text: string, pick: number): string {
  const variants = [text.slice(0, Math.max(1, pick % text.length)), `${text}}`, text.replace(/"/, "'"), `{"a":1,}`, "{", "nul", "\u0000", `${text.slice(0, -1)},]`];
  return variants.find((t, i) => i >= pick % variants.length && !parses(t)) ?? "{";
}

function parses(text: string): boolean {
  try {
    JSON.parse(text);
    return true;
  } catch {
    return false;
  }
}

const examplesOf = (op: Operation): Json[] => Object.values(op.requestBody?.content["application/json"]?.examples ?? {}).map((e) => e.value);

/** Seeds per operation, so that adding an operation does not change what the others get. */
const seedOf = (id: string) => [...id].reduce((h, c) => (h * 31 + c.charCodeAt(0)) >>> 0, Number(process.env.PARITAS_FUZZ_SEED ?? 20261203));

async function fuzzPost(op: Operation): Promise<{ failures: string[]; statuses: Record<string, number> }> {
  const failures: string[] = [];
  const statuses: Record<string, number> = {};
  const schema = op.requestBody!.content["application/json"]!.schema;
  const check = v.body(op)!;
  const valid = arbitraryFor(schema, doc as unknown as Json, limits).filter((x) => check(x));
  const seed = seedOf(op.operationId);
  const bodies = fc.sample(valid, { seed, numRuns: VALID });
  const bases = [...examplesOf(op), ...bodies];

  const run = async (s: Sent, expectation?: (res: Response) => string[]) => {
    s.headers.authorization ??= await currentAuth();
    const res = await send(s);
    statuses[`${s.label} ${res.status}`] = (statuses[`${s.label} ${res.status}`] ?? 0) + 1;
    const found = [...problemsWith(op, s, res), ...(expectation?.(res) ?? [])];
    if (found.length) failures.push(`${s.label}: ${found.join("; ")}\n  request: ${s.method.toUpperCase()} ${s.path} ${JSON.stringify(s.headers)} ${s.text?.slice(0, 400)}\n  response: ${res.status} ${res.text.slice(0, 400)}`);
    return res;
  };
  const post = (label: string, body: Json | string, headers: Record<string, string> = {}): Sent => {
    const text = typeof body === "string" ? body : JSON.stringify(body);
    return { label, method: "post", path: op.path, headers: { "content-type": "application/json", ...headers }, text, target: typeof body === "string" ? undefined : body, documentValid: typeof body === "string" ? undefined : check(body) };
  };
  const expectProblem = (status: number, type: string) => (res: Response) =>
    res.status === status && JSON.parse(res.text).type === `/problems/${type}` ? [] : [`expected ${status} ${type}`];

  for (const [i, body] of bases.entries()) await run(post(i < examplesOf(op).length ? "example" : "valid", body));

  const plans = fc.sample(fc.record({ base: fc.constantFrom(...bases), kind: fc.constantFrom(...MUTATIONS), pick: fc.nat(), alt: fc.nat(), key: fc.stringMatching(/^[\x21-\x7e]{1,40}$/) }), {
    seed: seed + 1,
    numRuns: MUTATED,
  });
  for (const { base, kind, pick, alt, key } of plans) {
    const text = JSON.stringify(base);
    switch (kind) {
      case "broken-json": {
        const bad = broken(text, pick);
        await run(post(kind, bad), expectProblem(400, "bad-request"));
        break;
      }
      case "content-type": {
        const type = OTHER_TYPES_OF_BODY[alt % OTHER_TYPES_OF_BODY.length]!;
        await run({ ...post(kind, base), headers: { "content-type": type }, documentValid: undefined }, expectProblem(415, "unsupported-media-type"));
        break;
      }
      case "odd-key":
        await run(post(kind, base, { "idempotency-key": ODD_KEYS[alt % ODD_KEYS.length]! }), expectProblem(400, "bad-request"));
        break;
      case "replay": {
        // The same key and body replay the first answer; the same key with another body is refused (keys belong to the key's organisation).
        const headers = { "idempotency-key": `${key}-${alt}`, authorization: await currentAuth() };
        calls += 2;
        const first = await run(post(kind, base, headers));
        // A 5xx releases the key for a retry (checked above as a failure in its own right).
        if (first.status >= 500) break;
        await run(post(`${kind} again`, base, headers), (res) =>
          res.status === first.status && res.text === first.text && res.headers["idempotency-replayed"] === "true" ? [] : ["a replay differs from the first answer"],
        );
        await run(post(`${kind} other body`, mutate("extra-field", base, pick, alt), headers), expectProblem(422, "idempotency-key-reused"));
        break;
      }
      default:
        await run(post(kind, mutate(kind, base, pick, alt)));
    }
  }
  return { failures, statuses };
}

/** Query values as a client would send them: strings; the document's integers are read from them. */
function queryVerdict(op: Operation, query: Record<string, string>): boolean | undefined {
  const params = op.parameters ?? [];
  if (Object.keys(query).some((k) => !params.some((p) => p.name === k && p.in === "query"))) return undefined;
  return params.every((p, i) => {
    if (p.in !== "query") return true;
    const raw = query[p.name];
    if (raw === undefined) return !p.required;
    const numeric = p.schema.type === "integer" || p.schema.type === "number";
    const value = numeric && raw.trim() !== "" && Number.isFinite(Number(raw)) ? Number(raw) : raw;
    return v.parameter(op, i)(value);
  });
}

async function fuzzGet(op: Operation): Promise<{ failures: string[]; statuses: Record<string, number> }> {
  const failures: string[] = [];
  const statuses: Record<string, number> = {};
  const params = (op.parameters ?? []).filter((p) => p.in === "query");
  // Without parameters (the document itself) a few calls show it ignores a query; each answer is the whole document.
  const numRuns = params.length ? VALID : 10;
  const model = Object.fromEntries(params.map((p) => [p.name, arbitraryFor(p.schema, doc as unknown as Json, limits, p.name).map(String)]));
  const queries = fc.sample(fc.record(model, { requiredKeys: params.filter((p) => p.required).map((p) => p.name) }), { seed: seedOf(op.operationId), numRuns }) as Record<string, string>[];
  const junk = fc.sample(
    fc.dictionary(fc.constantFrom(...params.map((p) => p.name), "page", "from[]", ""), fc.oneof(fc.string({ maxLength: 12 }), fc.integer().map(String), fc.constantFrom("", "-1", "1e3", "0x10", "2026-02-30", "null")), {
      maxKeys: 4,
    }),
    { seed: seedOf(op.operationId) + 1, numRuns },
  );
  // A path parameter names a resource: make one with the same key (a claim) and read it.
  const named = await withPathValues(op);
  for (const [i, query] of [...queries, ...junk].entries()) {
    const sent: Sent = { label: i < queries.length ? "valid" : "junk", method: op.method === "delete" ? "delete" : "get", path: named?.path ?? op.path, headers: {}, query, target: query, documentValid: queryVerdict(op, query) };
    if (op.security?.length) sent.headers.authorization = named?.auth ?? (await currentAuth());
    const res = await send(sent);
    statuses[`${sent.label} ${res.status}`] = (statuses[`${sent.label} ${res.status}`] ?? 0) + 1;
    const found = problemsWith(op, sent, res);
    if (found.length) failures.push(`${sent.label}: ${found.join("; ")}\n  request: GET ${op.path}?${new URLSearchParams(query)}\n  response: ${res.status} ${res.text.slice(0, 400)}`);
  }
  return { failures, statuses };
}

/**
 * The operation's path with its {id} filled by a resource made for it — a claim, or a simulation cancelled at
 * once (no runner runs here, and a finished one ends its event stream) — under a key of a fresh organisation,
 * which the operation's calls then use (so the jobs other operations queue cannot reach the job limit).
 */
async function withPathValues(op: Operation): Promise<{ path: string; auth: string } | undefined> {
  if (!op.path.includes("{")) return undefined;
  const { auth: a } = await makeOrgWithKey();
  const headers = { "content-type": "application/json", authorization: a };
  const simulation = op.path.startsWith("/simulations");
  const made = await send({
    label: "setup",
    method: "post",
    path: simulation ? "/simulations" : "/claims",
    headers,
    text: JSON.stringify(simulation ? { channel: { type: "bsc" }, points: [0.1], stop: { maxBits: 1000 } } : { label: "fuzz", target: { preset: "voice" }, evidence: { mode: "measured", trials: 1000, errors: 0 } }),
  });
  expect(made.status, made.text).toBeLessThan(300);
  const id = made.body.id as string;
  if (simulation) expect((await send({ label: "setup", method: "delete", path: `/simulations/${id}`, headers })).status).toBe(200);
  return { path: op.path.replace("{id}", id), auth: a };
}

describe("fuzzing every operation of the served document", () => {
  it("covers every operation the document has", () => {
    expect(operationsOf(doc).map((o) => o.operationId).sort()).toEqual(["capacity", "channels.bsc", "claims.create", "claims.get", "claims.list", "codes.analyze", "decode", "distance", "encode", "links.ber", "openapi", "simulations.cancel", "simulations.create", "simulations.events", "simulations.get", "simulations.list", "tests.plan", "usage"]);
  });

  it.each(["codes.analyze", "encode", "decode", "distance", "channels.bsc", "capacity", "links.ber", "tests.plan", "claims.create", "claims.list", "claims.get", "simulations.create", "simulations.list", "simulations.get", "simulations.events", "simulations.cancel", "usage", "openapi"])(
    "%s",
    async (id) => {
      const op = operationsOf(doc).find((o) => o.operationId === id)!;
      const { failures, statuses } = op.method === "post" ? await fuzzPost(op) : await fuzzGet(op);
      if (process.env.PARITAS_FUZZ_REPORT) console.info(id, statuses);
      expect(failures.slice(0, 40)).toEqual([]);
      // The generated requests reach the computation, not only the validation: some are answered with a 2xx.
      expect(Object.entries(statuses).some(([k, n]) => / 2\d\d$/.test(k) && n > 0)).toBe(true);
    },
    120_000,
  );

  it("every path answers an undocumented method and a missing or unknown key with a problem", async () => {
    const ops = operationsOf(doc);
    for (const o of ops) {
      // A method no operation of the path has (GET /claims and POST /claims share one path).
      const other = (["put", "delete", "post", "get"] as const).find((m) => !ops.some((x) => x.path === o.path && x.method === m))!;
      const wrong = await send({ label: "method", method: other, path: o.path, headers: {} });
      expect(wrong.status, `${other} ${o.path}`).toBe(405);
      expect(wrong.headers["content-type"]).toMatch(/^application\/problem\+json/);
      expect(wrong.headers["x-request-id"]).toBeTruthy();
      if (!o.security?.length) continue;
      for (const authorization of [undefined, "Bearer prt_test_nope", "Basic abc"]) {
        const res = await send({ label: "auth", method: o.method, path: o.path, headers: { "content-type": "application/json", ...(authorization ? { authorization } : {}) }, text: o.method === "post" ? "{}" : undefined });
        expect(problemsWith(o, { label: "auth", method: o.method, path: o.path, headers: {} }, res)).toEqual([]);
        expect(res.status).toBe(401);
      }
    }
  });
});
