import { OpenAPIRegistry, OpenApiGeneratorV31 } from "@asteasolutions/zod-to-openapi";
import { z } from "zod";
import { MAX_BODY_BYTES } from "@/lib/api/body";
import { problemSchema, problemTypes, problemTypeUri, type ProblemCode } from "@/lib/api/errors";
import { IDEMPOTENCY_KEY_PATTERN, IDEMPOTENCY_TTL_MS } from "@/lib/api/idempotency";
import { RATE_WINDOW_SECONDS } from "@/lib/api/rate-limit";
import { formatMoney, PLAN_IDS, PLANS } from "@/lib/billing/plans";
import { endpoints } from "@/lib/api/registry";
import { caution } from "@/lib/api/schemas";
import { scopeCatalogue } from "@/lib/api/scopes";
import stored from "./response-examples.json";
import type { ResponseExamples } from "./response-examples";

/** Bodies of the math endpoints' 200 responses to their request examples (`npm run gen:response-examples`). */
const responseExamples: ResponseExamples = stored;

/**
 * GET /usage reads the caller's own metering rows, so no fixed body is the real answer to its examples:
 * this one is made up to show the shape, and says so.
 */

/** The 200 examples of one endpoint, under the names of its request examples. */
function okExamples(e: (typeof endpoints)[number]) {
  if (e.kind === "data") {
    return { illustrative: e.illustration };
  }
  return Object.fromEntries(Object.entries(e.examples).map(([name, ex]) => [name, { summary: ex.summary, value: responseExamples[e.id]?.[name] }]));
}

const rateHeaders = {
  RateLimit: { description: "Requests left in the current window and seconds until it resets (IETF RateLimit header fields).", schema: { type: "string" as const, example: '"per-key";r=599;t=42' } },
  "RateLimit-Policy": { description: `Requests per ${RATE_WINDOW_SECONDS}-second window for this key.`, schema: { type: "string" as const, example: `"per-key";q=600;w=${RATE_WINDOW_SECONDS}` } },
  "X-Request-Id": { description: "Identifies this request in logs and usage rows: yours when you sent a sane one (8 to 128 of A-Z a-z 0-9 . _ : -, not a credential), else a new one.", schema: { type: "string" as const } },
  "Units-Allowance": { description: "Compute units a month the key's allowance holds (live and test keys have their own, by plan).", schema: { type: "integer" as const } },
  "Units-Used": { description: "Units used this month after this call, including units held by running jobs.", schema: { type: "integer" as const } },
  "Units-Remaining": { description: "Units left of the allowance this month (0 past it: a paid plan bills live units beyond it; the free plan and test keys stop).", schema: { type: "integer" as const } },
  "Units-Reset": { description: "When the allowance renews: the start of the next calendar month, UTC (ISO 8601).", schema: { type: "string" as const } },
};

/** The problems one status can carry: the headers they come with, and each type explained. */
function problem(...codes: ProblemCode[]) {
  // A 401 comes before the key is known, so it has no rate-limit window to report.
  const headers = codes.includes("unauthenticated")
    ? { "X-Request-Id": rateHeaders["X-Request-Id"] }
    : codes.some((c) => c === "rate-limited" || c === "server-busy" || c === "job-limit")
      ? { ...rateHeaders, "Retry-After": { description: "Seconds to wait (RFC 9110).", schema: { type: "integer" as const } } }
      : rateHeaders;
  const explain = (c: ProblemCode) => `${problemTypes[c].title}. ${problemTypes[c].help}`;
  return {
    description: codes.length === 1 ? explain(codes[0]!) : codes.map((c) => `\`${problemTypeUri(c)}\`: ${explain(c)}`).join("\n\n"),
    headers,
    content: { "application/problem+json": { schema: problemSchema } },
  };
}

/**
 * The OpenAPI 3.1 document, built from the endpoint definitions. `explicitTypes: false` leaves out the
 * `type`s added for the reference renderer (see addTypes): the typed client's generator reads them as
 * loose types (`unknown[]`, `Record<string, never>`), and they constrain nothing the schemas don't already.
 */
export function buildOpenApiDocument({ explicitTypes = true }: { explicitTypes?: boolean } = {}) {
  const registry = new OpenAPIRegistry();
  const bearer = registry.registerComponent("securitySchemes", "apiKey", {
    type: "http",
    scheme: "bearer",
    description: "An API key: `Authorization: Bearer live.prt1.…` (or `test.prt1.…`); see the README for the grammar and checksum.",
  });

  for (const e of endpoints) {
    const examples = Object.fromEntries(Object.entries(e.examples).map(([name, ex]) => [name, { summary: ex.summary, value: ex.value }]));
    const noBody = e.method !== "POST";
    // Problems the definition names beyond the ones every endpoint of its kind can answer, by status.
    const more = (status: number) => (e.problems ?? []).filter((c) => problemTypes[c].status === status);
    const compute = e.kind === "compute";
    registry.registerPath({
      method: e.method.toLowerCase() as "get" | "post" | "delete",
      path: e.path,
      operationId: e.id,
      tags: [e.tag],
      summary: e.summary,
      description: `${e.description}${noBody ? " Unknown query parameters are refused (422)." : ""}\n\nScope: \`${e.scope}\`.`,
      security: [{ [bearer.name]: [] }],
      request: e.method !== "POST"
        ? { query: e.input as z.ZodObject, ...(e.params ? { params: e.params } : {}) }
        : {
            ...(e.params ? { params: e.params } : {}),
            headers: z.object({
              "Idempotency-Key": z
                .string()
                .min(1)
                .max(255)
                .regex(IDEMPOTENCY_KEY_PATTERN)
                .optional()
                .meta({
                  description:
                    `1 to 255 visible ASCII characters (0x21 to 0x7E; anything else is a 400 problem). Replays the stored response for the same key and body for ${IDEMPOTENCY_TTL_MS / 3600000} h; ` +
                    "another body with the same key is a 422 problem, and a key whose first request is still running a 409. " +
                    "Use a random value such as a UUID: a value shaped like an API key or another credential is refused with a 400, and never stored.",
                }),
            }),
            body: { required: true, description: `JSON, at most ${MAX_BODY_BYTES} bytes.`, content: { "application/json": { schema: e.input, examples } } },
          },
      responses: {
        ...Object.fromEntries(
          Object.entries(e.statuses ?? { 200: "Success." }).map(([status, description]) => [
            status,
            {
              description,
              headers: {
                ...rateHeaders,
                "X-Compute-Units": { description: "Compute units charged for this call.", schema: { type: "integer" } },
                ...(status === "200" ? {} : { Location: { description: "Where the resource is read from now on.", schema: { type: "string" } } }),
              },
              content: { [e.kind === "data" && e.produces ? e.produces : "application/json"]: { schema: e.output, ...(status === Object.keys(e.statuses ?? { 200: "" })[0] ? { examples: okExamples(e) } : {}) } },
            },
          ]),
        ),
        ...(e.params ? { 404: problem("not-found") } : {}),
        ...(noBody ? {} : { 400: problem("bad-request"), 409: problem("conflict"), 413: problem("payload-too-large"), 415: problem("unsupported-media-type") }),
        401: problem("unauthenticated"),
        ...(compute || (e.kind === "data" && e.cost > 0) || more(402).length ? { 402: problem("quota-exhausted") } : {}),
        403: problem("forbidden"),
        422: noBody ? problem("validation-failed", ...more(422)) : problem("validation-failed", "idempotency-key-reused", ...(compute ? (["work-limit", "deadline-exceeded", "memory-limit"] as const) : []), ...more(422)),
        429: problem("rate-limited", ...more(429)),
        ...(compute || more(503).length ? { 503: problem("server-busy") } : {}),
      },
    });
  }

  registry.registerPath({
    method: "get",
    path: "/openapi.json",
    operationId: "openapi",
    tags: ["Account"],
    summary: "This OpenAPI 3.1 document",
    responses: { 200: { description: "The document.", content: { "application/json": { schema: z.object({}).passthrough() } } } },
  });

  // A copy: the generator hands out keyword objects registered once per process (documentRules), and
  // addQueryExamples and addTypes change what they are given; another document must not see it.
  const document = structuredClone(generate(registry));
  addQueryExamples(document);
  if (explicitTypes) addTypes(document.components?.schemas ?? {});
  return document;
}

type Schema = Record<string, unknown>;
const isSchema = (x: unknown): x is Schema => typeof x === "object" && x !== null && !Array.isArray(x);
const jsonType = (v: unknown) => (v === null ? "null" : Array.isArray(v) ? "array" : typeof v === "number" ? (Number.isInteger(v) ? "integer" : "number") : typeof v);

/**
 * The reference renderer refuses (as "document validation errors") a schema with no `type`, such as a bare
 * anyOf of a string and an array, or an `{ required: [...] }` branch. Give each one the type its keywords
 * already imply, so that no instance's verdict changes: a union takes its branches' types, enum and const
 * their values' types, and object, array, number and string keywords their own type. Schemas with none of
 * these (the empty schema) stay as they are.
 */
function addTypes(components: Record<string, unknown>): void {
  const done = new Set<Schema>();
  const typesOf = (s: Schema): string[] => {
    visit(s);
    if (typeof s.$ref === "string") {
      const target = components[s.$ref.replace("#/components/schemas/", "")];
      return isSchema(target) ? typesOf(target) : [];
    }
    return s.type === undefined ? [] : ([] as string[]).concat(s.type as string | string[]);
  };
  const visit = (s: Schema): void => {
    if (done.has(s)) return;
    done.add(s);
    for (const k of ["anyOf", "oneOf", "allOf", "prefixItems"]) for (const x of (s[k] as unknown[] | undefined) ?? []) if (isSchema(x)) visit(x);
    // An empty schema allows anything, as `true` does; the renderer accepts only the latter here (a record of unknown values).
    if (isSchema(s.additionalProperties) && Object.keys(s.additionalProperties).length === 0) s.additionalProperties = true;
    for (const k of ["items", "not", "if", "then", "else", "additionalProperties"]) if (isSchema(s[k])) visit(s[k]);
    for (const x of Object.values((s.properties as Schema | undefined) ?? {})) if (isSchema(x)) visit(x);
    if (s.type !== undefined || s.$ref !== undefined) return;
    const branches = ((s.anyOf ?? s.oneOf) as unknown[] | undefined)?.filter(isSchema);
    let types: string[] = [];
    if (branches) {
      const each = branches.map(typesOf);
      if (each.every((t) => t.length)) types = each.flat();
    } else if (Array.isArray(s.enum)) types = s.enum.map(jsonType);
    else if ("const" in s) types = [jsonType(s.const)];
    else if (["properties", "required", "additionalProperties", "if", "dependentRequired"].some((k) => k in s)) types = ["object"];
    else if (["items", "prefixItems", "minItems", "maxItems"].some((k) => k in s)) types = ["array"];
    else if (["minimum", "maximum", "exclusiveMinimum", "exclusiveMaximum", "multipleOf"].some((k) => k in s)) types = ["number"];
    else if (["pattern", "minLength", "maxLength"].some((k) => k in s)) types = ["string"];
    // An integer next to a number is already a number.
    const unique = [...new Set(types)].filter((t, _, all) => !(t === "integer" && all.includes("number")));
    if (unique.length) s.type = unique.length === 1 ? unique[0] : unique;
  };
  for (const s of Object.values(components)) if (isSchema(s)) visit(s);
}

/** zod-to-openapi puts no examples on query parameters: copy each GET example's values onto its parameters. */
function addQueryExamples(document: ReturnType<typeof generate>): void {
  for (const e of endpoints.filter((x) => x.method === "GET")) {
    const op = document.paths?.[e.path]?.get;
    for (const param of op?.parameters ?? []) {
      if (!("name" in param)) continue;
      const examples = Object.fromEntries(
        Object.entries(e.examples)
          .filter(([, ex]) => (ex.value as Record<string, unknown>)[param.name] !== undefined)
          .map(([name, ex]) => [name, { summary: ex.summary, value: (ex.value as Record<string, unknown>)[param.name] }]),
      );
      if (Object.keys(examples).length) param.examples = examples;
    }
  }
}

/** The plan catalogue as a Markdown list for the reference's introduction (a six-column table is too wide for its text column). */
function planList(): string {
  return PLAN_IDS.map((id) => PLANS[id])
    .map((p) => {
      const n = (x: number) => x.toLocaleString("en-US");
      const fee = p.monthlyFee ? `${formatMoney(p.monthlyFee)} a month` : "free";
      const beyond = p.overagePerUnit === null ? "calls stop at the allowance" : `then ${formatMoney(p.overagePerUnit)} a unit`;
      return `- **${p.name}** (${fee}): ${n(p.includedUnits)} live units, ${beyond}; ${n(p.testUnits)} test-key units; simulations of up to 2^${Math.log2(p.maxBitsPerJob)} bits each, ${p.maxActiveJobs} at once.`;
    })
    .join("\n");
}

function generate(registry: OpenAPIRegistry) {
  const scopes = Object.entries(scopeCatalogue).map(([s, d]) => `- \`${s}\`: ${d}`).join("\n");
  return new OpenApiGeneratorV31(registry.definitions).generateDocument({
    openapi: "3.1.0",
    info: {
      title: "Paritas API",
      version: "1.0.0",
      description:
        "Channel-coding math as an API: distances and codebooks, BSC error probabilities, capacity and the Shannon limit, uncoded BER on AWGN.\n\n" +
        "Authenticate with `Authorization: Bearer <key>`, from a server or a CI job: the API sends no CORS headers, so a browser page on another origin cannot read its answers (call it through your own back end). Errors are RFC 9457 problem details (`application/problem+json`); validation failures list each field as a JSON pointer. " +
        `Every response carries \`X-Request-Id\` and the RateLimit header fields, and every authenticated one the monthly allowance (\`Units-Allowance\`, \`Units-Used\`, \`Units-Remaining\`, \`Units-Reset\`); bodies are limited to ${MAX_BODY_BYTES} bytes.\n\n` +
        `Plans (compute units per calendar month, UTC):\n\n${planList()}\n\nA call that needs more units than the allowance has left is refused before any work with a 402 \`quota-exhausted\` problem where the plan stops at its allowance. A job holds the most units it can cost while it runs and gives back what it did not use.\n\nScopes:\n${scopes}\n\n${caution}`,
    },
    servers: [{ url: "/api/v1" }],
  });
}
