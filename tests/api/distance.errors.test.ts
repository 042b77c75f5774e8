import { beforeAll, describe, expect, it } from "vitest";
import { expectFieldError, expectProblem, postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

const call = (body: unknown) => postJson("/api/v1/distance", body, auth);

describe("POST /distance: wrong types", () => {
  it.each([
    ["a number for a word", { a: 5, b: "1" }, "/a"],
    ["a boolean for a word", { a: "1", b: true }, "/b"],
    ["null for a word", { a: null, b: "1" }, "/a"],
    ["hex that is not a string", { a: { hex: 5 }, b: "1" }, "/a"],
    ["a codebook that is a string", { codebook: "0101" }, "/codebook"],
    ["a codebook word that is a number", { codebook: ["1", 7] }, "/codebook/1"],
  ])("%s → 422 at the field", async (_name, body, pointer) => {
    expectFieldError(await call(body), pointer);
  });

  it("an array entry other than 0 or 1 points at the entry", async () => {
    expectFieldError(await call({ a: "10", b: [0, 2] }), "/b/1");
  });

  it.each([
    ["null", null],
    ["an array", [1, 0]],
    ["a string", "1011"],
    ["a number", 42],
  ])("a body that is %s and not an object → 422 at the root pointer", async (_name, body) => {
    expectFieldError(await call(body), "");
  });
});

describe("POST /distance: unknown fields (strict objects)", () => {
  it("an unknown top-level field is refused, pointing at it", async () => {
    expectFieldError(await call({ a: "1", b: "0", c: "1" }), "/c");
  });

  it("an unknown field inside a hex word is refused, pointing at it", async () => {
    expectFieldError(await call({ a: "1111", b: { hex: "f", len: 4 } }), "/b/len");
  });
});

describe("POST /distance: bad characters in a word", () => {
  it("a non-binary character is refused at /a with the message naming its position, counting from 0", async () => {
    const p = expectFieldError(await call({ a: "10x1", b: "1001" }), "/a", /character 2 \(counting from 0\).*"x"/);
    expect(p.detail).toMatch(/^\/a: /);
  });

  it("a digit 2 in b is refused at /b with its position", async () => {
    expectFieldError(await call({ a: "1001", b: "1012" }), "/b", /character 3 \(counting from 0\).*"2"/);
  });

  it("a non-ASCII character is named as that character", async () => {
    expectFieldError(await call({ a: "1é01", b: "1001" }), "/a", /character 1 \(counting from 0\).*"é"/);
  });

  it("a bad hex digit points into the hex field, naming its position", async () => {
    expectFieldError(await call({ a: { hex: "fg" }, b: "1" }), "/a/hex", /character 1 \(counting from 0\).*"g"/);
  });

  it.each([
    ["too short: drops a whole digit", 3],
    ["too long: more bits than the digits hold", 9],
    ["negative", -1],
  ])("a hex length that is %s → /a/length", async (_name, length) => {
    expectFieldError(await call({ a: { hex: "ff", length }, b: "11111111" }), "/a/length");
  });

  it("a bad word inside a codebook points at that word, naming the position", async () => {
    expectFieldError(await call({ codebook: ["000", "0a0", "111"] }), "/codebook/1", /character 1 \(counting from 0\)/);
  });
});

describe("POST /distance: lengths", () => {
  it("words of different length are refused, naming both lengths", async () => {
    expectFieldError(await call({ a: "101", b: "10" }), "/b", /3.*2/);
  });

  it("a codebook word of another length points at that word", async () => {
    expectFieldError(await call({ codebook: ["000", "111", "00", "101"] }), "/codebook/2", /word 2 has 2 bits/);
  });
});

describe("POST /distance: sizes over the limits", () => {
  it("a codebook of 4,097 words (over 4,096) → /codebook", async () => {
    const words = Array.from({ length: 4097 }, (_, i) => (i % 2 ? "1" : "0"));
    expectFieldError(await call({ codebook: words }), "/codebook");
  });

  it("a word of 1,048,577 bits as a 0/1 string (over 1,048,576) → /a, stating the limit", async () => {
    expectFieldError(await call({ a: "1".repeat(1_048_577), b: "1" }), "/a", /1048576/);
  });

  it("a word of 1,048,577 bits as an array → /b", async () => {
    expectFieldError(await call({ a: "1", b: new Array(1_048_577).fill(0) }), "/b");
  });

  it("a word of 1,048,580 bits as hex (262,145 digits) → /a", async () => {
    expectFieldError(await call({ a: { hex: "f".repeat(262_145) }, b: "1" }), "/a", /1048576/);
  });

  it("a codebook word of 4,097 bits (over 4,096 per word) → /codebook/0, the first bad word", async () => {
    expectFieldError(await call({ codebook: ["0".repeat(4097), "1".repeat(4097)] }), "/codebook/0", /4096/);
  });

  it("a codebook of 257 words × 4,096 bits = 1,052,672 bits (over 1,048,576 in all) → /codebook", async () => {
    const words = Array.from({ length: 257 }, (_, i) => (i % 2 ? "1" : "0").repeat(4096));
    expectFieldError(await call({ codebook: words }), "/codebook", /1048576/);
  });
});

describe("POST /distance: missing or conflicting fields", () => {
  it("an empty object names both ways of calling", async () => {
    const p = expectFieldError(await call({}), "");
    expect(p.errors![0]!.message).toMatch(/`a` and `b`.*`codebook`/);
  });

  it("a without b → /b", async () => {
    expectFieldError(await call({ a: "1" }), "/b", /required/);
  });

  it("b without a → /a", async () => {
    expectFieldError(await call({ b: "1" }), "/a", /required/);
  });

  it("a pair and a codebook together → /codebook", async () => {
    expectFieldError(await call({ a: "1", b: "0", codebook: ["0", "1"] }), "/codebook", /one of/);
  });

  it.each([
    ["one word", ["0101"]],
    ["no words", []],
  ])("a codebook of %s (fewer than 2) → /codebook", async (_name, codebook) => {
    expectFieldError(await call({ codebook }), "/codebook");
  });

  it("several bad fields are all listed, and the detail says how many", async () => {
    const res = await call({ a: 5, b: true, extra: 1 });
    const p = expectProblem(res, 422, "validation-failed");
    const pointers = p.errors!.map((e) => e.pointer);
    expect(pointers).toEqual(expect.arrayContaining(["/a", "/b", "/extra"]));
    expect(p.detail).toMatch(new RegExp(`^${p.errors!.length} fields are invalid`));
  });
});
