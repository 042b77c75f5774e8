import { beforeAll, describe, expect, it } from "vitest";
import { expectFieldError, expectProblem, postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

const call = (body: unknown) => postJson("/api/v1/encode", body, auth);
const hamming = { family: "hamming", r: 3 };

describe("POST /encode: the code spec", () => {
  it("an unknown family → /code/family, listing the known ones", async () => {
    expectFieldError(await call({ code: { family: "turbo" }, messages: ["1"] }), "/code/family", /hamming.*rs/);
  });

  it("no code at all → /code", async () => {
    expectFieldError(await call({ messages: ["1"] }), "/code");
  });

  it("an unknown field inside a code spec (strict) → that field", async () => {
    expectFieldError(await call({ code: { family: "hamming", r: 3, d: 3 }, messages: ["1011"] }), "/code/d", /Unknown field/);
  });

  it.each([
    ["rs without k", { family: "rs", m: 4 }, "/code/k"],
    ["hamming without r", { family: "hamming" }, "/code/r"],
    ["repetition without n", { family: "repetition" }, "/code/n"],
    ["bch without t", { family: "bch", m: 4 }, "/code/t"],
    ["bch without m", { family: "bch", t: 1 }, "/code/m"],
  ])("missing required field: %s → %s", async (_name, code, pointer) => {
    expectFieldError(await call({ code, messages: ["1"] }), pointer);
  });

  it("crc without preset, width and poly → /code/width and /code/poly, saying they are needed without a preset", async () => {
    const p = expectFieldError(await call({ code: { family: "crc" }, messages: ["1"] }), "/code/width", /required without a `preset`/);
    expect(p.errors!.map((e) => e.pointer)).toContain("/code/poly");
  });

  it("an unknown CRC preset → /code/preset, naming it", async () => {
    expectFieldError(await call({ code: { family: "crc", preset: "CRC-99/NOPE" }, messages: ["1"] }), "/code/preset", /CRC-99\/NOPE/);
  });

  it("an unknown CRC preset with a {text} message is still reported at /code/preset", async () => {
    expectFieldError(await call({ code: { family: "crc", preset: "CRC-99/NOPE" }, messages: [{ text: "abc" }] }), "/code/preset", /CRC-99\/NOPE/);
  });

  it.each([
    ["width 0", { family: "crc", width: 0, poly: 1 }, "/code/width"],
    ["width 65", { family: "crc", width: 65, poly: 1 }, "/code/width"],
    ["poly wider than width", { family: "crc", width: 8, poly: "0x1FF" }, "/code/poly"],
    ["poly zero", { family: "crc", width: 8, poly: 0 }, "/code/poly"],
    ["poly not hex", { family: "crc", width: 8, poly: "0xZZ" }, "/code/poly"],
    ["init wider than width", { family: "crc", width: 8, poly: 7, init: "0x100" }, "/code/init"],
  ])("bad CRC parameter: %s → %s", async (_name, code, pointer) => {
    expectFieldError(await call({ code, messages: ["1010"] }), pointer);
  });

  it.each([
    ["bch m 2 (below 3)", { family: "bch", m: 2, t: 1 }],
    ["bch m 17 (above 16)", { family: "bch", m: 17, t: 1 }],
    ["rs m 1 (below 2)", { family: "rs", m: 1, k: 1 }],
    ["rs m 17 (above 16)", { family: "rs", m: 17, k: 1 }],
  ])("m out of range: %s → /code/m", async (_name, code) => {
    expectFieldError(await call({ code, messages: [[1]] }), "/code/m");
  });

  it.each([
    ["hamming r 1", { family: "hamming", r: 1 }, "/code/r"],
    ["hamming r 17", { family: "hamming", r: 17 }, "/code/r"],
    ["repetition n 0", { family: "repetition", n: 0 }, "/code/n"],
    ["parity n 1", { family: "parity", n: 1 }, "/code/n"],
    ["parity kind 'none'", { family: "parity", n: 4, parity: "none" }, "/code/parity"],
  ])("other parameters out of range: %s → %s", async (_name, code, pointer) => {
    expectFieldError(await call({ code, messages: ["1"] }), pointer);
  });

  it("t too big for BCH: m 4 allows t ≤ 7 (2t < 15), t = 8 → /code/t, stating the largest t", async () => {
    expectFieldError(await call({ code: { family: "bch", m: 4, t: 8 }, messages: ["1"] }), "/code/t", /at most 7/);
  });

  it("BCH shortened so far no message bits remain → /code/shorten", async () => {
    // BCH (15,7): shortening by 7 or more leaves k ≤ 0.
    expectFieldError(await call({ code: { family: "bch", m: 4, t: 2, shorten: 7 }, messages: ["1"] }), "/code/shorten");
  });

  it.each([
    ["k = n = 15 (default n)", { family: "rs", m: 4, k: 15 }],
    ["k = n = 10 (shortened)", { family: "rs", m: 4, n: 10, k: 10 }],
    ["k > n", { family: "rs", m: 4, n: 10, k: 12 }],
  ])("RS with k ≥ n: %s → /code/k", async (_name, code) => {
    expectFieldError(await call({ code, messages: [[1]] }), "/code/k", /n − 1/);
  });

  it("RS with n above 2^m − 1 → /code/n", async () => {
    expectFieldError(await call({ code: { family: "rs", m: 4, n: 16, k: 4 }, messages: [[1, 2, 3, 4]] }), "/code/n", /15/);
  });

  it("RS firstRoot of 2^m − 1 or more → /code/firstRoot", async () => {
    expectFieldError(await call({ code: { family: "rs", m: 4, k: 11, firstRoot: 15 }, messages: [new Array(11).fill(0)] }), "/code/firstRoot");
  });

  it.each([
    ["RS", { family: "rs", m: 8, k: 223, primitivePoly: "0x11B" }],
    ["RS (as an integer)", { family: "rs", m: 8, k: 223, primitivePoly: 0x11b }],
    ["BCH", { family: "bch", m: 8, t: 2, primitivePoly: "0x11B" }],
  ])("%s over GF(2^8) with 0x11B (irreducible, not primitive: x has order 51) → /code/primitivePoly with a message", async (_name, code) => {
    // 0x11B = x^8+x^4+x^3+x+1 is irreducible but x has order 51 modulo it, so it does not generate GF(256)*.
    const message = code.family === "rs" ? new Array(223).fill(0) : "1".repeat(239);
    expectFieldError(await call({ code, messages: [message] }), "/code/primitivePoly", /not primitive/);
  });

  it("a reducible field polynomial is named as reducible → /code/primitivePoly", async () => {
    // x^4 + 1 = (x + 1)^4 over GF(2).
    expectFieldError(await call({ code: { family: "rs", m: 4, k: 11, primitivePoly: "0x11" }, messages: [new Array(11).fill(0)] }), "/code/primitivePoly", /reducible/);
  });

  it("a field polynomial of the wrong degree → /code/primitivePoly", async () => {
    expectFieldError(await call({ code: { family: "rs", m: 4, k: 11, primitivePoly: "0x25" }, messages: [new Array(11).fill(0)] }), "/code/primitivePoly", /degree/);
  });

  it("a primitive element that is not primitive → /code/primitiveElement", async () => {
    // In GF(16)* of order 15, x^3 (= 8) has order 5.
    expectFieldError(await call({ code: { family: "rs", m: 4, k: 11, primitiveElement: 8 }, messages: [new Array(11).fill(0)] }), "/code/primitiveElement", /order 5/);
  });

  it("a linear code with a dependent generator row → /code/generator/2, naming the sum", async () => {
    expectFieldError(await call({ code: { family: "linear", generator: ["1100", "0110", "1010"] }, messages: ["101"] }), "/code/generator/2", /dependent/);
  });

  it("a linear code whose parity-check rows are dependent → /code/parityCheck/2", async () => {
    expectFieldError(await call({ code: { family: "linear", parityCheck: ["1110", "0111", "1001"] }, messages: ["1"] }), "/code/parityCheck/2", /dependent/);
  });

  it("a linear code with both a generator and a parity-check matrix → /code/generator", async () => {
    expectFieldError(await call({ code: { family: "linear", generator: ["11"], parityCheck: ["11"] }, messages: ["1"] }), "/code/generator", /exactly one/);
  });

  it("a linear code with rows of different lengths → /code/generator/1", async () => {
    expectFieldError(await call({ code: { family: "linear", generator: ["1100", "011"] }, messages: ["10"] }), "/code/generator/1", /same length/);
  });

  it("a generator row with a bad character → /code/generator/0, naming the character", async () => {
    expectFieldError(await call({ code: { family: "linear", generator: ["1x00"] }, messages: ["1"] }), "/code/generator/0", /"x"/);
  });
});

describe("POST /encode: the messages", () => {
  it("a message of the wrong length → /messages/1, naming both lengths", async () => {
    expectFieldError(await call({ code: hamming, messages: ["1011", "101"] }), "/messages/1", /3 bits.*4/);
  });

  it("a non-binary character → /messages/0, naming the character and its position", async () => {
    expectFieldError(await call({ code: hamming, messages: ["10a1"] }), "/messages/0", /character 2 \(counting from 0\).*"a"/);
  });

  it("an array entry of 2 → /messages/0/1", async () => {
    expectFieldError(await call({ code: hamming, messages: [[1, 2, 0, 1]] }), "/messages/0/1");
  });

  it("an RS symbol ≥ 2^m → /messages/0/2, naming the range", async () => {
    expectFieldError(await call({ code: { family: "rs", m: 4, k: 3 }, messages: [[1, 2, 16]] }), "/messages/0/2", /0 to 15/);
  });

  it("an RS message of the wrong number of symbols → /messages/0", async () => {
    expectFieldError(await call({ code: { family: "rs", m: 4, k: 3 }, messages: [[1, 2]] }), "/messages/0", /2 symbols.*3/);
  });

  it("an RS message as bits that are not whole symbols → /messages/0", async () => {
    expectFieldError(await call({ code: { family: "rs", m: 4, k: 3 }, messages: ["10101"] }), "/messages/0", /4-bit symbols/);
  });

  it("a {text} message for a code that is not a CRC → /messages/0", async () => {
    expectFieldError(await call({ code: hamming, messages: [{ text: "abc" }] }), "/messages/0", /CRC/);
  });

  it("CRC bytes in hex with an odd number of digits → /messages/0/hex", async () => {
    expectFieldError(await call({ code: { family: "crc", preset: "CRC-8" }, messages: [{ hex: "abc" }] }), "/messages/0/hex", /even number/);
  });

  it("CRC bytes in hex with a bad digit → /messages/0/hex", async () => {
    expectFieldError(await call({ code: { family: "crc", preset: "CRC-8" }, messages: [{ hex: "zz" }] }), "/messages/0/hex");
  });

  it("no messages field → /messages", async () => {
    expectFieldError(await call({ code: hamming }), "/messages");
  });

  it("an empty list → /messages", async () => {
    expectFieldError(await call({ code: hamming, messages: [] }), "/messages");
  });

  it("1,025 messages (over MAX_BATCH_WORDS = 1,024) → /messages", async () => {
    expectFieldError(await call({ code: hamming, messages: new Array(1025).fill("1011") }), "/messages", /1024/);
  });

  it("1,024 messages is the largest batch accepted", async () => {
    expect((await call({ code: hamming, messages: new Array(1024).fill("1011") })).status).toBe(200);
  });

  it("over MAX_BATCH_BITS: 65 repetition (65,535,1) codewords = 4,259,775 bits > 2^22 → /messages, stating both numbers", async () => {
    // 64 such codewords are 4,194,240 bits ≤ 4,194,304 = 2^22 and pass.
    expect((await call({ code: { family: "repetition", n: 65535 }, messages: new Array(64).fill("1") })).status).toBe(200);
    expectFieldError(await call({ code: { family: "repetition", n: 65535 }, messages: new Array(65).fill("1") }), "/messages", /4259775.*4194304/);
  });

  it("several problems are all reported, and none is a 500", async () => {
    const res = await call({ code: { family: "hamming", r: 0 }, messages: "1011", extra: true });
    const p = expectProblem(res, 422, "validation-failed");
    expect(p.errors!.map((e) => e.pointer)).toEqual(expect.arrayContaining(["/code/r", "/messages", "/extra"]));
  });
});
