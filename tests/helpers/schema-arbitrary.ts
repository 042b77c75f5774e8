import fc from "fast-check";
import type { Json, SchemaObject } from "./openapi";

/**
 * fast-check arbitraries built from a JSON Schema 2020-12 (the schemas of an OpenAPI 3.1 document):
 * types, enum and const, numeric ranges, lengths, patterns, the date format, objects with their
 * required and optional properties, arrays, and unions (anyOf / oneOf of alternatives). Keywords that
 * only constrain (a oneOf of `required` lists beside `properties`, if/then, dependentRequired, not)
 * are left to the caller, who keeps what a validator accepts. Sizes are capped so that generated
 * requests stay cheap: integers named in `caps` stay at or below their cap, arrays and strings short.
 */
export interface Limits {
  /** Largest value of an integer property with this name (n, k, m, t, …). */
  caps: Record<string, number>;
  maxItems: number;
  maxLength: number;
}

const resolve = (schema: SchemaObject, root: Json): SchemaObject => {
  const ref = schema.$ref;
  if (typeof ref !== "string") return schema;
  const target = ref
    .replace(/^#\//, "")
    .split("/")
    .map((p) => p.replace(/~1/g, "/").replace(/~0/g, "~"))
    .reduce<Json>((node, key) => (node !== null && typeof node === "object" && !Array.isArray(node) ? node[key]! : null), root);
  return resolve(target as SchemaObject, root);
};

const num = (v: Json | undefined) => (typeof v === "number" ? v : undefined);

function integer(s: SchemaObject, cap: number | undefined): fc.Arbitrary<number> {
  const lo = Math.max(num(s.minimum) ?? -1e6, (num(s.exclusiveMinimum) ?? -Infinity) + 1);
  let hi = Math.min(num(s.maximum) ?? 1e6, (num(s.exclusiveMaximum) ?? Infinity) - 1);
  if (cap !== undefined) hi = Math.min(hi, Math.max(lo, cap));
  // Small values most of the time: sizes, positions and symbols are valid mostly near the low end.
  return fc.oneof({ weight: 3, arbitrary: fc.integer({ min: lo, max: Math.min(hi, lo + 15) }) }, { weight: 1, arbitrary: fc.integer({ min: lo, max: hi }) });
}

function number(s: SchemaObject): fc.Arbitrary<number> {
  const min = num(s.minimum) ?? num(s.exclusiveMinimum) ?? -1e6;
  const max = num(s.maximum) ?? num(s.exclusiveMaximum) ?? 1e6;
  return fc.double({ min, max, minExcluded: s.exclusiveMinimum !== undefined, maxExcluded: s.exclusiveMaximum !== undefined, noNaN: true, noDefaultInfinity: true });
}

const isoDay = fc.date({ min: new Date("2020-01-01T00:00:00Z"), max: new Date("2030-12-31T00:00:00Z"), noInvalidDate: true }).map((d) => d.toISOString().slice(0, 10));

function string(s: SchemaObject, limits: Limits): fc.Arbitrary<string> {
  const minLength = num(s.minLength) ?? 0;
  const maxLength = Math.max(minLength, Math.min(num(s.maxLength) ?? limits.maxLength, limits.maxLength));
  if (s.format === "date") return isoDay;
  if (typeof s.pattern === "string") {
    return fc.stringMatching(new RegExp(s.pattern), { size: "xsmall" }).filter((x) => x.length >= minLength && x.length <= maxLength);
  }
  return fc.string({ minLength, maxLength, unit: "grapheme-ascii" });
}

export function arbitraryFor(schema: SchemaObject | boolean, root: Json, limits: Limits, name?: string, depth = 0): fc.Arbitrary<Json> {
  if (schema === true) return fc.jsonValue({ maxDepth: 2 }) as fc.Arbitrary<Json>;
  if (schema === false || depth > 12) return fc.constant(null);
  const s = resolve(schema, root);
  if ("const" in s) return fc.constant(s.const!);
  if (Array.isArray(s.enum)) return fc.constantFrom(...s.enum);
  const alternatives = (s.oneOf ?? s.anyOf) as SchemaObject[] | undefined;
  if (alternatives && s.type === undefined && s.properties === undefined) {
    return fc.oneof(...alternatives.map((a) => arbitraryFor(a, root, limits, name, depth + 1)));
  }
  switch (s.type) {
    case "boolean":
      return fc.boolean();
    case "integer":
      return integer(s, name === undefined ? undefined : limits.caps[name]);
    case "number":
      return number(s);
    case "string":
      return string(s, limits);
    case "array": {
      const items = arbitraryFor((s.items ?? true) as SchemaObject | boolean, root, limits, undefined, depth + 1);
      const minLength = num(s.minItems) ?? 0;
      const maxLength = Math.max(minLength, Math.min(num(s.maxItems) ?? limits.maxItems, limits.maxItems));
      return s.uniqueItems === true ? fc.uniqueArray(items, { minLength, maxLength, selector: (v) => JSON.stringify(v) }) : fc.array(items, { minLength, maxLength });
    }
    case "object": {
      const props = (s.properties ?? {}) as Record<string, SchemaObject>;
      const required = (s.required ?? []) as string[];
      const needs = (s.dependentRequired ?? {}) as Record<string, string[]>;
      const record = (keys: string[], forbidden: Set<string>) => {
        const model = Object.fromEntries(
          Object.entries(props)
            .filter(([k]) => !forbidden.has(k))
            .map(([k, p]) => [k, arbitraryFor(p, root, limits, k, depth + 1)]),
        );
        return fc.record(model, { requiredKeys: [...new Set(keys.flatMap((k) => [k, ...(needs[k] ?? [])]))] }) as fc.Arbitrary<Json>;
      };
      // A oneOf of `required` lists beside `properties` picks one way of writing the object: one list, none of the others.
      // A branch `{ not: { anyOf: [required…] }, required }` is the way that gives none of the listed keys.
      if (!Array.isArray(s.oneOf)) return record(required, new Set());
      const branches = s.oneOf as SchemaObject[];
      const excluded = (w: SchemaObject) => (((w.not as SchemaObject | undefined)?.anyOf ?? []) as SchemaObject[]).flatMap((a) => (a.required ?? []) as string[]);
      const exclusive = new Set(branches.some((w) => w.not) ? branches.flatMap(excluded) : branches.flatMap((w) => (w.required ?? []) as string[]));
      return fc.oneof(
        ...branches.map((w) => {
          const way = (w.required ?? []) as string[];
          const allowed = new Set([...way, ...way.flatMap((k) => needs[k] ?? [])]);
          return record([...required, ...way], new Set(w.not ? excluded(w) : [...exclusive].filter((k) => !allowed.has(k))));
        }),
      );
    }
    default:
      return fc.jsonValue({ maxDepth: 2 }) as fc.Arbitrary<Json>;
  }
}
