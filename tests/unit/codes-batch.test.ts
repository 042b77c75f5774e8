import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { bch } from "@/lib/core/codes/bch";
import { golay } from "@/lib/core/codes/golay";
import { hamming } from "@/lib/core/codes/hamming";
import { rs } from "@/lib/core/codes/rs";
import type { BlockCode, Word } from "@/lib/core/codes/types";
import { InputError } from "@/lib/core/errors";

// encodeBatch must give exactly what encode gives one message at a time. Fixed seeds: the same cases every run.
const SEED = 0x5a11e;

function inputError(f: () => unknown): InputError {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return e as InputError;
  }
  throw new Error("expected an InputError");
}

/** The per-word encodings of `count` messages stored back to back, concatenated. */
function oneAtATime(code: BlockCode, messages: Word, count: number): Word {
  const out = code.q === 2 ? new Uint8Array(count * code.n) : new Uint16Array(count * code.n);
  for (let i = 0; i < count; i++) out.set(code.encode(messages.subarray(i * code.k, (i + 1) * code.k)), i * code.n);
  return out;
}

/** A code with 0 to 12 random messages for it, back to back. */
const batchOf = (codes: fc.Arbitrary<BlockCode>) =>
  codes.chain((code) =>
    fc.integer({ min: 0, max: 12 }).chain((count) => {
      const length = count * code.k;
      const values = fc.array(fc.integer({ min: 0, max: code.q - 1 }), { minLength: length, maxLength: length });
      return values.map((v) => ({ code, count, messages: code.q === 2 ? Uint8Array.from(v) : Uint16Array.from(v) }));
    }),
  );

const hammingCodes = fc.record({ r: fc.integer({ min: 2, max: 8 }), extended: fc.boolean() }).map(({ r, extended }) => hamming(r, extended));
const golayCodes = fc.boolean().map((extended) => golay(extended));
// m from 3 to 10, t from 1 to 6 where the field leaves message bits, shortened by up to half of k.
const bchCodes = fc
  .record({ m: fc.integer({ min: 3, max: 10 }), t: fc.integer({ min: 1, max: 6 }), cut: fc.double({ min: 0, max: 0.5, noNaN: true }) })
  .map(({ m, t, cut }) => {
    const options = { m, t: Math.min(t, 2 ** (m - 2) - 1) };
    return bch({ ...options, shorten: Math.floor(cut * bch(options).k) });
  });
// m from 2 to 10 covers both circuits (packed for m ≤ 8, log/exp above); any length, rate and first root.
const rsCodes = fc
  .record({ m: fc.integer({ min: 2, max: 10 }), nFrac: fc.double({ min: 0, max: 1, noNaN: true }), kFrac: fc.double({ min: 0, max: 1, noNaN: true }), b: fc.nat() })
  .map(({ m, nFrac, kFrac, b }) => {
    const order = 2 ** m - 1;
    const n = 2 + Math.floor(nFrac * (order - 2));
    return rs({ m, n, k: 1 + Math.floor(kFrac * (n - 2)), firstRoot: b % order });
  });

/** a·b in GF(2^m) by shift-and-add, reducing by the field polynomial: no tables (Lin & Costello 2004, ch. 2). */
function plainMul(a: number, b: number, m: number, poly: number): number {
  let p = 0;
  for (; b !== 0; b >>>= 1) {
    if (b & 1) p ^= a;
    a <<= 1;
    if (a >>> m) a ^= poly;
  }
  return p;
}

/** Remainder of x^(n−k)·m(x) by g(x) by schoolbook long division, coefficients highest power first (Lin & Costello 2004, ch. 7). */
function parityByDivision(message: ArrayLike<number>, generator: number[], mul: (a: number, b: number) => number): number[] {
  const r = generator.length - 1;
  const work = [...Array.from(message), ...new Array<number>(r).fill(0)];
  for (let i = 0; i < message.length; i++) {
    const c = work[i]!;
    if (c !== 0) generator.forEach((g, j) => (work[i + j]! ^= mul(c, g)));
  }
  return work.slice(message.length);
}

describe("encodeBatch equals encode one message at a time (fast-check, seeded)", () => {
  const families: [string, fc.Arbitrary<BlockCode>][] = [
    ["Hamming and extended Hamming, r = 2..8", hammingCodes],
    ["Golay (23,12) and (24,12)", golayCodes],
    ["BCH, m = 3..10, shortened or not", bchCodes],
    ["Reed–Solomon, m = 2..10", rsCodes],
  ];
  for (const [name, codes] of families) {
    it(name, () => {
      fc.assert(
        fc.property(batchOf(codes), ({ code, count, messages }) => {
          const batch = code.encodeBatch!(messages, count);
          expect(batch).toBeInstanceOf(code.q === 2 ? Uint8Array : Uint16Array);
          expect(batch.length).toBe(count * code.n);
          expect(batch).toEqual(oneAtATime(code, messages, count));
        }),
        { seed: SEED, numRuns: 150 },
      );
    });
  }
});

describe("batch codewords checked independently of the encoders' tables (fast-check, seeded)", () => {
  it("Hamming and Golay: every codeword decodes with an all-zero syndrome and nothing corrected", () => {
    fc.assert(
      fc.property(batchOf(fc.oneof(hammingCodes, golayCodes)), ({ code, count, messages }) => {
        const batch = code.encodeBatch!(messages, count);
        for (let i = 0; i < count; i++) {
          const d = code.decode(batch.slice(i * code.n, (i + 1) * code.n));
          expect(d.syndrome.every((s) => s === 0)).toBe(true);
          expect(d.correctedPositions).toEqual([]);
          expect(d.message).toEqual(messages.slice(i * code.k, (i + 1) * code.k));
        }
      }),
      { seed: SEED, numRuns: 100 },
    );
  });

  it("BCH and Reed–Solomon: message, then x^(n−k)·m(x) mod g(x) by long division", () => {
    const binary = bchCodes.map((code) => ({ code, generator: Array.from(code.generator.toString(2), Number), mul: (a: number, b: number) => a & b }));
    const symbolic = rsCodes.map((code) => ({ code, generator: code.generator, mul: (a: number, b: number) => plainMul(a, b, code.m, code.primitivePoly) }));
    fc.assert(
      fc.property(
        fc.oneof(binary, symbolic).chain(({ code, generator, mul }) => batchOf(fc.constant(code as BlockCode)).map((b) => ({ ...b, generator, mul }))),
        ({ code, count, messages, generator, mul }) => {
          const batch = code.encodeBatch!(messages, count);
          for (let i = 0; i < count; i++) {
            const message = messages.subarray(i * code.k, (i + 1) * code.k);
            const expected = [...Array.from(message), ...parityByDivision(message, generator, mul)];
            expect(Array.from(batch.subarray(i * code.n, (i + 1) * code.n))).toEqual(expected);
          }
        },
      ),
      { seed: SEED, numRuns: 100 },
    );
  });
});

describe("encodeBatch input errors", () => {
  const binaryCodes: BlockCode[] = [hamming(3), hamming(4, true), golay(), golay(true), bch({ m: 4, t: 2 }), bch({ m: 8, t: 2, shorten: 5 })];

  it("binary codes: a wrong total length, a non-binary bit (located by message and bit), symbols instead of bits, a bad count", () => {
    for (const code of binaryCodes) {
      const three = new Uint8Array(3 * code.k);
      const long = inputError(() => code.encodeBatch!(new Uint8Array(3 * code.k + 1), 3));
      expect(long.message).toBe(`messages has ${3 * code.k + 1} bits; 3 messages of ${code.name} take ${3 * code.k}`);
      expect(long.path).toEqual(["messages"]);
      expect(inputError(() => code.encodeBatch!(new Uint8Array(3 * code.k - 1), 3)).path).toEqual(["messages"]);

      const bad = three.slice();
      bad[2 * code.k + 1] = 2;
      bad[3 * code.k - 1] = 7;
      const bit = inputError(() => code.encodeBatch!(bad, 3));
      expect(bit.message).toBe("message 2 bit 1 is 2; bits are 0 or 1");
      expect(bit.path).toEqual(["messages", 2, 1]);
      const first = three.slice();
      first[0] = 255;
      expect(inputError(() => code.encodeBatch!(first, 3)).path).toEqual(["messages", 0, 0]);

      expect(inputError(() => code.encodeBatch!(new Uint16Array(3 * code.k), 3)).message).toBe(`messages must be bits (0/1); ${code.name} is a binary code`);
      for (const count of [-1, 1.5, Number.NaN]) expect(inputError(() => code.encodeBatch!(three, count)).path).toEqual(["count"]);
    }
  });

  it("Reed–Solomon: a wrong total length, a symbol out of range (located by message and symbol), a bad count", () => {
    const code = rs({ m: 4, n: 12, k: 5 });
    const long = inputError(() => code.encodeBatch(new Uint16Array(11), 2));
    expect(long.message).toBe(`messages has 11 symbols; 2 messages of ${code.name} take 10`);
    expect(long.path).toEqual(["messages"]);
    const bad = new Uint16Array(10);
    bad[7] = 16;
    const symbol = inputError(() => code.encodeBatch(bad, 2));
    expect(symbol.message).toBe("message 1 symbol 2 is 16; symbols of GF(16) are 0 to 15");
    expect(symbol.path).toEqual(["messages", 1, 2]);
    expect(inputError(() => rs({ m: 10, k: 900 }).encodeBatch(Uint16Array.of(...new Array<number>(899).fill(0), 1024), 1)).path).toEqual(["messages", 0, 899]);
    expect(inputError(() => code.encodeBatch(new Uint16Array(10), -2)).path).toEqual(["count"]);
  });

  it("an empty batch is fine: no messages, no codewords", () => {
    for (const code of [...binaryCodes, rs({ m: 8, k: 223 })]) expect(code.encodeBatch!(code.q === 2 ? new Uint8Array(0) : new Uint16Array(0), 0).length).toBe(0);
  });
});
