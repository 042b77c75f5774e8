import { optionValue, type FieldSpec, type FormValues, type UnionSpec } from "./schema-form";

/**
 * The structured picker for a JSON field whose schema is a union of objects told apart by one
 * property (a code: `family`, then that family's parameters). The field's JSON text stays the one
 * source of the value: the picker reads its fields from the text when it parses, and writes the
 * text back when a field changes, so the two never disagree and a half-typed JSON is never replaced.
 */

type Obj = Record<string, unknown>;
const isObj = (v: unknown): v is Obj => typeof v === "object" && v !== null && !Array.isArray(v);

export type PickerRead =
  /** `variant` undefined: an object whose discriminator is missing or not one of the listed values. */
  | { ok: true; value: Obj; variant: string | undefined; values: FormValues; unknown: string[] }
  /** `empty`: nothing typed yet, so choosing a variant replaces nothing. */
  | { ok: false; empty: boolean; message: string };

function parses(text: string): boolean {
  try {
    JSON.parse(text);
    return true;
  } catch {
    return false;
  }
}

/** What a field's input shows for a value: strings as typed unless they would read back as other JSON ("123", "true"). */
function shownJson(f: FieldSpec, v: unknown): string {
  if (typeof v === "string" && f.takesString && !parses(v)) return v;
  return JSON.stringify(v);
}

/** One field's input text (or tick) for a value of the object, undefined meaning absent. */
export function displayValue(f: FieldSpec, v: unknown): string | boolean {
  switch (f.kind) {
    case "boolean":
      return typeof v === "boolean" ? v : f.default === true;
    case "enum":
      return v === undefined ? "" : optionValue(v as string);
    case "number":
    case "integer":
    case "string":
      return v === undefined || v === null ? "" : String(v);
    case "json":
      return v === undefined ? "" : shownJson(f, v);
  }
}

/** The variant's fields as shown for an object: each field's input text. */
export function fieldValues(u: UnionSpec, variant: string, value: Obj): FormValues {
  const fields = u.variants.find((v) => v.value === variant)?.fields ?? [];
  return Object.fromEntries(fields.map((f) => [f.name, displayValue(f, value[f.name])]));
}

/** Read the picker's state from the field's JSON text. */
export function readPicker(u: UnionSpec, text: string): PickerRead {
  if (text.trim() === "") return { ok: false, empty: true, message: `Empty: choose a ${u.discriminator} to start.` };
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (e) {
    return { ok: false, empty: false, message: `The JSON does not parse (${e instanceof Error ? e.message : String(e)}); the fields wait until it does.` };
  }
  if (!isObj(value)) return { ok: false, empty: false, message: `The JSON is not an object with a \`${u.discriminator}\`; the fields wait until it is.` };
  const tag = value[u.discriminator];
  const variant = u.variants.find((v) => v.value === tag);
  if (!variant) return { ok: true, value, variant: undefined, values: {}, unknown: [] };
  const known = new Set([u.discriminator, ...variant.fields.map((f) => f.name)]);
  return { ok: true, value, variant: variant.value, values: fieldValues(u, variant.value, value), unknown: Object.keys(value).filter((k) => !known.has(k)) };
}

/**
 * A field's typed text (or tick) as a value: `absent` when the field is to be left out, else the
 * value, or a message when the text cannot be one (nothing is written then).
 */
export function fieldValue(f: FieldSpec, raw: string | boolean): { absent: true } | { value: unknown } | { error: string } {
  if (typeof raw === "boolean") {
    // An optional flag without a default is sent only when ticked, as in the top-level form.
    return raw || f.required || f.default !== undefined ? { value: raw } : { absent: true };
  }
  if (raw.trim() === "") return { absent: true };
  switch (f.kind) {
    case "number":
    case "integer": {
      const n = Number(raw);
      return Number.isFinite(n) ? { value: n } : { error: "Enter a number." };
    }
    case "enum": {
      const o = (f.options ?? []).find((x) => optionValue(x) === raw);
      return o === undefined ? { error: "Pick one of the listed values." } : { value: o };
    }
    case "string":
      return { value: raw };
    case "json":
    case "boolean":
      try {
        return { value: JSON.parse(raw) as unknown };
      } catch (e) {
        if (f.takesString) return { value: raw };
        return { error: `Not valid JSON: ${e instanceof Error ? e.message : String(e)}` };
      }
  }
}

/** The object with one field set from its input (or removed); other properties, unknown ones included, stay as they were. */
export function withField(value: Obj, f: FieldSpec, raw: string | boolean): { value: Obj } | { error: string } {
  const r = fieldValue(f, raw);
  if ("error" in r) return r;
  const next: Obj = { ...value };
  if ("absent" in r) delete next[f.name];
  else next[f.name] = r.value;
  return { value: next };
}

/**
 * The object after choosing another variant: a known example of that variant when there is one
 * (the endpoint's own examples), else the discriminator alone with the properties the new variant
 * also has (m of BCH kept for Reed–Solomon).
 */
export function switchVariant(u: UnionSpec, current: unknown, variant: string, examples: readonly unknown[] = []): Obj {
  const target = u.variants.find((v) => v.value === variant);
  const example = examples.find((e) => isObj(e) && e[u.discriminator] === variant);
  if (isObj(example)) return structuredClone(example);
  const out: Obj = { [u.discriminator]: variant };
  if (isObj(current) && target) for (const f of target.fields) if (f.name in current) out[f.name] = current[f.name];
  return out;
}

/** The field's JSON text for an object: on one line while short enough to read at a glance, else indented. */
export function pickerText(value: Obj): string {
  // Line breaks come only from the indentation: JSON writes those inside strings as \n.
  const flat = JSON.stringify(value, null, 1).replace(/\n\s*/g, " ");
  return flat.length <= 72 ? flat : JSON.stringify(value, null, 2);
}

/**
 * Problems with the field ("/code/t: …", as the form's check and the server's field pointers write
 * them) split by the parameter they point into, so each shows at its own input; the rest as they came.
 * A problem at the parameter itself loses its pointer; one deeper inside keeps it. Only `names` (the
 * parameters on screen) get their own; a problem with any other property stays with the field.
 */
export function messagesByPart(field: string, messages: readonly string[], names: readonly string[]): { parts: Record<string, string[]>; rest: string[] } {
  const parts: Record<string, string[]> = {};
  const rest: string[] = [];
  const prefix = `/${field.replace(/~/g, "~0").replace(/\//g, "~1")}/`;
  for (const m of messages) {
    const colon = m.indexOf(": ");
    const pointer = colon > 0 ? m.slice(0, colon) : "";
    if (!pointer.startsWith(prefix)) {
      rest.push(m);
      continue;
    }
    const [head = "", ...deeper] = pointer.slice(prefix.length).split("/");
    const name = head.replace(/~1/g, "/").replace(/~0/g, "~");
    if (!names.includes(name)) {
      rest.push(m);
      continue;
    }
    (parts[name] ??= []).push(deeper.length ? m : m.slice(colon + 2));
  }
  return { parts, rest };
}
