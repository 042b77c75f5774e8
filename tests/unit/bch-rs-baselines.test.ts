import fc from "fast-check";
import { describe, expect, it } from "vitest";
import * as bchBaseline from "@/bench/baselines/bch255";
import * as rsBaseline from "@/bench/baselines/rs255";
import { bch } from "@/lib/core/codes/bch";
import { rs } from "@/lib/core/codes/rs";

// The benchmark baselines are table-free textbook codecs; they must agree bit for bit with the shipped ones.

const bits = (n: number) => fc.uint8Array({ min: 0, max: 1, minLength: n, maxLength: n });
const symbols = (n: number) => fc.array(fc.integer({ min: 0, max: 255 }), { minLength: n, maxLength: n }).map((a) => Uint16Array.from(a));
const damage = (n: number, maxCount: number, maxValue: number) =>
  fc.array(fc.record({ at: fc.integer({ min: 0, max: n - 1 }), by: fc.integer({ min: 1, max: maxValue }) }), { maxLength: maxCount });

describe("BCH (255,239), t = 2: baseline vs shipped", () => {
  const code = bch({ m: 8, t: 2 });

  it("the baseline's hard-coded generator 267543 (octal) is the shipped one", () => {
    expect(code.generatorOctal).toBe("267543");
    expect([code.n, code.k, code.t]).toEqual([255, 239, 2]);
  });

  it("encode agrees on random messages (fast-check)", () => {
    fc.assert(
      fc.property(bits(239), (msg) => {
        expect(bchBaseline.encode(msg)).toEqual(code.encode(msg));
      }),
      { numRuns: 200 },
    );
  });

  it("decode agrees on codewords with up to 6 flipped bits, within and beyond t (fast-check)", () => {
    fc.assert(
      fc.property(bits(239), damage(255, 6, 1), (msg, flips) => {
        const word = code.encode(msg);
        for (const f of flips) word[f.at]! ^= 1;
        expect(bchBaseline.decode(word)).toEqual(code.decode(word).message);
      }),
      { numRuns: 300 },
    );
  });

  it("decode agrees on random words (fast-check)", () => {
    fc.assert(
      fc.property(bits(255), (word) => {
        expect(bchBaseline.decode(word)).toEqual(code.decode(word).message);
      }),
      { numRuns: 200 },
    );
  });
});

describe("RS (255,223), t = 16: baseline vs shipped", () => {
  const code = rs({ m: 8, k: 223 });

  it("encode agrees on random messages (fast-check)", () => {
    fc.assert(
      fc.property(symbols(223), (msg) => {
        expect(rsBaseline.encode(msg)).toEqual(code.encode(msg));
      }),
      { numRuns: 100 },
    );
  });

  it("decode agrees on codewords with up to 20 damaged symbols, within and beyond t (fast-check)", () => {
    fc.assert(
      fc.property(symbols(223), damage(255, 20, 255), (msg, hits) => {
        const word = code.encode(msg);
        for (const h of hits) word[h.at]! ^= h.by;
        expect(rsBaseline.decode(word)).toEqual(code.decode(word).message);
      }),
      { numRuns: 100 },
    );
  });

  it("decode agrees on random words (fast-check)", () => {
    fc.assert(
      fc.property(symbols(255), (word) => {
        expect(rsBaseline.decode(word)).toEqual(code.decode(word).message);
      }),
      { numRuns: 30 },
    );
  });
});
