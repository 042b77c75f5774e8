import type { z } from "zod";
import type { Db } from "@/db";
import { InputError } from "@/lib/core/errors";
import type { KeyPrincipal } from "./auth";
import type { ProblemCode } from "./errors";
import type { Scope } from "./scopes";
import { describeWork, unitsFor } from "./work";

export type Method = "GET" | "POST" | "DELETE";

export interface HandlerContext {
  db: Db;
  principal: KeyPrincipal;
  requestId: string;
  /** The path parameters, validated by the endpoint's `params`. */
  params: Record<string, string>;
}

/** Success statuses an endpoint may answer besides 200. */
export type SuccessStatus = 200 | 201 | 202;

/** A data handler's streamed answer (Server-Sent Events): the body as it comes, under the definition's `produces` type. */
export class StreamReply {
  constructor(
    readonly body: ReadableStream<Uint8Array>,
    readonly contentType: string,
  ) {}
}

/** A data handler's answer with a status other than 200 and, for 201 and 202, where the resource lives (Location). */
export class Reply<T> {
  constructor(
    readonly status: SuccessStatus,
    readonly body: T,
    readonly location?: string,
  ) {}
}

interface CommonSpec<I extends z.ZodType, O extends z.ZodType> {
  /** Operation id: names the endpoint in the OpenAPI document and in usage rows. */
  id: string;
  method: Method;
  /** Path below /api/v1, e.g. "/distance"; a path parameter is written {name}, e.g. "/claims/{id}". */
  path: string;
  /** The path parameters' schema, one string field per {name} in `path`. */
  params?: z.ZodObject;
  /** Problems this endpoint answers beyond those of every endpoint of its kind (422 work-limit, 429 job-limit, 503 server-busy). */
  problems?: ProblemCode[];
  /** What each success status means, when the endpoint answers anything but 200 (default: 200 "Success."). */
  statuses?: Partial<Record<SuccessStatus, string>>;
  scope: Scope;
  tag: string;
  summary: string;
  description: string;
  /** The JSON body of a POST, or the query parameters of a GET. */
  input: I;
  output: O;
  /** Request examples: each one runs as documented (tests/api/examples.test.ts). */
  examples: Record<string, { summary: string; value: z.input<I> }>;
}

/**
 * Math: a pure handler (no database, no request context) that may run on the worker pool, and an estimate
 * of the work a request causes, made before any of it is done. The estimate decides whether the request is
 * refused, runs on the event loop or goes to the pool, and what it costs (lib/api/work.ts).
 */
export interface ComputeSpec<I extends z.ZodType, O extends z.ZodType> extends CommonSpec<I, O> {
  /** Estimated elementary operations; throws a work-limit ApiError (see `refuse`) when one part is beyond its limit. */
  work: (input: z.output<I>) => number;
  /** The work rule in words, published in the reference beside the cost it implies. */
  workRule: string;
  handler: (input: z.output<I>) => z.output<O>;
}

/** Reads or writes the database for the calling key; cheap, fixed cost, always on the event loop. */
export interface DataSpec<I extends z.ZodType, O extends z.ZodType> extends CommonSpec<I, O> {
  cost: number;
  /** The reference's response example: a data answer depends on the caller's own rows, so it is made up and says so ("Illustrative only: …"). */
  illustration: { summary: string; value: z.output<O> };
  /** The media type of a streamed answer (the handler returns a StreamReply), instead of JSON. */
  produces?: "text/event-stream";
  handler: (input: z.output<I>, ctx: HandlerContext) => z.output<O> | Reply<z.output<O>> | StreamReply | Promise<z.output<O> | Reply<z.output<O>> | StreamReply>;
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- the erased type of a list of endpoints: each one's own types live in its definition.
type AnyZod = z.ZodType<any, any, any>;

export type ComputeEndpoint<I extends z.ZodType = AnyZod, O extends z.ZodType = AnyZod> = ComputeSpec<I, O> & { kind: "compute" };
export type DataEndpoint<I extends z.ZodType = AnyZod, O extends z.ZodType = AnyZod> = DataSpec<I, O> & { kind: "data" };
export type Endpoint = ComputeEndpoint | DataEndpoint;

/** Run `fn`; an InputError it throws (or its promise rejects with) gets `path` put in front of its own (for the field's JSON pointer). */
export function at<T>(path: (string | number)[], fn: () => T): T {
  const prefixed = (e: unknown) => (e instanceof InputError ? new InputError(e.message, [...path, ...e.path]) : e);
  try {
    const v = fn();
    return (
      v instanceof Promise
        ? v.catch((e: unknown) => {
            throw prefixed(e);
          })
        : v
    ) as T;
  } catch (e) {
    throw prefixed(e);
  }
}

/**
 * Define a math endpoint once: the route (lib/api/http.ts), validation, OpenAPI, metering, the console form
 * and the worker pool's task table all derive from it. Its work rule is appended to the description.
 */
export function defineEndpoint<I extends z.ZodType, O extends z.ZodType>(spec: ComputeSpec<I, O>): ComputeEndpoint<I, O> {
  return { ...spec, description: `${spec.description}\n\n${describeWork(spec.workRule)}`, kind: "compute" };
}

/** Define an endpoint that reads the database for the calling key (fixed cost, never pooled). */
export function defineDataEndpoint<I extends z.ZodType, O extends z.ZodType>(spec: DataSpec<I, O>): DataEndpoint<I, O> {
  return { ...spec, kind: "data" };
}

/** Compute units a successful call with this (parsed) input is charged: from the work estimate, or a data endpoint's fixed cost. */
export function unitsOf(e: Endpoint, input: unknown): number {
  return e.kind === "compute" ? unitsFor(e.work(input)) : e.cost;
}
