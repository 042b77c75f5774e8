import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { golay } from "@/lib/core/codes/golay";
import { InputError } from "@/lib/core/errors";

function expectInputError(f: () => unknown, message: RegExp, path: (string | number)[]) {
  expect(f).toThrow(InputError);
  expect(f).toThrow(message);
  try {
    f();
  } catch (e) {
    expect((e as InputError).path).toEqual(path);
  }
}

/** Independent reference: polynomial remainder over GF(2), coefficient lists highest degree first. */
function polyMod(a: number[], g: number[]): number[] {
  const r = [...a];
  for (let i = 0; i + g.length <= r.length; i++) if (r[i]) g.forEach((c, j) => (r[i + j]! ^= c));
  return r.slice(r.length - (g.length - 1));
}
// g(x) = x^11 + x^10 + x^6 + x^5 + x^4 + x^2 + 1 (Lin & Costello; MacWilliams & Sloane, ch. 2).
const G_POLY = [1, 1, 0, 0, 0, 1, 1, 1, 0, 1, 0, 1];

const positions = (n: number, maxWeight: number) => fc.uniqueArray(fc.integer({ min: 0, max: n - 1 }), { minLength: 0, maxLength: maxWeight });

describe("Golay codes", () => {
  it("g(x) divides x^23 + 1, so g generates a cyclic code of length 23 (MacWilliams & Sloane, ch. 2)", () => {
    const x23plus1 = [1, ...new Array(22).fill(0), 1];
    expect(polyMod(x23plus1, G_POLY).every((c) => c === 0)).toBe(true);
  });

  it("parity bits are the remainder of m(x)·x^11 by g(x), highest degree first, as documented (long division in the test)", () => {
    fc.assert(
      fc.property(fc.uint8Array({ minLength: 12, maxLength: 12, min: 0, max: 1 }), (m) => {
        const cw = golay().encode(m) as Uint8Array;
        expect(Array.from(cw.slice(0, 12))).toEqual(Array.from(m));
        expect(Array.from(cw.slice(12))).toEqual(polyMod([...m, ...new Array(11).fill(0)], G_POLY));
        const ext = golay(true).encode(m) as Uint8Array;
        expect(ext.slice(0, 23)).toEqual(cw);
        expect(ext.reduce((a, b) => a + b, 0) % 2).toBe(0);
      }),
    );
  });

  it("a cyclic shift of a (23,12) codeword is a codeword (zero syndrome)", () => {
    fc.assert(
      fc.property(fc.uint8Array({ minLength: 12, maxLength: 12, min: 0, max: 1 }), fc.integer({ min: 1, max: 22 }), (m, s) => {
        const cw = golay().encode(m) as Uint8Array;
        const shifted = Uint8Array.from({ length: 23 }, (_, i) => cw[(i + s) % 23]!);
        expect(golay().decode(shifted).syndrome.every((b) => b === 0)).toBe(true);
      }),
    );
  });

  it("property: up to t = 3 errors are corrected in both codes; codewords have zero syndrome", () => {
    fc.assert(
      fc.property(fc.boolean(), fc.uint8Array({ minLength: 12, maxLength: 12, min: 0, max: 1 }), positions(24, 3), (extended, m, errs) => {
        const c = golay(extended);
        const cw = c.encode(m) as Uint8Array;
        expect(c.decode(cw).syndrome.every((b) => b === 0)).toBe(true);
        const received = cw.slice();
        const at = errs.filter((p) => p < c.n);
        for (const p of at) received[p]! ^= 1;
        const d = c.decode(received);
        expect(d.failure).toBe(false);
        expect(d.message).toEqual(m);
        expect(d.correctedPositions).toEqual([...at].sort((a, b) => a - b));
      }),
    );
  });

  it("(23,12) is perfect: all 2^11 syndromes have a coset leader of weight ≤ 3, so decoding never fails", () => {
    // 1 + 23 + 253 + 1771 = 2048 = 2^11 (MacWilliams & Sloane, ch. 2).
    expect(1 + 23 + 253 + 1771).toBe(2 ** 11);
    fc.assert(
      fc.property(fc.uint8Array({ minLength: 23, maxLength: 23, min: 0, max: 1 }), (w) => {
        const d = golay().decode(w);
        expect(d.failure).toBe(false);
        expect(d.correctedPositions.length).toBeLessThanOrEqual(3);
        expect(golay().decode(d.codeword).syndrome.every((b) => b === 0)).toBe(true);
      }),
    );
  });

  it("(24,12): every one of the C(24,4) = 10626 weight-4 patterns is detected, and they fall 6 to a syndrome (MacWilliams & Sloane, ch. 2)", () => {
    const c = golay(true);
    const groups = new Map<string, number>();
    for (let a = 0; a < 24; a++)
      for (let b = a + 1; b < 24; b++)
        for (let x = b + 1; x < 24; x++)
          for (let y = x + 1; y < 24; y++) {
            const e = new Uint8Array(24);
            e[a] = e[b] = e[x] = e[y] = 1;
            const d = c.decode(e);
            expect(d.failure).toBe(true);
            expect(d.correctedPositions).toEqual([]);
            const key = d.syndrome.join("");
            groups.set(key, (groups.get(key) ?? 0) + 1);
          }
    expect(groups.size).toBe(1771);
    expect([...groups.values()].every((v) => v === 6)).toBe(true);
    expect(c.decode(Uint8Array.from({ length: 24 }, (_, i) => (i < 4 ? 1 : 0))).reason).toMatch(/4 errors detected/);
  });

  it("dimensions and flags", () => {
    expect(golay()).toMatchObject({ n: 23, k: 12, dmin: 7, name: "Golay (23,12)", family: "golay" });
    expect(golay(true)).toMatchObject({ n: 24, k: 12, dmin: 8, name: "extended Golay (24,12)" });
    expect(golay().generatorRows!()).toHaveLength(12);
  });

  it("input errors name the field", () => {
    expectInputError(() => golay("24" as unknown as boolean), /extended must be true or false/, ["extended"]);
    expectInputError(() => golay().encode(new Uint8Array(11)), /message has 11 bits; Golay \(23,12\) takes 12/, ["message"]);
    expectInputError(() => golay(true).decode(new Uint8Array(23)), /received has 23 bits; extended Golay \(24,12\) takes 24/, ["received"]);
    expectInputError(() => golay().decode(new Uint8Array(23).fill(7)), /received bit 0 is 7/, ["received", 0]);
    expectInputError(() => golay().decode(new Uint8Array(23), [3]), /does not take erasures/, ["erasures"]);
  });
});
