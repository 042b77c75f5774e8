/**
 * The bench's structured picker for a code (lib/console-client/union-picker.ts and the union
 * model in schema-form.ts), checked against the published OpenAPI document (the families of
 * CodeSpec's discriminator mapping, each parameter's documented range) and against the endpoint's
 * own request schema (what the picker writes is a request the server accepts).
 */
import { describe, expect, test } from "vitest";
import { z } from "zod";
import { decode } from "@/lib/api/endpoints/decode";
import { endpointCatalogue } from "@/lib/console/account";
import { activeFields, bodySchemaOf, buildFormSchema, planForm, rangeHint, valuesFor, type FieldSpec, type UnionSpec } from "@/lib/console-client/schema-form";
import type { EndpointInfo } from "@/lib/console-client/types";
import { displayValue, messagesByPart, pickerText, readPicker, switchVariant, withField } from "@/lib/console-client/union-picker";
import { buildOpenApiDocument } from "@/openapi/document";

const catalogue = endpointCatalogue() as EndpointInfo[];
const decodeInfo = catalogue.find((e) => e.path === "/api/v1/decode")!;
const doc = buildOpenApiDocument() as { components: { schemas: Record<string, { properties?: Record<string, { minimum?: number; maximum?: number }> }> } };
const codeSpecDoc = doc.components.schemas.CodeSpec as unknown as { discriminator: { propertyName: string; mapping: Record<string, string> } };

function codeUnion(info: EndpointInfo = decodeInfo): UnionSpec {
  const f = activeFields(planForm(info.inputSchema), undefined).find((x) => x.name === "code");
  if (!f?.union) throw new Error(`no code picker on ${info.id}`);
  return f.union;
}
const sub = (family: string, name: string): FieldSpec => {
  const f = codeUnion()
    .variants.find((v) => v.value === family)
    ?.fields.find((x) => x.name === name);
  if (!f) throw new Error(`no ${family}.${name}`);
  return f;
};

/** Every field of every form the bench generates, nested picker fields included. */
function allFields(): { where: string; f: FieldSpec }[] {
  const out: { where: string; f: FieldSpec }[] = [];
  const walk = (where: string, fields: FieldSpec[]) => {
    for (const f of fields) {
      out.push({ where: `${where}.${f.name}`, f });
      for (const v of f.union?.variants ?? []) walk(`${where}.${f.name}[${v.value}]`, v.fields);
    }
  };
  for (const info of catalogue) {
    const plan = planForm(info.inputSchema);
    if (plan.kind === "variants") for (const v of plan.variants) walk(`${info.id}[${v.value}]`, v.fields);
    else walk(info.id, activeFields(plan, undefined));
  }
  return out;
}

describe("the picker model, generated from the served schema", () => {
  test("the families are the ones the OpenAPI document maps, in the schema's order, told apart by `family`", () => {
    const u = codeUnion();
    expect(u.discriminator).toBe(codeSpecDoc.discriminator.propertyName);
    expect(u.variants.map((v) => v.value)).toEqual(Object.keys(codeSpecDoc.discriminator.mapping));
  });

  test("every endpoint that takes a code by family gets the same picker", () => {
    const withCode = catalogue.filter((e) => activeFields(planForm(e.inputSchema), undefined).some((f) => f.name === "code" && f.union));
    expect(withCode.map((e) => e.id)).toEqual(expect.arrayContaining(["encode", "decode"]));
    for (const e of withCode) expect(codeUnion(e).variants.map((v) => v.value), e.id).toEqual(codeUnion().variants.map((v) => v.value));
  });

  test("a family added to a union appears by itself, with its own fields", () => {
    const a = z.object({ family: z.literal("a"), n: z.number().int().min(1).max(9) });
    const b = z.object({ family: z.literal("b"), depth: z.number().int().min(2).describe("How deep.") });
    const plan = planForm(z.toJSONSchema(z.object({ code: z.discriminatedUnion("family", [a, b]) })) as Record<string, unknown>);
    const u = activeFields(plan, undefined)[0]!.union!;
    expect(u.variants.map((v) => [v.value, v.fields.map((f) => [f.name, f.kind, rangeHint(f)])])).toEqual([
      ["a", [["n", "integer", "1 to 9"]]],
      ["b", [["depth", "integer", "at least 2"]]],
    ]);
  });

  test("each family's parameters carry their descriptions, defaults and kinds", () => {
    expect(sub("bch", "m")).toMatchObject({ kind: "integer", required: true, description: "Field GF(2^m): n = 2^m − 1 before shortening." });
    expect(sub("bch", "shorten")).toMatchObject({ kind: "integer", required: false, default: 0 });
    expect(sub("parity", "parity")).toMatchObject({ kind: "enum", options: ["even", "odd"], default: "even" });
    expect(sub("golay", "extended")).toMatchObject({ kind: "boolean", default: false });
    expect(sub("crc", "poly")).toMatchObject({ kind: "json", takesString: true });
    expect(sub("linear", "generator")).toMatchObject({ kind: "json", shape: "array" });
  });
});

describe("ranges shown are the documented ones", () => {
  test("no hint anywhere shows the number type's own limit 2^53 − 1", () => {
    const shown = allFields()
      .map(({ where, f }) => `${where}: ${rangeHint(f) ?? ""}`)
      .filter((s) => /9007199254740991|9\.007/.test(s));
    expect(shown).toEqual([]);
  });

  test("a bound stated only as 2^53 − 1 is no bound; a real one stays (BCH t ≥ 1, RS k ≥ 1, m from 3 or 2 to 16)", () => {
    expect(rangeHint(sub("bch", "t"))).toBe("at least 1");
    expect(rangeHint(sub("bch", "shorten"))).toBe("at least 0");
    expect(rangeHint(sub("rs", "k"))).toBe("at least 1");
    expect(rangeHint(sub("bch", "m"))).toBe("3 to 16");
    expect(rangeHint(sub("rs", "m"))).toBe("2 to 16");
    expect(rangeHint(sub("repetition", "n"))).toBe("1 to 65535");
  });

  test("every code parameter's range is the OpenAPI document's, less the 2^53 − 1 ends", () => {
    const limit = (v: number | undefined) => (v === undefined || Math.abs(v) >= Number.MAX_SAFE_INTEGER ? undefined : v);
    let compared = 0;
    for (const v of codeUnion().variants) {
      const schemaName = codeSpecDoc.discriminator.mapping[v.value]!.split("/").pop()!;
      const props = doc.components.schemas[schemaName]!.properties!;
      for (const f of v.fields.filter((x) => x.kind === "integer" || x.kind === "number")) {
        expect(f.minimum?.value, `${v.value}.${f.name}`).toBe(limit(props[f.name]!.minimum));
        expect(f.maximum?.value, `${v.value}.${f.name}`).toBe(limit(props[f.name]!.maximum));
        compared++;
      }
    }
    expect(compared).toBeGreaterThan(10);
  });
});

describe("fields and JSON stay in sync", () => {
  const u = codeUnion();

  test("JSON that parses fills the family and its fields", () => {
    const r = readPicker(u, '{ "family": "bch", "m": 5, "t": 3, "primitivePoly": "0x25" }');
    expect(r).toMatchObject({ ok: true, variant: "bch", values: { m: "5", t: "3", shorten: "", primitivePoly: "0x25" }, unknown: [] });
  });

  test("JSON that does not parse is reported and not replaced; empty JSON invites a choice", () => {
    const bad = readPicker(u, '{ "family": "bch", "m": 5,');
    expect(bad.ok).toBe(false);
    expect(bad).toMatchObject({ empty: false, message: expect.stringMatching(/^The JSON does not parse \(.+\); the fields wait until it does\.$/) });
    expect(readPicker(u, "[1]")).toMatchObject({ ok: false, empty: false });
    expect(readPicker(u, "  ")).toMatchObject({ ok: false, empty: true });
  });

  test("an unknown family parses, with no variant, and properties not of the family are listed", () => {
    expect(readPicker(u, '{ "family": "turbo" }')).toMatchObject({ ok: true, variant: undefined });
    expect(readPicker(u, '{ "family": "golay", "r": 3 }')).toMatchObject({ ok: true, variant: "golay", unknown: ["r"] });
  });

  test("a field's edit writes that property only; blank removes it; text that is not a number is refused, not written", () => {
    const start = { family: "bch", m: 5, t: 3, note: "kept" };
    expect(withField(start, sub("bch", "t"), "2")).toEqual({ value: { family: "bch", m: 5, t: 2, note: "kept" } });
    expect(withField(start, sub("bch", "t"), "")).toEqual({ value: { family: "bch", m: 5, note: "kept" } });
    expect(withField(start, sub("bch", "t"), "two")).toEqual({ error: "Enter a number." });
    expect(withField({ family: "parity", n: 8 }, sub("parity", "parity"), '"odd"')).toEqual({ value: { family: "parity", n: 8, parity: "odd" } });
  });

  test("flags: an optional one without a default is sent only when ticked; one with a default is always sent", () => {
    expect(withField({ family: "hamming", r: 3 }, sub("hamming", "extended"), false)).toEqual({ value: { family: "hamming", r: 3 } });
    expect(withField({ family: "hamming", r: 3 }, sub("hamming", "extended"), true)).toEqual({ value: { family: "hamming", r: 3, extended: true } });
    expect(withField({ family: "golay" }, sub("golay", "extended"), false)).toEqual({ value: { family: "golay", extended: false } });
  });

  test("a field that takes a string or a number reads text as itself and JSON as JSON, and shows a string that looks like a number quoted", () => {
    const poly = sub("crc", "poly");
    expect(withField({ family: "crc", width: 16 }, poly, "0x1021")).toEqual({ value: { family: "crc", width: 16, poly: "0x1021" } });
    expect(withField({ family: "crc", width: 16 }, poly, "4129")).toEqual({ value: { family: "crc", width: 16, poly: 4129 } });
    expect(displayValue(poly, "0x1021")).toBe("0x1021");
    expect(displayValue(poly, "1021")).toBe('"1021"');
    expect(withField({ family: "crc" }, poly, displayValue(poly, "1021") as string)).toEqual({ value: { family: "crc", poly: "1021" } });
  });

  test("choosing a family starts from the endpoint's example of it, else keeps the parameters both share", () => {
    const examples = Object.values(decodeInfo.examples).map((e) => (e.value as { code?: unknown }).code);
    expect(switchVariant(u, { family: "bch", m: 4, t: 2 }, "rs", examples)).toEqual({ family: "rs", m: 4, k: 9 });
    expect(switchVariant(u, { family: "rs", m: 4, k: 9 }, "bch", [])).toEqual({ family: "bch", m: 4 });
    expect(switchVariant(u, undefined, "golay", [])).toEqual({ family: "golay" });
  });

  test("what the picker writes is the request the server reads: BCH (15,7), t = 2, from an empty field", () => {
    let code = switchVariant(u, undefined, "bch", []);
    for (const [name, raw] of [
      ["m", "4"],
      ["t", "2"],
    ] as const) {
      const r = withField(code, sub("bch", name), raw);
      if ("error" in r) throw new Error(r.error);
      code = r.value;
    }
    const plan = planForm(decodeInfo.inputSchema);
    const fields = activeFields(plan, undefined);
    const values = { ...valuesFor(plan, fields, { words: ["000000000000000"] }), code: pickerText(code) };
    const sent = buildFormSchema(plan, fields, bodySchemaOf(decodeInfo.inputSchema)).safeParse(values);
    expect(sent.error?.issues).toBeUndefined();
    expect(decode.input.parse(sent.data)).toEqual({ code: { family: "bch", m: 4, t: 2, shorten: 0 }, words: ["000000000000000"] });
  });
});

describe("the JSON the picker writes", () => {
  test("short objects on one line, longer ones indented; either reads back as the same object", () => {
    expect(pickerText({ family: "bch", m: 4, t: 2 })).toBe('{ "family": "bch", "m": 4, "t": 2 }');
    const long = { family: "linear", generator: ["1000111", "0100110", "0010101", "0001011"], note: "a\nb" };
    expect(pickerText(long)).toContain("\n  ");
    for (const v of [{ family: "bch", m: 4, t: 2 }, long, { family: "crc", preset: "x\ny" }]) expect(JSON.parse(pickerText(v))).toEqual(v);
  });
});

describe("problems shown at the parameter they point into", () => {
  test("RFC 6901 pointers into the field go to their parameter on screen; others stay with the field", () => {
    const { parts, rest } = messagesByPart("code", [
      "/code/t: `t` must be a whole number from 1 to 2^(m−1) − 1; got 9.",
      "/code/generator/2: not a row of bits",
      "/code: Give exactly one of `generator` and `parityCheck`.",
      "Required.",
      "/codes/x: another field",
      "/code/r: Unknown field `r`.",
    ], ["t", "generator", "m"]);
    expect(parts).toEqual({ t: ["`t` must be a whole number from 1 to 2^(m−1) − 1; got 9."], generator: ["/code/generator/2: not a row of bits"] });
    expect(rest).toEqual(["/code: Give exactly one of `generator` and `parityCheck`.", "Required.", "/codes/x: another field", "/code/r: Unknown field `r`."]);
  });

  test("escaped names (~1 for /, ~0 for ~) are read back", () => {
    expect(messagesByPart("a/b", ["/a~1b/x~0y: bad"], ["x~y"]).parts).toEqual({ "x~y": ["bad"] });
  });
});
