import fc from "fast-check";
import { describe, expect, it } from "vitest";
import * as hamming84 from "@/bench/baselines/hamming84";
import { hamming } from "@/lib/core/codes/hamming";
import type { BlockCode, DecodeBatchResult } from "@/lib/core/codes/types";
import { InputError } from "@/lib/core/errors";

// decodeBatch must answer exactly what decode answers one word at a time. Fixed seed: the same cases every run.
const SEED = 0xdec0de;

function inputError(f: () => unknown): InputError {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return e as InputError;
  }
  throw new Error("expected an InputError");
}

/** The corrected codeword of word i: the received word with the corrected position, if any, flipped. */
function codewordOf(code: BlockCode, received: Uint8Array, d: DecodeBatchResult, i: number): Uint8Array {
  const c = received.slice(i * code.n, (i + 1) * code.n);
  if (d.corrected[i]! >= 0) c[d.corrected[i]!]! ^= 1;
  return c;
}

/** Word i of a batch result in decode's shape; the syndrome integer is spelt out here, most significant bit first. */
function wordOf(code: BlockCode, received: Uint8Array, d: DecodeBatchResult, i: number) {
  const { n, k } = code;
  const reason = d.reason(i);
  return {
    message: d.messages.slice(i * k, (i + 1) * k),
    codeword: codewordOf(code, received, d, i),
    correctedPositions: d.corrected[i]! < 0 ? [] : [d.corrected[i]!],
    syndrome: Uint8Array.from(d.syndromes[i]!.toString(2).padStart(n - k, "0"), Number),
    failure: d.failures[i] === 1,
    ...(reason !== undefined ? { reason } : {}),
  };
}

/** Every word of the batch against decode on that word alone. */
function expectSameAsOneByOne(code: BlockCode, received: Uint8Array, count: number) {
  const d = code.decodeBatch!(received, count);
  expect(d.messages.length).toBe(count * code.k);
  for (const perWord of [d.corrected, d.syndromes, d.failures]) expect(perWord.length).toBe(count);
  for (let i = 0; i < count; i++) expect(wordOf(code, received, d, i)).toEqual(code.decode(received.slice(i * code.n, (i + 1) * code.n)));
  return d;
}

/** r = 2..6, plain or extended, and 0 to 12 words: a random message's codeword with 0, 1 or 2 distinct random positions flipped. */
const batches = fc
  .record({ r: fc.integer({ min: 2, max: 6 }), extended: fc.boolean() })
  .map(({ r, extended }) => hamming(r, extended))
  .chain((code) =>
    fc.record({
      code: fc.constant(code),
      words: fc.array(
        fc.record({
          message: fc.uint8Array({ minLength: code.k, maxLength: code.k, min: 0, max: 1 }),
          flips: fc.uniqueArray(fc.integer({ min: 0, max: code.n - 1 }), { maxLength: 2 }),
        }),
        { maxLength: 12 },
      ),
    }),
  );

describe("decodeBatch equals decode one word at a time (fast-check, seeded)", () => {
  it("Hamming and extended Hamming, r = 2..6, words with 0, 1 and 2 errors", () => {
    fc.assert(
      fc.property(batches, ({ code, words }) => {
        const received = new Uint8Array(words.length * code.n);
        words.forEach(({ message, flips }, i) => {
          const w = (code.encode(message) as Uint8Array).slice();
          for (const p of flips) w[p]! ^= 1;
          received.set(w, i * code.n);
        });
        const d = expectSameAsOneByOne(code, received, words.length);
        // And against how the words were made: up to one error is corrected; extended, two are detected.
        words.forEach(({ message, flips }, i) => {
          if (flips.length <= 1) {
            expect(d.messages.slice(i * code.k, (i + 1) * code.k)).toEqual(message);
            expect(d.corrected[i]).toBe(flips.length === 1 ? flips[0] : -1);
            expect(d.syndromes[i] === 0).toBe(flips.length === 0);
          } else if (code.n % 2 === 0) {
            expect(d.failures[i]).toBe(1);
            expect(d.corrected[i]).toBe(-1);
          }
        });
      }),
      { seed: SEED, numRuns: 300 },
    );
  });

  it("(7,4) and (8,4), every possible received word, against the nearest codeword found by trying all 16 (minimum-distance decoding)", () => {
    for (const code of [hamming(3), hamming(3, true)]) {
      const { n } = code;
      const codewords = Array.from({ length: 16 }, (_, m) => code.encode(Uint8Array.from({ length: 4 }, (_, j) => (m >> (3 - j)) & 1)) as Uint8Array);
      const received = Uint8Array.from({ length: n << n }, (_, b) => (Math.floor(b / n) >> (n - 1 - (b % n))) & 1);
      const d = expectSameAsOneByOne(code, received, 1 << n);
      for (let v = 0; v < 1 << n; v++) {
        const w = received.subarray(v * n, (v + 1) * n);
        const distances = codewords.map((c) => c.reduce((s, b, j) => s + (b ^ w[j]!), 0));
        const nearest = Math.min(...distances);
        if (nearest <= 1) {
          const c = codewords[distances.indexOf(nearest)]!;
          expect(codewordOf(code, received, d, v)).toEqual(c);
          expect(d.messages.slice(v * 4, v * 4 + 4)).toEqual(c.slice(0, 4));
          expect(d.corrected[v]).toBe(nearest === 0 ? -1 : c.findIndex((b, j) => b !== w[j]));
          expect(d.failures[v]).toBe(0);
        } else {
          // Only the (8,4) code has words at distance 2 from every nearest codeword: detected, left as received.
          expect(n).toBe(8);
          expect(d.failures[v]).toBe(1);
          expect(codewordOf(code, received, d, v)).toEqual(w);
          expect(d.reason(v)).toMatch(/double error detected/);
        }
      }
    }
  });

  it("a buffer that starts at an odd byte offset inside a larger one decodes the same", () => {
    for (const code of [hamming(3), hamming(3, true), hamming(4), hamming(5, true)]) {
      const count = 9;
      const big = Uint8Array.from({ length: count * code.n + 5 }, (_, i) => ((i * 2654435761) >>> 13) & 1);
      expectSameAsOneByOne(code, big.subarray(3, 3 + count * code.n), count);
    }
  });

  it("larger r: (1023,1013) and the largest, extended (65536,65519), with a single error in each word", () => {
    for (const code of [hamming(10), hamming(16, true)]) {
      const count = 3;
      const received = new Uint8Array(count * code.n);
      for (let i = 0; i < count; i++) {
        const m = Uint8Array.from({ length: code.k }, (_, j) => ((j + i) * 2654435761) % 5 === 0 ? 1 : 0);
        received.set(code.encode(m), i * code.n);
        received[i * code.n + ((i * 7919) % code.n)]! ^= 1;
      }
      const d = expectSameAsOneByOne(code, received, count);
      expect(Array.from(d.corrected)).toEqual([0, 7919 % code.n, (2 * 7919) % code.n]);
    }
  });
});

describe("decodeBatch input errors and edge cases", () => {
  const codes = [hamming(2), hamming(3), hamming(3, true), hamming(4), hamming(5, true)];

  it("count 0: an empty buffer gives empty arrays", () => {
    for (const code of codes) {
      const d = code.decodeBatch!(new Uint8Array(0), 0);
      for (const a of [d.messages, d.corrected, d.syndromes, d.failures]) expect(a.length).toBe(0);
    }
  });

  it("a non-bit is named by word and bit, wherever it is (first word, last bit of a word, any value)", () => {
    for (const code of codes) {
      const { n, name } = code;
      const bad = new Uint8Array(3 * n);
      bad[2 * n + 1] = 2;
      bad[3 * n - 1] = 7;
      const e = inputError(() => code.decodeBatch!(bad, 3));
      expect(e.message).toBe("received word 2 bit 1 is 2; bits are 0 or 1");
      expect(e.path).toEqual(["received", 2, 1]);
      const last = new Uint8Array(3 * n);
      last[2 * n - 1] = 255;
      expect(inputError(() => code.decodeBatch!(last, 3)).path).toEqual(["received", 1, n - 1]);
      const first = new Uint8Array(3 * n);
      first[0] = 3;
      expect(inputError(() => code.decodeBatch!(first, 3)).message, name).toBe("received word 0 bit 0 is 3; bits are 0 or 1");
    }
  });

  it("a wrong total length, symbols instead of bits and a bad count are refused before decoding", () => {
    for (const code of codes) {
      const { n, name } = code;
      const long = inputError(() => code.decodeBatch!(new Uint8Array(3 * n + 1), 3));
      expect(long.message).toBe(`received has ${3 * n + 1} bits; 3 words of ${name} take ${3 * n}`);
      expect(long.path).toEqual(["received"]);
      expect(inputError(() => code.decodeBatch!(new Uint8Array(3 * n - 1), 3)).path).toEqual(["received"]);
      expect(inputError(() => code.decodeBatch!(new Uint16Array(3 * n), 3)).message).toBe(`received must be bits (0/1); ${name} is a binary code`);
      for (const count of [-1, 1.5, Number.NaN]) expect(inputError(() => code.decodeBatch!(new Uint8Array(3 * n), count)).path).toEqual(["count"]);
    }
  });
});

describe("the benchmark's extended (8,4) baseline", () => {
  it("encodes all 16 messages as the shipped code and decodes the 144 words at most one bit from a codeword as decodeBatch does", () => {
    const code = hamming(3, true);
    const received: Uint8Array[] = [];
    for (let m = 0; m < 16; m++) {
      const message = Uint8Array.from({ length: 4 }, (_, j) => (m >> (3 - j)) & 1);
      const c = hamming84.encode(message);
      expect(c).toEqual(code.encode(message));
      received.push(c, ...Array.from({ length: 8 }, (_, p) => c.map((b, j) => (j === p ? b ^ 1 : b))));
    }
    const batch = new Uint8Array(received.length * 8);
    received.forEach((w, i) => batch.set(w, i * 8));
    const d = code.decodeBatch!(batch, received.length);
    received.forEach((w, i) => expect(hamming84.decode(w)).toEqual(d.messages.slice(4 * i, 4 * i + 4)));
  });
});
