import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { enumerateWeightDistribution, weightDistribution } from "@/lib/core/analysis";
import { hamming } from "@/lib/core/codes/hamming";
import { repetition } from "@/lib/core/codes/repetition";
import { InputError } from "@/lib/core/errors";

const bits = (s: string) => Uint8Array.from(s, Number);
const xor = (a: Uint8Array, b: Uint8Array) => a.map((x, i) => x ^ b[i]!);

function expectInputError(f: () => unknown, message: RegExp, path: (string | number)[]) {
  expect(f).toThrow(InputError);
  expect(f).toThrow(message);
  try {
    f();
  } catch (e) {
    expect((e as InputError).path).toEqual(path);
  }
}

/** Polynomial product of coefficient lists (bigint), for the closed-form weight enumerator. */
const mul = (a: bigint[], b: bigint[]) => {
  const out = new Array<bigint>(a.length + b.length - 1).fill(0n);
  a.forEach((x, i) => b.forEach((y, j) => (out[i + j]! += x * y)));
  return out;
};
const pow = (a: bigint[], e: number) => Array.from({ length: e }).reduce<bigint[]>((acc) => mul(acc, a), [1n]);

/**
 * Independent reference: the Hamming code's weight enumerator in closed form,
 * A(z) = [(1 + z)^n + n(1 − z)(1 − z²)^((n−1)/2)] / (n + 1) (MacWilliams & Sloane, ch. 1, problem; from memory).
 */
function hammingEnumerator(n: number): bigint[] {
  const a = pow([1n, 1n], n);
  const b = mul([BigInt(n), -BigInt(n)], pow([1n, 0n, -1n], (n - 1) / 2));
  return a.map((x, i) => (x + (b[i] ?? 0n)) / BigInt(n + 1));
}

const caseArb = fc.record({ r: fc.integer({ min: 2, max: 6 }), extended: fc.boolean() }).chain(({ r, extended }) => {
  const c = hamming(r, extended);
  return fc.record({
    r: fc.constant(r),
    extended: fc.constant(extended),
    message: fc.uint8Array({ minLength: c.k, maxLength: c.k, min: 0, max: 1 }),
    errorAt: fc.option(fc.integer({ min: 0, max: c.n - 1 }), { nil: undefined }),
    pair: fc.uniqueArray(fc.integer({ min: 0, max: c.n - 1 }), { minLength: 2, maxLength: 2 }),
  });
});

describe("Hamming codes", () => {
  it("(7,4) encodes as documented: message, then parity bits p_j = bit (2 − j) of the XOR of column numbers 3, 5, 6, 7 (by hand)", () => {
    const c = hamming(3);
    expect(c).toMatchObject({ n: 7, k: 4, dmin: 3, name: "Hamming (7,4)", messagePositions: [0, 1, 2, 3] });
    // 1000 → column 3 = 011; 0100 → 101; 1011 → 3 ⊕ 6 ⊕ 7 = 2 = 010.
    expect(c.encode(bits("1000"))).toEqual(bits("1000011"));
    expect(c.encode(bits("0100"))).toEqual(bits("0100101"));
    expect(c.encode(bits("1011"))).toEqual(bits("1011010"));
    expect(hamming(3, true).encode(bits("1011"))).toEqual(bits("10110100"));
  });

  it("a single error's syndrome is the column number of its position, most significant bit first (the documented H)", () => {
    const c = hamming(4);
    const cw = c.encode(new Uint8Array(11)) as Uint8Array;
    // Parity bit j at position 11 + j has column 2^(3−j); message bit 0 has column 3.
    const e = (p: number) => cw.map((b, i) => (i === p ? b ^ 1 : b));
    expect(Array.from(c.decode(e(11)).syndrome)).toEqual([1, 0, 0, 0]);
    expect(Array.from(c.decode(e(14)).syndrome)).toEqual([0, 0, 0, 1]);
    expect(Array.from(c.decode(e(0)).syndrome)).toEqual([0, 0, 1, 1]);
  });

  it("weight distributions for r = 3..6 equal the closed-form enumerator (MacWilliams & Sloane, ch. 1)", () => {
    for (let r = 3; r <= 6; r++) {
      const c = hamming(r);
      expect(weightDistribution(c.generatorRows!()).weights).toEqual(hammingEnumerator(c.n));
    }
  });

  it("the dual of the (15,11) code is the simplex code: every non-zero word has weight 8 (MacWilliams & Sloane, ch. 1)", () => {
    const h = [0, 1, 2, 3].map((j) => {
      const c = hamming(4);
      // Row j of H: bit (3 − j) of each position's column number, read off single-error syndromes.
      return Uint8Array.from({ length: 15 }, (_, p) => c.decode(Uint8Array.from({ length: 15 }, (_, i) => (i === p ? 1 : 0))).syndrome[j]!);
    });
    const b = enumerateWeightDistribution(h);
    expect(b[0]).toBe(1n);
    expect(b[8]).toBe(15n);
    expect(b.reduce((s, x) => s + x, 0n)).toBe(16n);
  });

  it("property (r = 2..6, plain and extended): every codeword has zero syndrome and any single error is corrected", () => {
    fc.assert(
      fc.property(caseArb, ({ r, extended, message, errorAt }) => {
        const c = hamming(r, extended);
        const cw = c.encode(message) as Uint8Array;
        expect(c.decode(cw)).toMatchObject({ failure: false, correctedPositions: [], syndrome: new Uint8Array(c.n - c.k) });
        const received = cw.slice();
        if (errorAt !== undefined) received[errorAt]! ^= 1;
        const d = c.decode(received);
        expect(d.failure).toBe(false);
        expect(d.message).toEqual(message);
        expect(d.codeword).toEqual(cw);
        expect(d.correctedPositions).toEqual(errorAt === undefined ? [] : [errorAt]);
      }),
    );
  });

  it("property: extended Hamming detects every double error (SEC-DED) and changes nothing", () => {
    fc.assert(
      fc.property(
        caseArb.filter((x) => x.extended),
        ({ r, message, pair }) => {
          const c = hamming(r, true);
          const received = (c.encode(message) as Uint8Array).slice();
          for (const p of pair) received[p]! ^= 1;
          const d = c.decode(received);
          expect(d.failure).toBe(true);
          expect(d.reason).toMatch(/double error detected/);
          expect(d.codeword).toEqual(received);
          expect(d.correctedPositions).toEqual([]);
        },
      ),
    );
  });

  it("extended (8,4) and (16,11): all double errors of the zero word, exhaustively, are detected", () => {
    for (const r of [3, 4]) {
      const c = hamming(r, true);
      for (let a = 0; a < c.n; a++) {
        for (let b = a + 1; b < c.n; b++) {
          const e = new Uint8Array(c.n);
          e[a] = e[b] = 1;
          expect(c.decode(e).failure).toBe(true);
        }
      }
    }
  });

  it("edge case r = 2: the (3,1) code is the repetition code of length 3", () => {
    const h = hamming(2);
    const rep = repetition(3);
    expect(h).toMatchObject({ n: 3, k: 1, dmin: 3 });
    for (let w = 0; w < 8; w++) {
      const word = Uint8Array.of((w >> 2) & 1, (w >> 1) & 1, w & 1);
      expect(h.decode(word).message).toEqual(rep.decode(word).message);
    }
    expect(h.encode(bits("1"))).toEqual(bits("111"));
  });

  it("largest size r = 16: (65535,65519) corrects a single error; no generator matrix offered above n = 1024", () => {
    const c = hamming(16);
    expect(c).toMatchObject({ n: 65535, k: 65519 });
    expect(c.generatorRows).toBeUndefined();
    expect(hamming(10).generatorRows).toBeDefined();
    const m = Uint8Array.from({ length: c.k }, (_, i) => (i * 2654435761) % 7 === 0 ? 1 : 0);
    const cw = c.encode(m) as Uint8Array;
    const received = xor(cw, Uint8Array.from({ length: c.n }, (_, i) => (i === 40000 ? 1 : 0)));
    const d = c.decode(received);
    expect(d).toMatchObject({ failure: false, correctedPositions: [40000] });
    expect(d.message).toEqual(m);
  });

  it("input errors name the field", () => {
    expectInputError(() => hamming(1), /r must be an integer from 2 to 16/, ["r"]);
    expectInputError(() => hamming(17), /r must be an integer from 2 to 16; got 17/, ["r"]);
    expectInputError(() => hamming(3, "yes" as unknown as boolean), /extended must be true or false/, ["extended"]);
    const c = hamming(3);
    expectInputError(() => c.encode(bits("101")), /message has 3 bits; Hamming \(7,4\) takes 4/, ["message"]);
    expectInputError(() => c.encode(Uint8Array.of(0, 1, 5, 0)), /message bit 2 is 5/, ["message", 2]);
    expectInputError(() => c.decode(bits("10110100")), /received has 8 bits; Hamming \(7,4\) takes 7/, ["received"]);
    expectInputError(() => c.decode(bits("1011010"), [0]), /does not take erasures/, ["erasures"]);
  });
});
