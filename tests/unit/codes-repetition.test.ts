import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { repetition } from "@/lib/core/codes/repetition";
import { InputError } from "@/lib/core/errors";

const bits = (s: string) => Uint8Array.from(s, Number);

function expectInputError(f: () => unknown, message: RegExp, path: (string | number)[]) {
  expect(f).toThrow(InputError);
  expect(f).toThrow(message);
  try {
    f();
  } catch (e) {
    expect((e as InputError).path).toEqual(path);
  }
}

/** Random error pattern of length n and weight w (positions drawn without replacement). */
const errorPattern = (n: number, w: number) =>
  fc.shuffledSubarray([...Array(n).keys()], { minLength: w, maxLength: w }).map((ps) => {
    const e = new Uint8Array(n);
    for (const p of ps) e[p] = 1;
    return e;
  });
const xor = (a: Uint8Array, b: Uint8Array) => a.map((x, i) => x ^ b[i]!);

describe("repetition (n,1)", () => {
  it("encodes by copying the bit n times; dmin = n (common practice; MacWilliams & Sloane, ch. 1)", () => {
    const c = repetition(5);
    expect(c).toMatchObject({ n: 5, k: 1, q: 2, dmin: 5, family: "repetition" });
    expect(c.encode(bits("1"))).toEqual(bits("11111"));
    expect(c.encode(bits("0"))).toEqual(bits("00000"));
    expect(c.generatorRows!()).toEqual([bits("11111")]);
  });

  it("property: odd n corrects every pattern of up to t = (n − 1)/2 errors by majority", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: 20 }).chain((h) => {
          const n = 2 * h + 1;
          return fc.tuple(fc.constant(n), fc.integer({ min: 0, max: 1 }), fc.integer({ min: 0, max: h }).chain((w) => errorPattern(n, w)));
        }),
        ([n, bit, e]) => {
          const c = repetition(n);
          const r = xor(c.encode(Uint8Array.of(bit)) as Uint8Array, e);
          const d = c.decode(r);
          expect(d.failure).toBe(false);
          expect(Array.from(d.message)).toEqual([bit]);
          expect(d.correctedPositions).toEqual([...e.keys()].filter((i) => e[i]));
        },
      ),
    );
  });

  it("every codeword has zero syndrome; a received word's syndrome bit j is r_0 ⊕ r_{j+1}", () => {
    const c = repetition(6);
    expect(Array.from(c.decode(c.encode(bits("1"))).syndrome)).toEqual([0, 0, 0, 0, 0]);
    expect(Array.from(c.decode(bits("101100")).syndrome)).toEqual([1, 0, 0, 1, 1]);
  });

  it("even n: a tie is a failure with a reason, and nothing is changed (never a silent guess)", () => {
    const c = repetition(4);
    const d = c.decode(bits("0110"));
    expect(d.failure).toBe(true);
    expect(d.reason).toBe("tie: 2 ones and 2 zeros");
    expect(d.correctedPositions).toEqual([]);
    expect(d.codeword).toEqual(bits("0110"));
    expect(Array.from(d.message)).toEqual([0]);
    // Not a tie: three ones in four decide for 1.
    expect(c.decode(bits("1110"))).toMatchObject({ failure: false, correctedPositions: [3] });
  });

  it("edge case n = 1: the (1,1) code, dmin 1, no syndrome bits, nothing to correct", () => {
    const c = repetition(1);
    expect(c).toMatchObject({ n: 1, k: 1, dmin: 1 });
    expect(c.encode(bits("1"))).toEqual(bits("1"));
    expect(c.decode(bits("0"))).toMatchObject({ failure: false, correctedPositions: [], syndrome: new Uint8Array(0) });
  });

  it("input errors name the field", () => {
    expectInputError(() => repetition(0), /n must be an integer from 1/, ["n"]);
    expectInputError(() => repetition(2.5), /n must be an integer/, ["n"]);
    expectInputError(() => repetition(2 ** 21), /n must be an integer from 1 to 1048576/, ["n"]);
    const c = repetition(3);
    expectInputError(() => c.encode(bits("10")), /message has 2 bits; repetition \(3,1\) takes 1/, ["message"]);
    expectInputError(() => c.encode(Uint8Array.of(2)), /message bit 0 is 2/, ["message", 0]);
    expectInputError(() => c.decode(bits("1011")), /received has 4 bits/, ["received"]);
    expectInputError(() => c.decode(bits("101"), [1]), /does not take erasures/, ["erasures"]);
  });
});
