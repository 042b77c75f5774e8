import type { ParsedQs } from "qs";
import { kinds, type Meta, type State, type Store } from "./state";

/** The one error shape the SDK turns into its typed errors (400 → invalid request, 401 → authentication, 402 → card, 404 → invalid request). */
export class ApiError extends Error {
  constructor(
    readonly status: 400 | 401 | 402 | 404,
    readonly type: "invalid_request_error" | "card_error" | "api_error",
    readonly code: string,
    message: string,
    readonly param?: string,
    readonly extra: Record<string, string> = {},
  ) {
    super(message);
  }

  get body() {
    return { error: { type: this.type, code: this.code, message: this.message, ...(this.param ? { param: this.param } : {}), ...this.extra } };
  }
}

export const invalid = (code: string, message: string, param?: string) => new ApiError(400, "invalid_request_error", code, message, param);

/** An id in the path that names nothing is a 404; an id in a form field is a bad request (400), as the provider answers. */
export const missing = (id: string, param = "id") =>
  new ApiError(param === "id" ? 404 : 400, "invalid_request_error", "resource_missing", `No such object: '${id}'.`, param);

// Form fields, as qs parses them: strings, arrays or nested objects.

export function str(p: ParsedQs, name: string, required: true): string;
export function str(p: ParsedQs, name: string, required?: false): string | undefined;
export function str(p: ParsedQs, name: string, required = false): string | undefined {
  const v = p[name];
  if (v === undefined || v === "") {
    if (required) throw invalid("parameter_missing", `Missing required param: ${name}.`, name);
    return undefined;
  }
  if (typeof v !== "string") throw invalid("parameter_invalid_string", `${name} must be a string.`, name);
  return v;
}

/** Amounts and counts are integers (minor units); anything else is refused rather than rounded. */
export function int(p: ParsedQs, name: string, param = name): number | undefined {
  const v = str(p, name);
  if (v === undefined) return undefined;
  if (!/^-?\d+$/.test(v) || !Number.isSafeInteger(Number(v))) throw invalid("parameter_invalid_integer", `${param} must be an integer, not '${v}'.`, param);
  return Number(v);
}

export function bool(p: ParsedQs, name: string): boolean | undefined {
  const v = str(p, name);
  if (v === undefined) return undefined;
  if (v !== "true" && v !== "false") throw invalid("parameter_invalid_boolean", `${name} must be true or false.`, name);
  return v === "true";
}

export function obj(p: ParsedQs, name: string): ParsedQs {
  const v = p[name];
  if (v === undefined || v === "") return {};
  if (typeof v !== "object" || Array.isArray(v)) throw invalid("parameter_invalid_object", `${name} must be an object.`, name);
  return v as ParsedQs;
}

/** An indexed list (`items[0][price]=…`) as an array of objects. */
export function objects(p: ParsedQs, name: string): ParsedQs[] {
  const v = p[name];
  if (v === undefined || v === "") return [];
  const all = Array.isArray(v) ? v : typeof v === "object" ? Object.values(v) : [v];
  return all.map((x, i) => {
    if (typeof x !== "object" || x === null || Array.isArray(x)) throw invalid("parameter_invalid_object", `${name}[${i}] must be an object.`, `${name}[${i}]`);
    return x as ParsedQs;
  });
}

export function strings(p: ParsedQs, name: string): string[] {
  const v = p[name];
  if (v === undefined || v === "") return [];
  const all = Array.isArray(v) ? v : typeof v === "object" ? Object.values(v) : [v];
  return all.map((x) => {
    if (typeof x !== "string") throw invalid("parameter_invalid_string", `${name} must be a list of strings.`, name);
    return x;
  });
}

/** Metadata merges into what is there; a key set to "" is removed (as the provider documents). */
export function metadata(p: ParsedQs, current: Meta = {}): Meta {
  const next = { ...current };
  for (const [k, v] of Object.entries(obj(p, "metadata"))) {
    if (typeof v !== "string") throw invalid("parameter_invalid_string", `metadata[${k}] must be a string.`, `metadata[${k}]`);
    if (v === "") delete next[k];
    else next[k] = v;
  }
  return next;
}

/** Newest first: the order every list endpoint answers in. */
export const newestFirst = <T>(all: Record<string, T>): T[] => Object.values(all).reverse();

/** The one list helper: `limit` (default 10, at most 100) and a `starting_after` / `ending_before` cursor over a newest-first array. */
export function list<T extends { id: string }>(all: T[], q: ParsedQs, url: string, render: (x: T) => unknown = (x) => x) {
  const limit = int(q, "limit") ?? 10;
  if (limit < 1 || limit > 100) throw invalid("parameter_invalid_integer", "limit must be between 1 and 100.", "limit");
  const after = str(q, "starting_after");
  const before = str(q, "ending_before");
  const at = (id: string, param: string) => {
    const i = all.findIndex((x) => x.id === id);
    if (i < 0) throw invalid("resource_missing", `No such object: '${id}'.`, param);
    return i;
  };
  let page: T[];
  let hasMore: boolean;
  if (after !== undefined) {
    const from = at(after, "starting_after") + 1;
    page = all.slice(from, from + limit);
    hasMore = from + limit < all.length;
  } else if (before !== undefined) {
    const to = at(before, "ending_before");
    page = all.slice(Math.max(0, to - limit), to);
    hasMore = to - limit > 0;
  } else {
    page = all.slice(0, limit);
    hasMore = limit < all.length;
  }
  return { object: "list", data: page.map(render), has_more: hasMore, url };
}

/** An object as the API shows it: our "_" fields dropped, subscriptions and invoices filled out. */
export function render(store: Store, o: object): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(o)) if (!k.startsWith("_")) out[k] = v;
  const s = store.state;
  if (out.object === "subscription") {
    const sub = out as unknown as State["subscriptions"][string];
    out.items = {
      object: "list",
      data: sub.items.map((it) => ({
        ...it,
        subscription: sub.id,
        price: s.prices[it.price],
        ...(it.quantity === null ? {} : { quantity: it.quantity }),
        current_period_start: sub.current_period_start,
        current_period_end: sub.current_period_end,
      })),
      has_more: false,
      url: `/v1/subscription_items?subscription=${sub.id}`,
    };
  }
  if (out.object === "invoice") {
    const inv = o as State["invoices"][string];
    out.lines = { object: "list", data: inv._lines.slice(0, 10), has_more: inv._lines.length > 10, url: `/v1/invoices/${inv.id}/lines` };
    // Newer SDK types read the subscription here; the contract's top-level `subscription` stays too.
    out.parent = { type: "subscription_details", subscription_details: { subscription: inv.subscription, metadata: s.subscriptions[inv.subscription]?.metadata ?? {} } };
  }
  return out;
}

/** Any object by id: the id's prefix names its kind. Products may carry a caller's id, so they are looked up last. */
export function lookup(store: Store, id: string): object | undefined {
  const kind = id.slice(0, id.indexOf(".")) as keyof typeof kinds;
  const coll = kinds[kind] as keyof State | undefined;
  const found = coll ? (store.state[coll] as Record<string, object>)[id] : undefined;
  return found ?? store.state.products[id];
}

export function get<K extends (typeof kinds)[keyof typeof kinds]>(store: Store, coll: K, id: string, param = "id"): State[K][string] {
  const found = (store.state[coll] as Record<string, State[K][string]>)[id];
  if (!found) throw missing(id, param);
  return found;
}

/** `expand[]=a.b`: replaces the id found at that path with its object; `data.` walks into a list. */
export function expand(store: Store, out: unknown, paths: string[]): unknown {
  for (const path of paths) walk(store, out, path.split("."));
  return out;
}

function walk(store: Store, at: unknown, parts: string[]): void {
  if (typeof at !== "object" || at === null) return;
  const [head, ...rest] = parts;
  if (head === undefined) return;
  const o = at as Record<string, unknown>;
  if (head === "data" && Array.isArray(o.data)) {
    for (const x of o.data) walk(store, x, rest);
    return;
  }
  if (rest.length > 0) return walk(store, o[head], rest);
  const v = o[head];
  if (typeof v === "string") {
    const found = lookup(store, v);
    if (found) o[head] = render(store, found);
  }
}

/** An HTML answer (the hosted payment page) or a redirect, instead of JSON. */
export class Page {
  constructor(
    readonly status: number,
    readonly html: string,
    readonly location?: string,
  ) {}
}

export interface Ctx {
  env: import("./webhooks").Env;
  params: Record<string, string>;
  /** The form body of a POST, or the query of a GET / DELETE. */
  q: ParsedQs;
}

/** A handler answers with a JSON-able object (status 200) or a Page, or throws an ApiError. */
export type Route = [method: string, pattern: string, handler: (c: Ctx) => unknown, open?: "no-auth"];
