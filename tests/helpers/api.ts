import request, { type Response } from "supertest";
import { expect } from "vitest";
import { createApp } from "./app";

/** A fresh supertest client over the real route modules. */
export const api = () => request(createApp());

/** POST a JSON body (or a raw string, sent as is) with an optional Authorization header and extra headers. */
export function postJson(path: string, body: unknown, auth?: string, headers: Record<string, string> = {}) {
  let req = api().post(path).set("content-type", "application/json");
  if (auth !== undefined) req = req.set("authorization", auth);
  for (const [k, v] of Object.entries(headers)) req = req.set(k, v);
  return req.send(typeof body === "string" ? body : JSON.stringify(body));
}

/** GET with query parameters and an optional Authorization header. */
export function getQuery(path: string, query: Record<string, string | number> = {}, auth?: string, headers: Record<string, string> = {}) {
  let req = api().get(path).query(query);
  if (auth !== undefined) req = req.set("authorization", auth);
  for (const [k, v] of Object.entries(headers)) req = req.set(k, v);
  return req;
}

export interface ProblemBody {
  type: string;
  title: string;
  status: number;
  detail: string;
  instance: string;
  errors?: { pointer: string; message: string }[];
}

/** Text that would betray a stack trace or a server-side file path. */
export function expectNoStackTrace(text: string): void {
  expect(text).not.toMatch(/\n\s+at\s/);
  expect(text).not.toMatch(/\bat\s+\S+\s+\(.*:\d+:\d+\)/);
  expect(text).not.toMatch(/\.(ts|js|mjs|cjs|tsx):\d+/);
  expect(text).not.toMatch(/node_modules|\/work\/|file:\/\//);
  expect(text).not.toMatch(/\b(TypeError|ReferenceError|RangeError|SyntaxError|ZodError)\b/);
}

/** The response is an RFC 9457 problem with this status and type; returns its body. */
export function expectProblem(res: Response, status: number, code: string): ProblemBody {
  expect(res.status, res.text).toBe(status);
  expect(res.headers["content-type"]).toMatch(/^application\/problem\+json/);
  const body = JSON.parse(res.text) as ProblemBody;
  expect(body.type).toBe(`/problems/${code}`);
  expect(body.status).toBe(status);
  expect(typeof body.title).toBe("string");
  expect(body.title.length).toBeGreaterThan(0);
  expect(typeof body.detail).toBe("string");
  expect(body.detail.length).toBeGreaterThan(0);
  expect(res.headers["x-request-id"]).toBeTruthy();
  expect(body.instance).toBe(res.headers["x-request-id"]);
  expectNoStackTrace(res.text);
  return body;
}

/** A 422 validation problem whose field errors include `pointer` (and, if given, a message matching `message`). */
export function expectFieldError(res: Response, pointer: string, message?: RegExp): ProblemBody {
  const body = expectProblem(res, 422, "validation-failed");
  expect(Array.isArray(body.errors)).toBe(true);
  const pointers = body.errors!.map((e) => e.pointer);
  expect(pointers, JSON.stringify(body.errors)).toContain(pointer);
  if (message) {
    const msgs = body.errors!.filter((e) => e.pointer === pointer).map((e) => e.message);
    expect(msgs.some((m) => message.test(m)), JSON.stringify(body.errors)).toBe(true);
  }
  return body;
}

/** Relative difference |a − b| / |b| (b ≠ 0). */
export const relErr = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

export interface LimitMember {
  quantity: string;
  requested?: number;
  allowed: number;
  unit: string;
}

/**
 * A 422 work-limit problem refused before any work: its `limit` names the quantity with what the request needed
 * (more than one call allows), `errors` points at `pointer`, and the detail and that field's message match `message`.
 */
export function expectWorkLimit(res: Response, pointer: string, message: RegExp): ProblemBody & { limit: LimitMember & { requested: number } } {
  const body = expectProblem(res, 422, "work-limit") as ProblemBody & { limit?: LimitMember };
  const limit = body.limit;
  expect(limit, res.text).toBeDefined();
  expect(typeof limit!.quantity).toBe("string");
  expect(limit!.quantity.length).toBeGreaterThan(0);
  expect(typeof limit!.unit).toBe("string");
  expect(limit!.unit.length).toBeGreaterThan(0);
  expect(typeof limit!.allowed).toBe("number");
  expect(typeof limit!.requested).toBe("number");
  expect(limit!.requested!, res.text).toBeGreaterThan(limit!.allowed);
  expect(body.detail).toMatch(message);
  expect(Array.isArray(body.errors), res.text).toBe(true);
  const messages = body.errors!.filter((e) => e.pointer === pointer).map((e) => e.message);
  expect(messages, JSON.stringify(body.errors)).not.toHaveLength(0);
  expect(messages.some((m) => message.test(m)), JSON.stringify(body.errors)).toBe(true);
  return body as ProblemBody & { limit: LimitMember & { requested: number } };
}
