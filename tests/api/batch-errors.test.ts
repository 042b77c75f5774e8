import { beforeAll, describe, expect, it } from "vitest";
import { ApiError, MAX_FIELD_ERRORS, validationProblem } from "@/lib/api/errors";
import { WordErrors } from "@/lib/api/word-errors";
import { InputError } from "@/lib/core/errors";
import { expectProblem, postJson, type ProblemBody } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

type BatchProblem = ProblemBody & { omittedErrors?: number };

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

const encode = (body: unknown) => postJson("/api/v1/encode", body, auth);
const decode = (body: unknown) => postJson("/api/v1/decode", body, auth);
const hamming = { family: "hamming", r: 3 };

/** A 422 validation problem; its pointers, in the order listed. */
function invalid(res: Awaited<ReturnType<typeof encode>>): BatchProblem & { pointers: string[] } {
  const p = expectProblem(res, 422, "validation-failed") as BatchProblem;
  return { ...p, pointers: p.errors!.map((e) => e.pointer) };
}

const messageAt = (p: BatchProblem, pointer: string) => p.errors!.find((e) => e.pointer === pointer)?.message ?? "";

// ---- Plain helpers written here, independent of lib/core ----
const weight = (s: string) => [...s].filter((c) => c === "1").length;
const flip = (s: string, i: number) => s.slice(0, i) + (s[i] === "1" ? "0" : "1") + s.slice(i + 1);
const all4 = Array.from({ length: 16 }, (_, v) => v.toString(2).padStart(4, "0"));

describe("WordErrors: one error per bad word, in word order, the rest counted", () => {
  it("records an error pointing into the batch, skips that word afterwards, and lets the code's own error through", () => {
    const errors = new WordErrors("words", 4, ["erasures"]);
    const read = errors.each(["a", "b", "c", "d"], (w, i) => {
      if (w === "b") throw new InputError("bad b", ["words", i, 3]);
      return w.toUpperCase();
    });
    expect(read).toEqual(["A", undefined, "C", "D"]);
    expect(errors.any).toBe(true);
    let ran = false;
    expect(errors.check(1, () => (ran = true))).toBeUndefined();
    expect(ran).toBe(false);
    // A companion list counts as the word's; an error about the code or about another word does not.
    expect(errors.check(3, () => { throw new InputError("bad erasure", ["erasures", 3, 0]); })).toBeUndefined();
    expect(() => errors.check(2, () => { throw new InputError("the code's", ["code", "r"]); })).toThrow("the code's");
    expect(() => errors.check(2, () => { throw new InputError("word 0's", ["words", 0]); })).toThrow("word 0's");
    expect(() => errors.check(2, () => { throw new TypeError("a bug"); })).toThrow(TypeError);
    try {
      errors.settle(read);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(ApiError);
      const p = e as ApiError;
      expect(p.code).toBe("validation-failed");
      expect(p.extra.errors).toEqual([
        { pointer: "/words/1/3", message: "bad b" },
        { pointer: "/erasures/3/0", message: "bad erasure" },
      ]);
      expect(p.extra.omittedErrors).toBeUndefined();
      expect(p.detail).toMatch(/^2 of the 4 words are invalid/);
    }
  });

  it("settle returns the items when no word failed", () => {
    const errors = new WordErrors("messages", 2);
    expect(errors.settle(errors.each([1, 2], (x) => x * 10))).toEqual([10, 20]);
    expect(errors.any).toBe(false);
  });

  it(`validationProblem lists at most ${MAX_FIELD_ERRORS} and counts the rest; one error keeps the pointer: message detail`, () => {
    const many = Array.from({ length: 23 }, (_, i) => ({ pointer: `/x/${i}`, message: "m" }));
    const p = validationProblem(many);
    expect(p.extra.errors).toEqual(many.slice(0, 20));
    expect(p.extra.omittedErrors).toBe(3);
    expect(p.detail).toBe("23 fields are invalid; errors lists the first 20 and omittedErrors counts the other 3.");
    expect(validationProblem(many.slice(0, 20)).extra.omittedErrors).toBeUndefined();
    expect(validationProblem([{ pointer: "/p", message: "too big" }]).detail).toBe("/p: too big");
  });
});

describe("POST /encode: every bad message of a batch", () => {
  it("3 bad messages of 10 (wrong length, a bad character, an array entry of 2) → exactly their 3 pointers, in order", async () => {
    const messages = [...all4.slice(0, 10)] as unknown[];
    messages[2] = "101"; // found when encoding
    messages[5] = "10x1"; // found when reading
    messages[9] = [1, 0, 2, 1];
    const p = invalid(await encode({ code: hamming, messages }));
    expect(p.pointers).toEqual(["/messages/2", "/messages/5", "/messages/9/2"]);
    expect(messageAt(p, "/messages/2")).toMatch(/3 bits.*4/);
    expect(messageAt(p, "/messages/5")).toMatch(/character 2 \(counting from 0\).*"x"/);
    expect(messageAt(p, "/messages/9/2")).toMatch(/entry 2 \(counting from 0\) is 2; only the numbers 0 and 1/);
    expect(p.omittedErrors).toBeUndefined();
    expect(p.detail).toMatch(/^3 of the 10 messages are invalid/);
  });

  it("50 bad messages of 60 → the first 20 listed, omittedErrors 30, and the detail says so", async () => {
    // Every sixth message is good; the others alternate between a wrong length and a bad character.
    const messages = Array.from({ length: 60 }, (_, i) => (i % 6 === 0 ? "1011" : i % 2 ? "10" : "1z11"));
    const bad = messages.flatMap((m, i) => (m === "1011" ? [] : [i]));
    expect(bad).toHaveLength(50);
    const p = invalid(await encode({ code: hamming, messages }));
    expect(p.pointers).toEqual(bad.slice(0, 20).map((i) => `/messages/${i}`));
    expect(p.omittedErrors).toBe(30);
    expect(p.detail).toMatch(/50 of the 60 messages are invalid.*first 20.*other 30/);
  });

  it("CRC: an odd hex digit count, a bad hex digit and a partial byte under refin → their 3 pointers", async () => {
    const messages = [{ text: "ok" }, { hex: "abc" }, { text: "fine" }, { hex: "zz" }, "1011"];
    const p = invalid(await encode({ code: { family: "crc", preset: "CRC-32/ISO-HDLC" }, messages }));
    expect(p.pointers).toEqual(["/messages/1/hex", "/messages/3/hex", "/messages/4"]);
    expect(messageAt(p, "/messages/4")).toMatch(/4 bits, not a whole number of bytes/);
  });

  it("Reed–Solomon: a symbol outside GF(16) and a wrong symbol count → /messages/1/2 and /messages/3", async () => {
    const p = invalid(await encode({ code: { family: "rs", m: 4, k: 3 }, messages: [[1, 2, 3], [1, 2, 16], [0, 0, 0], [1, 2]] }));
    expect(p.pointers).toEqual(["/messages/1/2", "/messages/3"]);
    expect(messageAt(p, "/messages/1/2")).toMatch(/0 to 15/);
    expect(messageAt(p, "/messages/3")).toMatch(/2 symbols.*3/);
  });

  it("on the worker pool too: 25 bad of 30 repetition (65,535,1) messages (about 1.6e7 work, above the 2^20 run in the request) → 20 listed, 5 more", async () => {
    const messages = Array.from({ length: 30 }, (_, i) => (i < 5 ? "1" : "11"));
    const p = invalid(await encode({ code: { family: "repetition", n: 65535 }, messages }));
    expect(p.pointers).toEqual(Array.from({ length: 20 }, (_, j) => `/messages/${j + 5}`));
    expect(p.omittedErrors).toBe(5);
  });

  it("a good batch still encodes: all 16 Hamming (7,4) messages, message first, weights A0=1, A3=7, A4=7, A7=1 (MacWilliams & Sloane)", async () => {
    const res = await encode({ code: hamming, messages: all4 });
    expect(res.status, res.text).toBe(200);
    const codewords = (res.body as { codewords: { codeword: string }[] }).codewords.map((c) => c.codeword);
    codewords.forEach((c, i) => expect(c.slice(0, 4)).toBe(all4[i]));
    const counts: Record<number, number> = {};
    for (const c of codewords) counts[weight(c)] = (counts[weight(c)] ?? 0) + 1;
    expect(counts).toEqual({ 0: 1, 3: 7, 4: 7, 7: 1 });
  });
});

describe("POST /decode: every bad word of a batch", () => {
  it("3 bad words of 8 (a bad character, erasures on Hamming, a wrong length) → exactly their 3 pointers", async () => {
    const words = Array.from({ length: 8 }, () => "0000000");
    words[1] = "00q0000";
    words[6] = "000000";
    const erasures = words.map((_, i) => (i === 4 ? [2] : []));
    const p = invalid(await decode({ code: hamming, words, erasures }));
    expect(p.pointers).toEqual(["/words/1", "/erasures/4", "/words/6"]);
    expect(messageAt(p, "/words/1")).toMatch(/"q"/);
    expect(messageAt(p, "/erasures/4")).toMatch(/does not take erasures/);
    expect(messageAt(p, "/words/6")).toMatch(/6 bits.*7/);
  });

  it("Reed–Solomon (15,9): a symbol outside GF(16), a short word and an erasure at n → /words/2/3, /words/4, /erasures/6/0", async () => {
    const zero = new Array(15).fill(0);
    const words = Array.from({ length: 8 }, () => [...zero]);
    words[2]![3] = 16;
    words[4] = zero.slice(1);
    const erasures = words.map((_, i) => (i === 6 ? [15] : []));
    const p = invalid(await decode({ code: { family: "rs", m: 4, k: 9 }, words, erasures }));
    expect(p.pointers).toEqual(["/words/2/3", "/words/4", "/erasures/6/0"]);
    expect(messageAt(p, "/words/4")).toMatch(/14 symbols.*15/);
    expect(messageAt(p, "/erasures/6/0")).toMatch(/0 to 14/);
  });

  it("CRC-16/KERMIT: a frame shorter than the CRC and an odd hex count → /words/0/hex and /words/2", async () => {
    const frame = { hex: "313233343536373839 8921" };
    const p = invalid(await decode({ code: { family: "crc", preset: "CRC-16/KERMIT" }, words: [{ hex: "123" }, frame, { hex: "31" }, frame] }));
    expect(p.pointers).toEqual(["/words/0/hex", "/words/2"]);
    expect(messageAt(p, "/words/2")).toMatch(/8 bits.*16-bit CRC/);
  });

  it("50 bad words of 50 → 20 listed, omittedErrors 30", async () => {
    const words = Array.from({ length: 50 }, (_, i) => (i % 2 ? "0101" : "01x1010"));
    const p = invalid(await decode({ code: hamming, words }));
    expect(p.pointers).toEqual(Array.from({ length: 20 }, (_, i) => `/words/${i}`));
    expect(p.omittedErrors).toBe(30);
  });

  it("words that fail the schema itself (numbers, not words) are bounded the same way: 50 → 20 listed, 30 more", async () => {
    const p = invalid(await decode({ code: hamming, words: new Array(50).fill(7) }));
    expect(p.pointers).toEqual(Array.from({ length: 20 }, (_, i) => `/words/${i}`));
    expect(p.omittedErrors).toBe(30);
  });

  it("a good batch still decodes: every Hamming (7,4) codeword with bit i mod 7 flipped is corrected at that position", async () => {
    const enc = await encode({ code: hamming, messages: all4 });
    expect(enc.status, enc.text).toBe(200);
    const codewords = (enc.body as { codewords: { codeword: string }[] }).codewords.map((c) => c.codeword);
    const res = await decode({ code: hamming, words: codewords.map((c, i) => flip(c, i % 7)) });
    expect(res.status, res.text).toBe(200);
    const results = (res.body as { results: { message: string; correctedPositions: number[]; failure: boolean }[] }).results;
    // A Hamming code corrects any single error (Hamming 1950).
    results.forEach((r, i) => expect(r).toMatchObject({ message: all4[i], correctedPositions: [i % 7], failure: false }));
  });
});
