import { randomBytes } from "node:crypto";
import { z } from "zod";
import { getDb, type Db } from "@/db";
import { InputError } from "@/lib/core/errors";
import { authenticate, requireScope, type KeyPrincipal } from "./auth";
import { parseJsonBody, readBodyText } from "./body";
import { ApiError, fieldErrorsFromZod, problemResponse, toPointer } from "./errors";
import { beginIdempotent, finishIdempotent } from "./idempotency";
import { meter } from "./metering";
import { consumeRate } from "./rate-limit";
import type { Scope } from "./scopes";

export type Method = "GET" | "POST" | "DELETE";

export interface HandlerContext {
  db: Db;
  principal: KeyPrincipal;
  requestId: string;
}

export interface EndpointSpec<I extends z.ZodType, O extends z.ZodType> {
  /** Operation id: names the endpoint in the OpenAPI document and in usage rows. */
  id: string;
  method: Method;
  /** Path below /api/v1, e.g. "/distance". */
  path: string;
  scope: Scope;
  tag: string;
  summary: string;
  description: string;
  /** The JSON body of a POST, or the query parameters of a GET. */
  input: I;
  output: O;
  /** Request examples: each one runs as documented (tests/api/examples.test.ts). */
  examples: Record<string, { summary: string; value: z.input<I> }>;
  /** Compute units charged for a successful call: fixed, or from the work the result shows was done. */
  cost: number | ((input: z.output<I>, output: z.output<O>) => number);
  handler: (input: z.output<I>, ctx: HandlerContext) => z.output<O> | Promise<z.output<O>>;
}

export interface Endpoint<I extends z.ZodType = z.ZodType, O extends z.ZodType = z.ZodType> extends EndpointSpec<I, O> {
  /** The Next.js route handler. */
  route: (req: Request) => Promise<Response>;
}

const REQUEST_ID = /^[A-Za-z0-9._:-]{8,128}$/;

export function requestIdFor(req: Request): string {
  const given = req.headers.get("x-request-id");
  return given && REQUEST_ID.test(given) ? given : `req_${randomBytes(12).toString("hex")}`;
}

/** Run `fn`; an InputError it throws gets `path` put in front of its own (for the field's JSON pointer). */
export function at<T>(path: (string | number)[], fn: () => T): T {
  try {
    return fn();
  } catch (e) {
    if (e instanceof InputError) throw new InputError(e.message, [...path, ...e.path]);
    throw e;
  }
}

function validationFailed(errors: { pointer: string; message: string }[]): ApiError {
  const first = errors[0];
  const detail = errors.length === 1 && first ? `${first.pointer || "the body"}: ${first.message}` : `${errors.length} fields are invalid; see errors.`;
  return new ApiError("validation-failed", detail, { errors });
}

function readInput(req: Request, bodyText: string, method: Method): unknown {
  if (method === "GET") return Object.fromEntries(new URL(req.url).searchParams);
  return parseJsonBody(req, bodyText);
}

/** Define an endpoint once: everything else (route, validation, OpenAPI, metering, console form) derives from it. */
export function defineEndpoint<I extends z.ZodType, O extends z.ZodType>(spec: EndpointSpec<I, O>): Endpoint<I, O> {
  const route = async (req: Request): Promise<Response> => {
    const requestId = requestIdFor(req);
    const started = performance.now();
    const at0 = new Date();
    let principal: KeyPrincipal | undefined;
    let headers: Record<string, string> = {};
    let units = 0;
    let response: Response;
    let db: Db | undefined;
    try {
      db = await getDb();
      principal = await authenticate(db, req.headers.get("authorization"), at0);
      // Every call of a known key counts against its rate, refused ones too: a key without the scope must not be a free loop of metered writes.
      headers = await consumeRate(principal.keyId);
      requireScope(principal, spec.scope);
      response = await run(req, db, principal, requestId, headers, (u) => (units = u));
    } catch (err) {
      response = problemResponse(err instanceof InputError ? inputProblem(err) : err, requestId);
      for (const [k, v] of Object.entries(headers)) if (!response.headers.has(k)) response.headers.set(k, v);
    }
    if (db && principal) {
      try {
        await meter(db, { principal, endpoint: spec.id, method: spec.method, status: response.status, units, durationMs: performance.now() - started, requestId, at: at0 });
      } catch (e) {
        console.error(`[${requestId}] metering failed`, e);
      }
    }
    return response;
  };

  async function run(req: Request, db: Db, principal: KeyPrincipal, requestId: string, rateHeaders: Record<string, string>, charge: (u: number) => void): Promise<Response> {
    const bodyText = spec.method === "GET" ? "" : await readBodyText(req);
    const raw = readInput(req, bodyText, spec.method);
    const idemKey = spec.method === "POST" ? req.headers.get("idempotency-key") : null;
    if (idemKey !== null) {
      const outcome = await beginIdempotent(db, { orgId: principal.orgId, key: idemKey, endpoint: spec.id, bodyText });
      if (outcome.kind === "replay") {
        const { status, headers, body } = outcome.response;
        // A replay is not charged (metered with 0 units), so its X-Compute-Units says 0, not the first call's charge.
        const charged: Record<string, string> = "x-compute-units" in headers ? { "x-compute-units": "0" } : {};
        return new Response(body, { status, headers: { ...headers, ...charged, ...rateHeaders, "x-request-id": requestId, "idempotency-replayed": "true" } });
      }
      let res: Response;
      try {
        res = await compute(raw, db, principal, requestId, rateHeaders, charge);
      } catch (err) {
        res = problemResponse(err instanceof InputError ? inputProblem(err) : err, requestId);
      }
      const body = await res.clone().text();
      const keep = Object.fromEntries([...res.headers].filter(([k]) => k === "content-type" || k === "x-compute-units"));
      await finishIdempotent(db, principal.orgId, idemKey, { status: res.status, headers: keep, body });
      for (const [k, v] of Object.entries(rateHeaders)) res.headers.set(k, v);
      return res;
    }
    return compute(raw, db, principal, requestId, rateHeaders, charge);
  }

  async function compute(raw: unknown, db: Db, principal: KeyPrincipal, requestId: string, rateHeaders: Record<string, string>, charge: (u: number) => void): Promise<Response> {
    const parsed = spec.input.safeParse(raw);
    if (!parsed.success) throw validationFailed(fieldErrorsFromZod(parsed.error));
    const input = parsed.data;
    const result = await spec.handler(input, { db, principal, requestId });
    const units = typeof spec.cost === "number" ? spec.cost : spec.cost(input, result);
    if (process.env.NODE_ENV !== "production") {
      const check = spec.output.safeParse(result);
      if (!check.success) throw new Error(`response of ${spec.id} does not match its schema: ${check.error.message}`);
    }
    charge(units);
    return new Response(JSON.stringify(result), {
      status: 200,
      headers: { "content-type": "application/json", "x-request-id": requestId, "x-compute-units": String(units), ...rateHeaders },
    });
  }

  return { ...spec, route };
}

const inputProblem = (e: InputError) => validationFailed([{ pointer: toPointer(e.path), message: e.message }]);

type RouteHandler = (req: Request) => Promise<Response>;

/** The route module's exports for one path: its endpoints' handlers, and a 405 problem for every other method. */
export function routes(...endpoints: Endpoint[]): Record<"GET" | "POST" | "PUT" | "PATCH" | "DELETE", RouteHandler> {
  const allow = endpoints.map((e) => e.method).join(", ");
  const notAllowed: RouteHandler = async (req) =>
    problemResponse(new ApiError("method-not-allowed", `${req.method} is not allowed here; allowed: ${allow}.`, { headers: { allow } }), requestIdFor(req));
  const byMethod = Object.fromEntries(endpoints.map((e) => [e.method, e.route]));
  return {
    GET: byMethod.GET ?? notAllowed,
    POST: byMethod.POST ?? notAllowed,
    PUT: notAllowed,
    PATCH: notAllowed,
    DELETE: byMethod.DELETE ?? notAllowed,
  };
}

/** 404 problem for any path under /api/v1 that no endpoint has. */
export const unknownRoute: RouteHandler = async (req) =>
  problemResponse(new ApiError("not-found", `There is no endpoint ${new URL(req.url).pathname}. The API reference is at /docs.`), requestIdFor(req));
