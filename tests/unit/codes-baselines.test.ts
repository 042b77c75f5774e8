import fc from "fast-check";
import { describe, expect, it } from "vitest";
import * as golay24 from "@/bench/baselines/golay24";
import * as hamming74 from "@/bench/baselines/hamming74";
import { golay } from "@/lib/core/codes/golay";
import { hamming } from "@/lib/core/codes/hamming";

const word = (n: number) => fc.uint8Array({ minLength: n, maxLength: n, min: 0, max: 1 });

describe("benchmark baselines give the shipped codecs' results", () => {
  it("Hamming (7,4): same codeword for all 16 messages, same message for all 128 words", () => {
    const shipped = hamming(3);
    for (let m = 0; m < 16; m++) {
      const msg = Uint8Array.from({ length: 4 }, (_, i) => (m >> i) & 1);
      expect(hamming74.encode(msg)).toEqual(shipped.encode(msg));
    }
    for (let w = 0; w < 128; w++) {
      const r = Uint8Array.from({ length: 7 }, (_, i) => (w >> i) & 1);
      expect(hamming74.decode(r)).toEqual(shipped.decode(r).message);
    }
  });

  it("extended Golay (24,12): same codeword, and the same message after up to 3 errors, for random inputs", () => {
    const shipped = golay(true);
    fc.assert(
      fc.property(word(12), fc.uniqueArray(fc.integer({ min: 0, max: 23 }), { maxLength: 3 }), (msg, errs) => {
        const cw = golay24.encode(msg);
        expect(cw).toEqual(shipped.encode(msg));
        const r = cw.slice();
        for (const p of errs) r[p]! ^= 1;
        expect(golay24.decode(r)).toEqual(shipped.decode(r).message);
      }),
    );
  });

  it("extended Golay (24,12): the same message for arbitrary random words (including detected weight-4 cosets)", () => {
    const shipped = golay(true);
    fc.assert(
      fc.property(word(24), (r) => {
        expect(golay24.decode(r)).toEqual(shipped.decode(r).message);
      }),
      { numRuns: 300 },
    );
  });
});
