import { beforeAll, describe, expect, it } from "vitest";
import { expectFieldError, expectProblem, postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

const call = (body: unknown) => postJson("/api/v1/decode", body, auth);
const hamming = { family: "hamming", r: 3 };
const rs = { family: "rs", m: 4, k: 9 };
const rsWord = new Array(15).fill(0);

describe("POST /decode: the received words", () => {
  it("a word of the wrong length → /words/1, naming both lengths", async () => {
    expectFieldError(await call({ code: hamming, words: ["1011010", "101"] }), "/words/1", /3 bits.*7/);
  });

  it("a non-binary character → /words/0, naming it", async () => {
    expectFieldError(await call({ code: hamming, words: ["10110z0"] }), "/words/0", /"z"/);
  });

  it("an RS symbol ≥ 2^m → /words/0/3", async () => {
    const word = [...rsWord];
    word[3] = 16;
    expectFieldError(await call({ code: rs, words: [word] }), "/words/0/3", /0 to 15/);
  });

  it("an RS word of the wrong number of symbols → /words/0", async () => {
    expectFieldError(await call({ code: rs, words: [new Array(14).fill(0)] }), "/words/0", /14 symbols.*15/);
  });

  it("a CRC frame shorter than the CRC → /words/0, naming both lengths", async () => {
    expectFieldError(await call({ code: { family: "crc", preset: "CRC-16/KERMIT" }, words: [{ hex: "31" }] }), "/words/0", /8 bits.*16-bit/);
  });

  it("no words → /words; an empty list → /words", async () => {
    expectFieldError(await call({ code: hamming }), "/words");
    expectFieldError(await call({ code: hamming, words: [] }), "/words");
  });

  it("1,025 words (over MAX_BATCH_WORDS = 1,024) → /words", async () => {
    expectFieldError(await call({ code: hamming, words: new Array(1025).fill("0000000") }), "/words", /1024/);
  });

  it("over MAX_BATCH_BITS: 65 repetition (65,535,1) words = 4,259,775 bits > 2^22 → /words", async () => {
    const word = { hex: "0".repeat(16384), length: 65535 };
    expectFieldError(await call({ code: { family: "repetition", n: 65535 }, words: new Array(65).fill(word) }), "/words", /4259775.*4194304/);
  });
});

describe("POST /decode: erasures", () => {
  it("erasures on a family without them (Hamming) → /erasures/0", async () => {
    expectFieldError(await call({ code: hamming, words: ["1011010"], erasures: [[1]] }), "/erasures/0", /erasures/);
  });

  it("erasures on the second word only (Golay) → /erasures/1", async () => {
    const w = "0".repeat(23);
    expectFieldError(await call({ code: { family: "golay" }, words: [w, w], erasures: [[], [4]] }), "/erasures/1");
  });

  it.each([
    ["BCH", { family: "bch", m: 4, t: 2 }, "0".repeat(15)],
    ["CRC", { family: "crc", preset: "CRC-8" }, "0".repeat(16)],
    ["repetition", { family: "repetition", n: 3 }, "000"],
    ["linear", { family: "linear", generator: ["111"] }, "000"],
  ])("erasures on %s → /erasures/0", async (_name, code, word) => {
    expectFieldError(await call({ code, words: [word], erasures: [[0]] }), "/erasures/0");
  });

  it("an erasures list whose length differs from words → /erasures, stating both counts", async () => {
    expectFieldError(await call({ code: rs, words: [rsWord, rsWord], erasures: [[0]] }), "/erasures", /1 entries.*2/);
  });

  it("an RS erasure position ≥ n → /erasures/0/0", async () => {
    expectFieldError(await call({ code: rs, words: [rsWord], erasures: [[15]] }), "/erasures/0/0", /0 to 14/);
  });

  it("an RS position erased twice → /erasures/0/1", async () => {
    expectFieldError(await call({ code: rs, words: [rsWord], erasures: [[2, 2]] }), "/erasures/0/1", /twice/);
  });

  it("a parity erasure position ≥ n → /erasures/1/0", async () => {
    expectFieldError(await call({ code: { family: "parity", n: 4 }, words: ["0000", "0000"], erasures: [[], [4]] }), "/erasures/1/0");
  });

  it("a negative erasure position → /erasures/0/0", async () => {
    expectFieldError(await call({ code: rs, words: [rsWord], erasures: [[-1]] }), "/erasures/0/0");
  });

  it("a non-integer erasure position → /erasures/0/0", async () => {
    expectFieldError(await call({ code: rs, words: [rsWord], erasures: [[1.5]] }), "/erasures/0/0");
  });
});

describe("POST /decode: the code spec (shared with /encode)", () => {
  it.each([
    ["an unknown family", { family: "ldpc-x" }, "/code/family", "0"],
    ["rs without k", { family: "rs", m: 4 }, "/code/k", [0]],
    ["crc without width and poly", { family: "crc" }, "/code/width", "0"],
    ["an unknown preset", { family: "crc", preset: "CRC-17/NONE" }, "/code/preset", "0"],
    ["BCH t too big", { family: "bch", m: 5, t: 16 }, "/code/t", "0"],
    ["RS k = n", { family: "rs", m: 3, k: 7 }, "/code/k", new Array(7).fill(0)],
    ["0x11B for m = 8", { family: "rs", m: 8, k: 200, primitivePoly: "0x11B" }, "/code/primitivePoly", new Array(255).fill(0)],
    ["a dependent generator", { family: "linear", generator: ["101", "101"] }, "/code/generator/1", "000"],
  ])("%s → %s", async (_name, code, pointer, word) => {
    expectFieldError(await call({ code, words: [word] }), pointer);
  });

  it("a linear code too large to decode → 422 at /code/generator, saying why, not a 500", async () => {
    // A [60, 30] code: k = 30 and n − k = 30 are both above the enumeration limit of 24, so its dmin is unknown
    // and bounded-distance decoding has no radius t. (Encoding needs no dmin and works.)
    const k = 30;
    const rows = Array.from({ length: k }, (_, i) => "0".repeat(i) + "1" + "0".repeat(k - 1 - i) + ((i * 2654435761) >>> 0).toString(2).padStart(32, "0").slice(0, 30));
    const res = await call({ code: { family: "linear", generator: rows }, words: ["0".repeat(60)] });
    expectFieldError(res, "/code/generator", /cannot be decoded.*both exceed 24/);
    const enc = await postJson("/api/v1/encode", { code: { family: "linear", generator: rows }, messages: ["1".repeat(30)] }, auth);
    expect(enc.status, enc.text).toBe(200);
  });

  it("several problems are all listed; none is a 500", async () => {
    const p = expectProblem(await call({ code: { family: "golay", extended: "yes" }, words: "x", erasures: 3 }), 422, "validation-failed");
    expect(p.errors!.map((e) => e.pointer)).toEqual(expect.arrayContaining(["/code/extended", "/words", "/erasures"]));
  });
});
