import { z } from "zod";

/**
 * From an endpoint's input JSON Schema to a form: one field per top-level property
 * (number/integer inputs, enums as selects, booleans as checkboxes, strings as text; arrays,
 * objects and unions as JSON text, a union told apart by one property also with the model of a
 * structured picker, see union-picker.ts), and a zod schema that turns the form's values into the
 * request and checks it against z.fromJSONSchema of the same JSON Schema.
 */

type Json = null | boolean | number | string | Json[] | { [k: string]: Json };
type Schema = Record<string, unknown>;
export type FormValues = Record<string, string | boolean>;
type Primitive = string | number | boolean | null;

export type FieldKind = "number" | "integer" | "enum" | "boolean" | "string" | "json";

export interface FieldSpec {
  name: string;
  kind: FieldKind;
  required: boolean;
  description?: string;
  /** enum: the allowed values, in the schema's order. */
  options?: Primitive[];
  default?: unknown;
  /** number/integer: the range, each end inclusive or exclusive as the schema says. */
  minimum?: Bound;
  maximum?: Bound;
  /** json: what the value is ("array", "object", "one of several shapes"). */
  shape?: string;
  pattern?: string;
  /** json: a union of objects told apart by one constant property, for a structured picker. */
  union?: UnionSpec;
  /** json: one of the accepted shapes is a plain string, so text that is not JSON can stand for itself. */
  takesString?: boolean;
}

/** A union of object shapes told apart by the constant value of one property (the discriminator). */
export interface UnionSpec {
  discriminator: string;
  variants: { value: string; description?: string; fields: FieldSpec[] }[];
}

/** One end of a numeric range; `exclusive` for JSON Schema's exclusiveMinimum / exclusiveMaximum (zod's gt / lt). */
export interface Bound {
  value: number;
  exclusive: boolean;
}

export type FormPlan = { kind: "fields"; fields: FieldSpec[] } | ({ kind: "variants" } & UnionSpec) | { kind: "raw" };

const isObj = (v: unknown): v is Schema => typeof v === "object" && v !== null && !Array.isArray(v);

/** Follow local $refs (#/$defs/…, #/definitions/…) and single-member allOf. */
export function resolveRef(s: unknown, root: Schema, depth = 0): Schema {
  if (!isObj(s) || depth > 32) return {};
  if (typeof s.$ref === "string" && s.$ref.startsWith("#/")) {
    const target = s.$ref
      .slice(2)
      .split("/")
      .map((p) => p.replace(/~1/g, "/").replace(/~0/g, "~"))
      .reduce<unknown>((node, key) => (isObj(node) ? node[key] : undefined), root);
    const rest: Schema = { ...s };
    delete rest.$ref;
    return { ...resolveRef(target, root, depth + 1), ...rest };
  }
  if (Array.isArray(s.allOf) && s.allOf.length === 1 && Object.keys(s).length === 1) return resolveRef(s.allOf[0], root, depth + 1);
  return s;
}

const branches = (s: Schema): unknown[] | undefined => (Array.isArray(s.oneOf) ? s.oneOf : Array.isArray(s.anyOf) ? s.anyOf : undefined);

/**
 * zod writes `.int()` as the range ±(2^53 − 1) (Number.MAX_SAFE_INTEGER), a limit of the number type,
 * not one anybody documented: a bound that large is no bound. Real limits (n ≤ 65535, m ≤ 16) stay.
 */
function num(v: unknown): number | undefined {
  return typeof v === "number" && Number.isFinite(v) && Math.abs(v) < Number.MAX_SAFE_INTEGER ? v : undefined;
}

/**
 * The binding end of a range from JSON Schema 2020-12's inclusive and exclusive keywords
 * (both numbers there); when both are given the tighter one wins, an exclusive one on a tie.
 */
function boundOf(inclusive: unknown, exclusive: unknown, side: "min" | "max"): Bound | undefined {
  const inc = num(inclusive);
  const exc = num(exclusive);
  if (exc === undefined) return inc === undefined ? undefined : { value: inc, exclusive: false };
  if (inc === undefined) return { value: exc, exclusive: true };
  const incTighter = side === "min" ? inc > exc : inc < exc;
  return incTighter ? { value: inc, exclusive: false } : { value: exc, exclusive: true };
}

function constValues(s: Schema, root: Schema): Primitive[] | undefined {
  if ("const" in s) return [s.const as Primitive];
  if (Array.isArray(s.enum)) return s.enum as Primitive[];
  const b = branches(s);
  if (b) {
    const all = b.map((x) => constValues(resolveRef(x, root), root));
    if (all.every((x): x is Primitive[] => x !== undefined)) return all.flat();
  }
  return undefined;
}

function typeOf(s: Schema): string | undefined {
  if (typeof s.type === "string") return s.type;
  if (Array.isArray(s.type)) {
    const t = s.type.filter((x) => x !== "null");
    return t.length === 1 && typeof t[0] === "string" ? t[0] : undefined;
  }
  return undefined;
}

function fieldOf(name: string, raw: unknown, required: boolean, root: Schema, depth: number): FieldSpec {
  let s = resolveRef(raw, root);
  // A nullable wrapper (anyOf [X, {type: null}]) is X for the form.
  const b = branches(s);
  if (b && b.length === 2) {
    const nonNull = b.map((x) => resolveRef(x, root)).filter((x) => x.type !== "null");
    if (nonNull.length === 1) s = { ...nonNull[0], description: s.description ?? nonNull[0]!.description, default: s.default ?? nonNull[0]!.default };
  }
  const base = {
    name,
    required,
    description: typeof s.description === "string" ? s.description : undefined,
    default: s.default,
  };
  const values = constValues(s, root);
  if (values && values.length > 0) return { ...base, kind: "enum", options: values };
  const t = typeOf(s);
  if (!branches(s)) {
    if (t === "number" || t === "integer")
      return { ...base, kind: t, minimum: boundOf(s.minimum, s.exclusiveMinimum, "min"), maximum: boundOf(s.maximum, s.exclusiveMaximum, "max") };
    if (t === "boolean") return { ...base, kind: "boolean" };
    if (t === "string") return { ...base, kind: "string", pattern: typeof s.pattern === "string" ? s.pattern : undefined };
  }
  const shape = branches(s) ? "one of several shapes" : t === "array" ? "array" : t === "object" ? "object" : "JSON value";
  const union = depth < 2 ? unionOf(s, root, depth + 1) : undefined;
  const takesString = (branches(s) ?? []).some((x) => typeOf(resolveRef(x, root)) === "string");
  return { ...base, kind: "json", shape, ...(union ? { union } : {}), ...(takesString ? { takesString } : {}) };
}

function fieldsOf(obj: Schema, root: Schema, depth: number, skip?: string): FieldSpec[] {
  const props = isObj(obj.properties) ? obj.properties : {};
  const required = new Set(Array.isArray(obj.required) ? (obj.required as string[]) : []);
  return Object.entries(props)
    .filter(([name]) => name !== skip)
    .map(([name, p]) => fieldOf(name, p, required.has(name), root, depth));
}

/** The schema as a union of objects told apart by one constant string property, with each shape's fields; undefined when it is not one. */
function unionOf(s: Schema, root: Schema, depth: number): UnionSpec | undefined {
  const b = branches(s);
  if (!b || b.length === 0) return undefined;
  const objs = b.map((x) => resolveRef(x, root));
  if (!objs.every((o) => isObj(o.properties))) return undefined;
  const first = objs[0];
  const candidates = first && isObj(first.properties) ? Object.keys(first.properties) : [];
  const constOf = (o: Schema, name: string) => resolveRef((o.properties as Schema)[name], root).const;
  const discriminator = candidates.find((name) => objs.every((o) => typeof constOf(o, name) === "string"));
  if (!discriminator) return undefined;
  return {
    discriminator,
    variants: objs.map((o) => ({
      value: String(constOf(o, discriminator)),
      description: typeof o.description === "string" ? o.description : undefined,
      fields: fieldsOf(o, root, depth, discriminator),
    })),
  };
}

/** The form for a JSON Schema: fields of an object, a variant picker for a union of objects told apart by one constant property, else one JSON text area. */
export function planForm(schema: Schema): FormPlan {
  const top = resolveRef(schema, schema);
  if (typeOf(top) === "object" || isObj(top.properties)) return { kind: "fields", fields: fieldsOf(top, schema, 0) };
  const union = unionOf(top, schema, 0);
  return union ? { kind: "variants", ...union } : { kind: "raw" };
}

/** The name of the raw JSON field when the plan is "raw". */
export const RAW_FIELD = "__body";

/** The fields of a plan for one variant (the discriminator's value). */
export function activeFields(plan: FormPlan, variant: string | undefined): FieldSpec[] {
  if (plan.kind === "fields") return plan.fields;
  if (plan.kind === "variants") return plan.variants.find((v) => v.value === variant)?.fields ?? plan.variants[0]?.fields ?? [];
  return [{ name: RAW_FIELD, kind: "json", required: true, shape: "request body" }];
}

export function variantOf(plan: FormPlan, value: unknown): string | undefined {
  if (plan.kind !== "variants") return undefined;
  const v = isObj(value) ? value[plan.discriminator] : undefined;
  return typeof v === "string" && plan.variants.some((x) => x.value === v) ? v : plan.variants[0]?.value;
}

const optionKey = (v: Primitive) => JSON.stringify(v);

/** Form values for an example request (or for nothing: defaults and blanks). */
export function valuesFor(plan: FormPlan, fields: FieldSpec[], example: unknown, variant?: string): FormValues {
  const ex = isObj(example) ? example : {};
  const out: FormValues = {};
  if (plan.kind === "raw") {
    out[RAW_FIELD] = example === undefined ? "{}" : JSON.stringify(example, null, 2);
    return out;
  }
  if (plan.kind === "variants") out[plan.discriminator] = variant ?? variantOf(plan, example) ?? "";
  for (const f of fields) {
    const v = f.name in ex ? ex[f.name] : f.default;
    switch (f.kind) {
      case "boolean":
        out[f.name] = typeof v === "boolean" ? v : false;
        break;
      case "enum":
        out[f.name] = v === undefined ? "" : optionKey(v as Primitive);
        break;
      case "number":
      case "integer":
      case "string":
        out[f.name] = v === undefined || v === null ? "" : String(v);
        break;
      case "json":
        // Defaults of structured fields stay with the server; only the example's own values are filled in.
        out[f.name] = f.name in ex ? JSON.stringify(ex[f.name], null, 2) : "";
        break;
    }
  }
  return out;
}

export const optionValue = optionKey;

/** The range in words for a field's hint: "0 to 1", "above 0, at most 16", "at least 1". */
export function rangeHint(f: Pick<FieldSpec, "minimum" | "maximum">): string | null {
  const { minimum: lo, maximum: hi } = f;
  if (lo && hi && !lo.exclusive && !hi.exclusive) return `${lo.value} to ${hi.value}`;
  const parts = [
    lo ? `${lo.exclusive ? "above" : "at least"} ${lo.value}` : null,
    hi ? `${hi.exclusive ? "below" : "at most"} ${hi.value}` : null,
  ].filter(Boolean);
  return parts.length ? parts.join(", ") : null;
}

function fieldSchema(f: FieldSpec) {
  const missing = (ctx: z.RefinementCtx) => {
    ctx.addIssue({ code: "custom", message: "Required." });
    return z.NEVER;
  };
  switch (f.kind) {
    case "number":
    case "integer":
      return z.string().transform((s, ctx): number | undefined => {
        if (s.trim() === "") return f.required ? missing(ctx) : undefined;
        const n = Number(s);
        if (!Number.isFinite(n)) {
          ctx.addIssue({ code: "custom", message: "Enter a number." });
          return z.NEVER;
        }
        return n;
      });
    case "enum": {
      const byKey = new Map((f.options ?? []).map((o) => [optionKey(o), o]));
      return z.string().transform((s, ctx): Primitive | undefined => {
        if (s === "") return f.required ? missing(ctx) : undefined;
        if (!byKey.has(s)) {
          ctx.addIssue({ code: "custom", message: "Pick one of the listed values." });
          return z.NEVER;
        }
        return byKey.get(s);
      });
    }
    case "boolean":
      // An optional flag without a default is sent only when ticked.
      return z.boolean().transform((b) => (f.required || f.default !== undefined || b ? b : undefined));
    case "string":
      return z.string().transform((s, ctx): string | undefined => (s === "" ? (f.required ? missing(ctx) : undefined) : s));
    case "json":
      return z.string().transform((s, ctx): Json | undefined => {
        if (s.trim() === "") return f.required ? missing(ctx) : undefined;
        try {
          return JSON.parse(s) as Json;
        } catch (e) {
          ctx.addIssue({ code: "custom", message: `Not valid JSON: ${e instanceof Error ? e.message : String(e)}` });
          return z.NEVER;
        }
      });
  }
}

/** RFC 6901 pointer for a path. */
export function pointerOf(path: readonly PropertyKey[]): string {
  return path.map((p) => "/" + String(p).replace(/~/g, "~0").replace(/\//g, "~1")).join("");
}

interface Issue {
  path: PropertyKey[];
  message: string;
}

type RawIssue = z.core.$ZodIssue;

/**
 * Readable issues from a zod error: for a union, the branch that came closest (no constant
 * mismatch, then fewest issues) rather than "Invalid input" for every branch.
 */
export function explainIssues(issues: readonly RawIssue[], prefix: PropertyKey[] = []): Issue[] {
  return issues.flatMap((issue): Issue[] => {
    const path = [...prefix, ...issue.path];
    if (issue.code === "invalid_union" && Array.isArray(issue.errors) && issue.errors.length > 0) {
      const scored = issue.errors.map((branch) => ({
        branch,
        miss: branch.filter((i) => i.code === "invalid_value" && Array.isArray(i.values) && i.values.length === 1).length,
      }));
      scored.sort((a, b) => a.miss - b.miss || a.branch.length - b.branch.length);
      const best = scored[0];
      if (best && best.miss === 0) return explainIssues(best.branch, path);
      return [{ path, message: "Matches none of the accepted shapes; see the examples for one that works." }];
    }
    if (issue.code === "unrecognized_keys") return issue.keys.map((k) => ({ path: [...path, k], message: `Unknown field \`${k}\`.` }));
    return [{ path, message: issue.message }];
  });
}

/** The zod schema react-hook-form validates with (through zodResolver). */
export function buildFormSchema(plan: FormPlan, fields: FieldSpec[], body: z.ZodType | null): z.ZodType<Record<string, unknown>, FormValues> {
  const shape: Record<string, z.ZodType> = {};
  // The discriminator first, so the request reads in the order the API documents it.
  if (plan.kind === "variants") shape[plan.discriminator] = z.string().min(1, "Pick one.");
  for (const f of fields) shape[f.name] = fieldSchema(f);
  const topNames = new Set(Object.keys(shape));
  const form = z.object(shape).transform((v): Record<string, unknown> => {
    if (plan.kind === "raw") return (v[RAW_FIELD] ?? {}) as Record<string, unknown>;
    return Object.fromEntries(Object.entries(v).filter(([, x]) => x !== undefined));
  });
  if (!body) return form as unknown as z.ZodType<Record<string, unknown>, FormValues>;
  return form.superRefine((request, ctx) => {
    const r = body.safeParse(request);
    if (r.success) return;
    // Issues inside a field go to that field, with the pointer into it; the rest to the form as a whole.
    const grouped = new Map<string, string[]>();
    for (const i of explainIssues(r.error.issues)) {
      const top = plan.kind === "raw" ? RAW_FIELD : String(i.path[0] ?? "");
      const target = topNames.has(top) ? top : "root";
      const pointer = pointerOf(i.path);
      const text = pointer && (i.path.length > 1 || target === "root") ? `${pointer}: ${i.message}` : i.message;
      grouped.set(target, [...(grouped.get(target) ?? []), text]);
    }
    for (const [target, messages] of grouped) ctx.addIssue({ code: "custom", path: [target], message: messages.join(" · ") });
  }) as unknown as z.ZodType<Record<string, unknown>, FormValues>;
}

/** z.fromJSONSchema of an endpoint's input, or null when zod cannot express it (the server still checks). */
export function bodySchemaOf(schema: Record<string, unknown>): z.ZodType | null {
  try {
    return z.fromJSONSchema(schema as Parameters<typeof z.fromJSONSchema>[0]);
  } catch {
    return null;
  }
}

/** A choice's text cut at a word to at most `max` characters, with "…": a select shows its choice on one line, and a phone has room for about 40. */
export function shortLabel(text: string, max = 40): string {
  if (text.length <= max) return text;
  const cut = text.slice(0, max - 1);
  const space = cut.lastIndexOf(" ");
  return `${(space > max / 2 ? cut.slice(0, space) : cut).replace(/[\s,;:–-]+$/, "")}…`;
}
