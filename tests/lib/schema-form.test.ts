/**
 * The try page's form generator (lib/console-client/schema-form.ts) against the endpoints'
 * own definitions: every documented example survives the trip example → form values → request,
 * and numeric ranges keep the inclusive/exclusive ends JSON Schema 2020-12 gives them
 * (Validation vocabulary §6.2.2–6.2.5: minimum and maximum include the bound,
 * exclusiveMinimum and exclusiveMaximum, numbers in 2020-12, leave it out).
 */
import { describe, expect, test } from "vitest";
import { z } from "zod";
import { endpointCatalogue } from "@/lib/console/account";
import { endpoints } from "@/lib/api/registry";
import { activeFields, bodySchemaOf, buildFormSchema, planForm, rangeHint, shortLabel, valuesFor, variantOf, type FieldSpec } from "@/lib/console-client/schema-form";
import type { EndpointInfo } from "@/lib/console-client/types";

const catalogue = endpointCatalogue() as EndpointInfo[];

function formFor(info: EndpointInfo, variant?: string) {
  const plan = planForm(info.inputSchema);
  const fields = activeFields(plan, variant);
  return { plan, fields, schema: buildFormSchema(plan, fields, bodySchemaOf(info.inputSchema)) };
}

function field(info: EndpointInfo, variant: string, name: string): FieldSpec {
  const f = formFor(info, variant).fields.find((x) => x.name === name);
  if (!f) throw new Error(`no field ${name} in ${info.id}/${variant}`);
  return f;
}

const capacity = catalogue.find((e) => e.path === "/api/v1/capacity")!;

describe("every documented example, through the generated form", () => {
  const cases = catalogue.flatMap((info) => Object.entries(info.examples).map(([name, ex]) => ({ info, name, value: ex.value })));

  test("there are examples to check: every endpoint that documents one, which is every endpoint with a request body", () => {
    const documented = endpoints.filter((e) => Object.keys(e.examples).length > 0);
    expect(new Set(cases.map((c) => c.info.id))).toEqual(new Set(documented.map((e) => e.id)));
    expect(documented.map((e) => e.id)).toEqual(expect.arrayContaining(endpoints.filter((e) => e.method === "POST").map((e) => e.id)));
  });

  test.each(cases.map((c) => [`${c.info.id} · ${c.name}`, c] as const))("%s means the same request to the server", (_, { info, value }) => {
    const endpoint = endpoints.find((e) => e.id === info.id)!;
    const { plan } = formFor(info);
    const variant = variantOf(plan, value);
    const { fields, schema } = formFor(info, variant);
    const sent = schema.safeParse(valuesFor(plan, fields, value, variant));
    expect(sent.error?.issues).toBeUndefined();
    // Compared after the endpoint's own parse: the form may spell out a default the example leaves out.
    expect(endpoint.input.parse(sent.data)).toEqual(endpoint.input.parse(value));
  });
});

describe("numeric ranges", () => {
  test("an exclusive lower end stays exclusive: rate > 0, ≤ 1 on the BSC", () => {
    const rate = field(capacity, "bsc", "rate");
    expect(rate.minimum).toEqual({ value: 0, exclusive: true });
    expect(rate.maximum).toEqual({ value: 1, exclusive: false });
    expect(rangeHint(rate)).toBe("above 0, at most 1");
  });

  test("both ends exclusive: BPSK rate in (0, 1)", () => {
    const rate = field(capacity, "bpsk-awgn", "rate");
    expect(rate.minimum).toEqual({ value: 0, exclusive: true });
    expect(rate.maximum).toEqual({ value: 1, exclusive: true });
    expect(rangeHint(rate)).toBe("above 0, below 1");
  });

  test("inclusive ends read as a span: Eb/N0 from −100 to 100 dB", () => {
    expect(rangeHint(field(capacity, "bpsk-awgn", "ebN0Db"))).toBe("-100 to 100");
  });

  test("the form refuses the excluded end and accepts the included one", () => {
    const { plan, fields, schema } = formFor(capacity, "bsc");
    const values = (rate: string) => ({ ...valuesFor(plan, fields, { channel: "bsc", p: 0.11 }, "bsc"), rate });
    const atZero = schema.safeParse(values("0"));
    expect(atZero.success).toBe(false);
    expect(atZero.error!.issues.map((i) => i.path[0])).toContain("rate");
    expect(schema.safeParse(values("1")).success).toBe(true);
    expect(schema.safeParse(values("1.0001")).success).toBe(false);
  });

  test("when a schema gives both keywords for one end, the tighter one binds", () => {
    const plan = planForm(
      z.toJSONSchema(
        z.object({ a: z.number().min(0).gt(0), b: z.number().gt(-1).min(2), c: z.number().max(5).lt(4), d: z.number().lt(9).max(9) }),
      ) as Record<string, unknown>,
    );
    const by = Object.fromEntries(activeFields(plan, undefined).map((f) => [f.name, f]));
    // zod keeps the last check it was given for an end; either way the binding end must survive.
    for (const [name, lo, hi] of [
      ["a", { value: 0, exclusive: true }, undefined],
      ["b", { value: 2, exclusive: false }, undefined],
      ["c", undefined, { value: 4, exclusive: true }],
      ["d", undefined, { value: 9, exclusive: true }],
    ] as const) {
      expect(by[name]!.minimum, name).toEqual(lo);
      expect(by[name]!.maximum, name).toEqual(hi);
    }
  });
});

describe("example names in a select", () => {
  test("short ones stay whole; long ones are cut at a word with an ellipsis, within 40 characters", () => {
    expect(shortLabel("Hamming (7,4): one flipped bit")).toBe("Hamming (7,4): one flipped bit");
    const long = "Reed–Solomon (15,9) over GF(16) with two erasures and one error";
    expect(shortLabel(long)).toBe("Reed–Solomon (15,9) over GF(16) with…");
    expect(shortLabel(long).length).toBeLessThanOrEqual(40);
    // No space late enough to cut at: cut inside the word.
    expect(shortLabel("x".repeat(50))).toBe(`${"x".repeat(39)}…`);
  });
});
