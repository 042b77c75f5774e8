import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { bitsToHex, formatBits, packBits, parseBits, popcount32, popcountPacked } from "@/lib/core/bits";
import { InputError } from "@/lib/core/errors";

const MAX = 1_048_576;

function caught(fn: () => unknown): InputError {
  try {
    fn();
  } catch (e) {
    if (e instanceof InputError) return e;
    throw e;
  }
  throw new Error("expected an InputError");
}

// Independent reference: count ones through the binary string JavaScript itself prints.
const naivePopcount = (x: number) => (x >>> 0).toString(2).split("").filter((c) => c === "1").length;

describe("parseBits", () => {
  it("reads 0/1 strings with space and _ as separators", () => {
    // Expected bit lists are the literal digits of the input, read by eye.
    expect(Array.from(parseBits("1011 0010", MAX))).toEqual([1, 0, 1, 1, 0, 0, 1, 0]);
    expect(Array.from(parseBits("1011_0010", MAX))).toEqual([1, 0, 1, 1, 0, 0, 1, 0]);
    expect(Array.from(parseBits(" 1 _ 0 ", MAX))).toEqual([1, 0]);
  });

  it("accepts empty words", () => {
    expect(parseBits("", MAX).length).toBe(0);
    expect(parseBits("  __ ", MAX).length).toBe(0);
    expect(parseBits([], MAX).length).toBe(0);
    expect(parseBits({ hex: "" }, MAX).length).toBe(0);
    expect(parseBits({ hex: "0x", length: 0 }, MAX).length).toBe(0);
  });

  it("names the position of a bad character, counting from 0 like bit positions", () => {
    const e = caught(() => parseBits("1011x", MAX));
    expect(e.message).toContain("character 4 (counting from 0)");
    expect(e.message).toContain('"x"');
    expect(e.path).toEqual([]);
    expect(caught(() => parseBits("10\t1", MAX)).message).toContain("character 2 (counting from 0)");
    expect(caught(() => parseBits("102", MAX)).message).toContain("only 0, 1, space and _");
  });

  it("reads arrays of 0/1 and points at a bad entry", () => {
    expect(Array.from(parseBits([1, 0, 1], MAX))).toEqual([1, 0, 1]);
    const e = caught(() => parseBits([1, 0, 2, 1], MAX));
    expect(e.path).toEqual([2]);
    expect(e.message).toContain("entry 2 (counting from 0)");
    expect(caught(() => parseBits([0, "1"] as unknown as number[], MAX)).path).toEqual([1]);
    expect(caught(() => parseBits([0, true] as unknown as number[], MAX)).path).toEqual([1]);
    expect(caught(() => parseBits([0.5] as unknown as number[], MAX)).path).toEqual([0]);
  });

  it("reads hex MSB first, case-insensitive, with optional 0x", () => {
    // 0xA5 = 1010 0101 by the definition of hex digits.
    expect(formatBits(parseBits({ hex: "a5" }, MAX))).toBe("10100101");
    expect(formatBits(parseBits({ hex: "0XA5" }, MAX))).toBe("10100101");
    expect(formatBits(parseBits({ hex: "0x8_1" }, MAX))).toBe("10000001");
  });

  it("hex length keeps the first bits and must fall within the last digit", () => {
    // 0xF8 = 1111 1000; the first 5 bits are 11111.
    expect(formatBits(parseBits({ hex: "f8", length: 5 }, MAX))).toBe("11111");
    expect(formatBits(parseBits({ hex: "f8", length: 8 }, MAX))).toBe("11111000");
    expect(caught(() => parseBits({ hex: "f8", length: 4 }, MAX)).path).toEqual(["length"]);
    expect(caught(() => parseBits({ hex: "f8", length: 9 }, MAX)).path).toEqual(["length"]);
    expect(caught(() => parseBits({ hex: "f8", length: 5.5 }, MAX)).path).toEqual(["length"]);
    expect(caught(() => parseBits({ hex: "f8", length: 4 }, MAX)).message).toContain("from 5 to 8");
  });

  it("rejects bad hex digits with their position", () => {
    const e = caught(() => parseBits({ hex: "0x1g" }, MAX));
    expect(e.path).toEqual(["hex"]);
    // "0x1g": the g is character 3 of the string, the 0x prefix included.
    expect(e.message).toContain("character 3 (counting from 0)");
  });

  it("rejects other shapes", () => {
    expect(() => parseBits(42 as unknown as string, MAX)).toThrow(InputError);
    expect(() => parseBits(null as unknown as string, MAX)).toThrow(InputError);
    expect(() => parseBits({ bits: "1" } as unknown as string, MAX)).toThrow(InputError);
  });

  it("enforces maxBits in every form and names the limit", () => {
    expect(parseBits("1".repeat(8), 8).length).toBe(8);
    expect(caught(() => parseBits("1".repeat(9), 8)).message).toContain("at most 8");
    expect(parseBits("1111 1111", 8).length).toBe(8);
    expect(caught(() => parseBits(new Array<number>(9).fill(0), 8)).message).toContain("at most 8");
    expect(parseBits({ hex: "ff" }, 8).length).toBe(8);
    expect(caught(() => parseBits({ hex: "fff" }, 8)).message).toContain("at most 8");
    expect(parseBits({ hex: "ff", length: 7 }, 7).length).toBe(7);
    expect(caught(() => parseBits({ hex: "ff" }, 7)).message).toContain("at most 7");
  });

  it("handles the largest allowed word, 1,048,576 bits", () => {
    const s = "10".repeat(MAX / 2);
    const bits = parseBits(s, MAX);
    expect(bits.length).toBe(MAX);
    expect(formatBits(bits)).toBe(s);
    expect(() => parseBits(s + "1", MAX)).toThrow(InputError);
    expect(parseBits({ hex: "a".repeat(MAX / 4) }, MAX).length).toBe(MAX);
  });
});

describe("formatBits / bitsToHex round trips (property)", () => {
  const bitArrays = fc.array(fc.integer({ min: 0, max: 1 }), { maxLength: 300 });

  it("parseBits(formatBits(b)) = b", () => {
    fc.assert(
      fc.property(bitArrays, (arr) => {
        const bits = Uint8Array.from(arr);
        expect(Array.from(parseBits(formatBits(bits), MAX))).toEqual(arr);
      }),
    );
  });

  it("parseBits({ hex: bitsToHex(b), length }) = b", () => {
    fc.assert(
      fc.property(bitArrays, (arr) => {
        const bits = Uint8Array.from(arr);
        const hex = bitsToHex(bits);
        expect(hex.length).toBe(Math.ceil(arr.length / 4));
        expect(Array.from(parseBits({ hex, length: arr.length }, MAX))).toEqual(arr);
      }),
    );
  });

  it("bitsToHex agrees with BigInt's own hex for whole digits", () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 0, max: 1 }), { minLength: 4, maxLength: 200 }), (arr) => {
        const whole = arr.slice(0, arr.length - (arr.length % 4));
        // Reference: BigInt("0b…").toString(16), left-padded to the digit count.
        const expected = BigInt("0b" + whole.join("")).toString(16).padStart(whole.length / 4, "0");
        expect(bitsToHex(Uint8Array.from(whole))).toBe(expected);
      }),
    );
  });
});

describe("packBits and popcount", () => {
  it("puts bit i at word i >>> 5, position i & 31", () => {
    const bits = new Uint8Array(70);
    bits[0] = 1;
    bits[31] = 1;
    bits[32] = 1;
    bits[69] = 1;
    const w = packBits(bits);
    expect(w.length).toBe(3);
    // Expected words written from the layout rule: 2^0 + 2^31, 2^0, 2^(69 − 64).
    expect(w[0]).toBe(2 ** 31 + 1);
    expect(w[1]).toBe(1);
    expect(w[2]).toBe(2 ** 5);
    expect(packBits(new Uint8Array(0)).length).toBe(0);
  });

  it("popcount32 agrees with counting the binary digits (property)", () => {
    expect(popcount32(0)).toBe(0);
    expect(popcount32(0xffffffff)).toBe(32);
    expect(popcount32(0x80000000)).toBe(1);
    fc.assert(fc.property(fc.integer({ min: 0, max: 0xffffffff }), (x) => popcount32(x) === naivePopcount(x)));
  });

  it("popcountPacked counts the ones of the word", () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 0, max: 1 }), { maxLength: 500 }), (arr) => {
        const ones = arr.filter((b) => b === 1).length;
        return popcountPacked(packBits(Uint8Array.from(arr))) === ones;
      }),
    );
  });
});
