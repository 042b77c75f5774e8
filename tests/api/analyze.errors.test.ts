import { beforeAll, describe, expect, it } from "vitest";
import { expectFieldError, expectProblem, expectWorkLimit, postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

const call = (body: unknown) => postJson("/api/v1/codes/analyze", body, auth);

describe("POST /codes/analyze: codes too large to analyse", () => {

  it("BCH m = 7, t = 9 → (127,71): k = 71 and n − k = 56 both above 24 → 422 work-limit at /code, saying why, before any enumeration", async () => {
    const body = expectWorkLimit(await call({ code: { family: "bch", m: 7, t: 9 } }), "/code", /\(127,71\).*k = 71 and n − k = 56 both exceed 24/);
    // Both dimensions are above 24: the limit named is the dimension enumerated, min(k, n − k) = 56 against 24.
    expect(body.limit).toEqual({ quantity: expect.stringMatching(/weight distribution/), requested: 56, allowed: 24, unit: "dimensions" });
  });

  it("Hamming r = 11 (n = 2047): its generator matrix is not offered → 422 at /code, not a 500", async () => {
    expectFieldError(await call({ code: { family: "hamming", r: 11 } }), "/code", /too large/);
  });

  it("odd parity is not linear (a coset): → 422 at /code/parity, saying so", async () => {
    expectFieldError(await call({ code: { family: "parity", n: 5, parity: "odd" } }), "/code/parity", /not linear/);
  });
});

describe("POST /codes/analyze: fields", () => {
  it("p on a Reed–Solomon analysis → /p, saying it is for binary codes", async () => {
    expectFieldError(await call({ code: { family: "rs", m: 4, k: 11 }, p: 0.01 }), "/p", /binary/);
  });

  it("CRC without crcMessageBits → /crcMessageBits", async () => {
    expectFieldError(await call({ code: { family: "crc", preset: "CRC-8/SMBUS" } }), "/crcMessageBits", /crcMessageBits/);
  });

  it.each([
    ["0", 0],
    ["4,097 (over 4,096)", 4097],
    ["a fraction", 1.5],
    ["a string", "16"],
  ])("crcMessageBits %s → /crcMessageBits", async (_name, bits) => {
    expectFieldError(await call({ code: { family: "crc", preset: "CRC-8/SMBUS" }, crcMessageBits: bits }), "/crcMessageBits");
  });

  it.each([
    ["negative", -0.1],
    ["above 1", 1.5],
    ["a string", "0.1"],
  ])("p %s → /p", async (_name, p) => {
    expectFieldError(await call({ code: { family: "hamming", r: 3 }, p }), "/p");
  });

  it("matrices that is not a boolean → /matrices", async () => {
    expectFieldError(await call({ code: { family: "hamming", r: 3 }, matrices: "yes" }), "/matrices");
  });

  it("no code → /code; an unknown top-level field → that field", async () => {
    expectFieldError(await call({}), "/code");
    expectFieldError(await call({ code: { family: "golay" }, words: ["1"] }), "/words", /Unknown field/);
  });

  it.each([
    ["an unknown family", { family: "fountain" }, "/code/family"],
    ["rs without k", { family: "rs", m: 4 }, "/code/k"],
    ["crc without width and poly", { family: "crc" }, "/code/width"],
    ["an unknown preset", { family: "crc", preset: "CRC-5/NOWHERE" }, "/code/preset"],
    ["m out of range", { family: "bch", m: 20, t: 1 }, "/code/m"],
    ["BCH t too big", { family: "bch", m: 3, t: 4 }, "/code/t"],
    ["RS k ≥ n", { family: "rs", m: 4, k: 15 }, "/code/k"],
    ["0x11B for m = 8 (RS)", { family: "rs", m: 8, k: 239, primitivePoly: "0x11B" }, "/code/primitivePoly"],
    ["0x11B for m = 8 (BCH)", { family: "bch", m: 8, t: 2, primitivePoly: "0x11B" }, "/code/primitivePoly"],
    ["a dependent generator row", { family: "linear", generator: ["1010", "0101", "1111"] }, "/code/generator/2"],
    ["a dependent parity-check row", { family: "linear", parityCheck: ["1100", "1100"] }, "/code/parityCheck/1"],
    ["hamming r 1", { family: "hamming", r: 1 }, "/code/r"],
  ])("%s → %s", async (_name, code, pointer) => {
    const body: Record<string, unknown> = { code };
    if ((code as { family: string }).family === "crc") body.crcMessageBits = 8;
    expectFieldError(await call(body), pointer);
  });

  it("the non-primitive polynomial message says why (x has order 51, not 255)", async () => {
    expectFieldError(await call({ code: { family: "rs", m: 8, k: 239, primitivePoly: 0x11b } }), "/code/primitivePoly", /not primitive.*51/);
  });

  it("several problems are all listed; none is a 500", async () => {
    const p = expectProblem(await call({ code: { family: "hamming", r: "3" }, p: 2, matrices: 1 }), 422, "validation-failed");
    expect(p.errors!.map((e) => e.pointer)).toEqual(expect.arrayContaining(["/code/r", "/p", "/matrices"]));
  });
});
