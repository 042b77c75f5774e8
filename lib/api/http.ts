import { getDb, type Db } from "@/db";
import { InputError } from "@/lib/core/errors";
import { PoolRefusal, poolLimits, runTask } from "@/lib/jobs/pool";
import { authenticate, requireScope, type KeyPrincipal } from "./auth";
import { parseJsonBody, readBodyText } from "./body";
import { Reply, StreamReply, type Endpoint, type Method } from "./endpoint";
import { ApiError, fieldErrorsFromZod, problemResponse, toPointer, validationProblem } from "./errors";
import { beginIdempotent, finishIdempotent } from "./idempotency";
import { meter } from "./metering";
import { afterRefusal, quotaHeaders, reserveQuota, type Reservation } from "./quota";
import { replyJson } from "./pool-reply";
import { consumeRate } from "./rate-limit";
import { requestIdFor } from "./request-id";
import { checkWork, unitsFor, workLimits } from "./work";
import { logError } from "@/lib/api/redact";

// Route modules and the console guard take the request id from here, with the rest of the HTTP machinery.
export { requestIdFor };

const inputProblem = (e: InputError) => validationProblem([{ pointer: toPointer(e.path), message: e.message }]);
const asProblem = (err: unknown) => (err instanceof InputError ? inputProblem(err) : err);

function readInput(req: Request, bodyText: string, method: Method): unknown {
  if (method !== "POST") return Object.fromEntries(new URL(req.url).searchParams);
  return parseJsonBody(req, bodyText);
}

const API_BASE = "/api/v1";

/** A matcher for the endpoint's path template: "/claims/{id}" → the values of its {names}, or null. */
function pathMatcher(template: string): (pathname: string) => Record<string, string> | null {
  const names: string[] = [];
  const pattern = template.replace(/[.*+?^$()|[\]\\]/g, "\\$&").replace(/\{(\w+)\}/g, (_, name: string) => (names.push(name), "([^/]+)"));
  const re = new RegExp(`^${API_BASE}${pattern}$`);
  return (pathname) => {
    const m = re.exec(pathname);
    if (!m) return null;
    try {
      return Object.fromEntries(names.map((n, i) => [n, decodeURIComponent(m[i + 1]!)]));
    } catch {
      return null;
    }
  };
}

/** What the pool's refusal means to the caller (metered at 0 units, like every refusal). */
function poolProblem(r: PoolRefusal): ApiError {
  if (r.reason === "busy") {
    return new ApiError("server-busy", "Every compute worker is busy and the queue is full; retry in a few seconds.", { headers: { "retry-after": "2" } });
  }
  if (r.reason === "deadline") {
    return new ApiError("deadline-exceeded", `The computation was stopped at the per-call deadline of ${r.limit / 1000} s. Split the batch or choose a smaller code.`, {
      limit: { quantity: "time", allowed: r.limit, unit: "ms" },
    });
  }
  return new ApiError("memory-limit", `The computation was stopped when it passed the per-task memory ceiling of ${r.limit} MiB. Split the batch or choose a smaller code.`, {
    limit: { quantity: "memory", allowed: r.limit, unit: "MiB" },
  });
}

/** Run a math endpoint's handler: on the event loop when its work is small, else on the pool's request lane. Returns the JSON text. */
async function runCompute(e: Extract<Endpoint, { kind: "compute" }>, input: unknown, work: number): Promise<string> {
  if (work <= workLimits.inline) return JSON.stringify(e.handler(input));
  return replyJson(await runTask("request", { kind: "endpoint", id: e.id, input }, poolLimits.deadlineMs));
}

/** How a call pays: `reserve` its units from the allowance before the work, `charge` what it cost once it succeeded. */
interface Charging {
  reserve(units: number): Promise<void>;
  charge(units: number): void;
}

const routeCache = new WeakMap<Endpoint, (req: Request) => Promise<Response>>();

/** The Next.js route handler of an endpoint: key auth, rate limit, scope, idempotency, validation, work, metering, problems. */
export function endpointRoute(spec: Endpoint): (req: Request) => Promise<Response> {
  const hit = routeCache.get(spec);
  if (hit) return hit;

  const matchPath = pathMatcher(spec.path);
  const route = async (req: Request): Promise<Response> => {
    const requestId = requestIdFor(req);
    const started = performance.now();
    const at0 = new Date();
    let principal: KeyPrincipal | undefined;
    let headers: Record<string, string> = {};
    let units = 0;
    let reservation: Reservation | undefined;
    let response: Response;
    let db: Db | undefined;
    try {
      db = await getDb();
      principal = await authenticate(db, req.headers.get("authorization"), at0);
      // Every call of a known key counts against its rate, refused ones too: a key without the scope must not be a free loop of metered writes.
      headers = await consumeRate(principal.keyId);
      requireScope(principal, spec.scope);
      const payer = { orgId: principal.orgId, plan: principal.plan, mode: principal.mode };
      const charging: Charging = {
        // Before any work: the call's units come out of the month's allowance, or it is refused (402) here.
        reserve: async (u) => void (reservation = await reserveQuota(db!, payer, u, at0)),
        charge: (u) => void (units = u),
      };
      response = await run(req, db, principal, requestId, headers, charging);
    } catch (err) {
      response = problemResponse(asProblem(err), requestId);
      for (const [k, v] of Object.entries(headers)) if (!response.headers.has(k)) response.headers.set(k, v);
      if (db && principal && err instanceof ApiError && err.extra.quota) {
        void afterRefusal(db, principal.orgId, err.extra.quota).catch((e: unknown) => logError(`[${requestId}] allowance notice failed`, e));
      }
    }
    if (db && principal) {
      try {
        const quota = await meter(db, { principal, endpoint: spec.id, method: spec.method, status: response.status, units, durationMs: performance.now() - started, requestId, at: at0 }, reservation);
        for (const [k, v] of Object.entries(quotaHeaders(quota))) response.headers.set(k, v);
      } catch (e) {
        logError(`[${requestId}] metering failed`, e);
      }
    }
    // Every answer here was computed for one key (its account, its quota): no shared cache may keep it.
    response.headers.set("cache-control", "no-store");
    return response;
  };

  async function run(req: Request, db: Db, principal: KeyPrincipal, requestId: string, rateHeaders: Record<string, string>, charge: Charging): Promise<Response> {
    const bodyText = spec.method === "POST" ? await readBodyText(req) : "";
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
        res = await compute(req, raw, db, principal, requestId, rateHeaders, charge);
      } catch (err) {
        res = problemResponse(asProblem(err), requestId);
      }
      const body = await res.clone().text();
      const keep = Object.fromEntries([...res.headers].filter(([k]) => k === "content-type" || k === "x-compute-units" || k === "location"));
      await finishIdempotent(db, principal.orgId, idemKey, outcome.holder, { status: res.status, headers: keep, body });
      for (const [k, v] of Object.entries(rateHeaders)) res.headers.set(k, v);
      return res;
    }
    return compute(req, raw, db, principal, requestId, rateHeaders, charge);
  }

  /** The path parameters; a path that does not fit the endpoint's (a malformed id) names no resource: 404. */
  function paramsOf(req: Request): Record<string, string> {
    if (!spec.params) return {};
    const pathname = new URL(req.url).pathname;
    const values = matchPath(pathname);
    const parsed = values ? spec.params.safeParse(values) : undefined;
    if (!parsed?.success) throw new ApiError("not-found", `There is no ${pathname}: the id is not one this API gives out.`);
    return parsed.data as Record<string, string>;
  }

  async function compute(req: Request, raw: unknown, db: Db, principal: KeyPrincipal, requestId: string, rateHeaders: Record<string, string>, { reserve, charge }: Charging): Promise<Response> {
    const params = paramsOf(req);
    const parsed = spec.input.safeParse(raw);
    if (!parsed.success) throw validationProblem(fieldErrorsFromZod(parsed.error));
    const input = parsed.data;
    let json: string;
    let units: number;
    let status: number = 200;
    let location: string | undefined;
    if (spec.kind === "compute") {
      const work = spec.work(input);
      checkWork(work, "Split the request into smaller ones, or choose a smaller code.");
      units = unitsFor(work);
      await reserve(units);
      try {
        json = await runCompute(spec, input, work);
      } catch (e) {
        // A computation the pool stopped or could not take is refused like any other: 0 units.
        if (e instanceof PoolRefusal) throw poolProblem(e);
        throw e;
      }
    } else {
      await reserve(spec.cost);
      const out = await spec.handler(input, { db, principal, requestId, params });
      if (out instanceof StreamReply) {
        charge(spec.cost);
        return new Response(out.body, {
          status: 200,
          headers: { "content-type": out.contentType, "cache-control": "no-store", "x-accel-buffering": "no", "x-request-id": requestId, "x-compute-units": String(spec.cost), ...rateHeaders },
        });
      }
      if (out instanceof Reply) {
        status = out.status;
        location = out.location === undefined ? undefined : `${API_BASE}${out.location}`;
      }
      json = JSON.stringify(out instanceof Reply ? out.body : out);
      units = spec.cost;
    }
    if (process.env.NODE_ENV !== "production") {
      const check = spec.output.safeParse(JSON.parse(json));
      if (!check.success) throw new Error(`response of ${spec.id} does not match its schema: ${check.error.message}`);
    }
    charge(units);
    return new Response(json, {
      status,
      headers: { "content-type": "application/json", "x-request-id": requestId, "x-compute-units": String(units), ...(location ? { location } : {}), ...rateHeaders },
    });
  }

  routeCache.set(spec, route);
  return route;
}
