import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { InputError } from "@/lib/core/errors";
import { DEFAULT_PRIMITIVE_POLYNOMIALS, galoisField, MAX_M, MIN_M } from "@/lib/core/gfpm";

// Plain GF(2^m) arithmetic written here, independent of lib/core/gfpm: shift-and-add with reduction by p(x).
function plainMul(a: number, b: number, m: number, poly: number): number {
  let r = 0;
  for (; b !== 0; b >>>= 1) {
    if (b & 1) r ^= a;
    a <<= 1;
    if (a & (1 << m)) a ^= poly;
  }
  return r;
}

// Multiplicative order of x modulo p(x) by repeated multiplication; 0 if x never returns to 1.
function plainOrderOfX(m: number, poly: number): number {
  let e = plainMul(1, 2, m, poly);
  for (let i = 1; i <= 1 << m; i++, e = plainMul(e, 2, m, poly)) if (e === 1) return i;
  return 0;
}

function inputError(fn: () => unknown): InputError {
  try {
    fn();
  } catch (e) {
    if (e instanceof InputError) return e;
    throw e;
  }
  throw new Error("expected an InputError");
}

const ms = Array.from({ length: MAX_M - MIN_M + 1 }, (_, i) => MIN_M + i);
const smallM = fc.integer({ min: MIN_M, max: MAX_M });
// m and three raw integers, reduced to elements (any, or nonzero) of GF(2^m).
const fieldAndElements = (nonzero = false) =>
  fc.tuple(smallM, fc.nat(), fc.nat(), fc.nat()).map(([m, ...raw]) => {
    const q = 1 << m;
    const [a, b, c] = raw.map((v) => (nonzero ? 1 + (v % (q - 1)) : v % q)) as [number, number, number];
    return [m, a, b, c] as const;
  });

describe("default primitive polynomials", () => {
  it("are the table the brief lists for m = 2..16 (Lin & Costello 2004, table of primitive polynomials, from memory)", () => {
    expect(DEFAULT_PRIMITIVE_POLYNOMIALS).toEqual({
      2: 0x7, 3: 0xb, 4: 0x13, 5: 0x25, 6: 0x43, 7: 0x89, 8: 0x11d, 9: 0x211, 10: 0x409,
      11: 0x805, 12: 0x1053, 13: 0x201b, 14: 0x4443, 15: 0x8003, 16: 0x1100b,
    });
  });

  it.each(ms)("m = %i: x has order 2^m − 1 modulo the default polynomial (definition of primitive, by independent repeated multiplication)", (m) => {
    const poly = DEFAULT_PRIMITIVE_POLYNOMIALS[m]!;
    expect(31 - Math.clz32(poly)).toBe(m);
    expect(plainOrderOfX(m, poly)).toBe((1 << m) - 1);
    const f = galoisField(m);
    expect(f.poly).toBe(poly);
    expect(f.generator).toBe(2);
    expect(f.size).toBe(1 << m);
    expect(f.order).toBe((1 << m) - 1);
  });

  it("the m = 8 field has α^8 = α^4 + α^3 + α^2 + 1 = 0x1D (definition of 0x11D)", () => {
    expect(galoisField(8).exp(8)).toBe(0x1d);
  });
});

describe("field axioms (fast-check, any m from 2 to 16)", () => {
  it("multiplication agrees with independent shift-and-add multiplication", () => {
    fc.assert(
      fc.property(fieldAndElements(), ([m, a, b]) => {
        const f = galoisField(m);
        expect(f.mul(a, b)).toBe(plainMul(a, b, m, f.poly));
      }),
    );
  });

  it("associativity and commutativity of + and ·, distributivity", () => {
    fc.assert(
      fc.property(fieldAndElements(), ([m, a, b, c]) => {
        const f = galoisField(m);
        expect(f.mul(f.mul(a, b), c)).toBe(f.mul(a, f.mul(b, c)));
        expect(f.mul(a, b)).toBe(f.mul(b, a));
        expect(f.add(f.add(a, b), c)).toBe(f.add(a, f.add(b, c)));
        expect(f.mul(a, f.add(b, c))).toBe(f.add(f.mul(a, b), f.mul(a, c)));
        expect(f.add(a, a)).toBe(0);
        expect(f.mul(a, 1)).toBe(a);
        expect(f.mul(a, 0)).toBe(0);
      }),
    );
  });

  it("a·a^(−1) = 1 and (a·b)/b = a for nonzero a, b", () => {
    fc.assert(
      fc.property(fieldAndElements(true), ([m, a, b]) => {
        const f = galoisField(m);
        expect(f.mul(a, f.inv(a))).toBe(1);
        expect(f.div(f.mul(a, b), b)).toBe(a);
        expect(f.div(0, b)).toBe(0);
      }),
    );
  });

  it("α^(2^m − 1) = 1, a^(2^m − 1) = 1 for a ≠ 0, and pow agrees with repeated multiplication", () => {
    fc.assert(
      fc.property(fieldAndElements(true), fc.integer({ min: -40, max: 40 }), ([m, a], e) => {
        const f = galoisField(m);
        expect(f.exp(f.order)).toBe(1);
        expect(f.pow(a, f.order)).toBe(1);
        let r = 1;
        const base = e >= 0 ? a : f.inv(a);
        for (let i = 0; i < Math.abs(e); i++) r = f.mul(r, base);
        expect(f.pow(a, e)).toBe(r);
      }),
    );
  });

  it("log and exp are inverse bijections", () => {
    fc.assert(
      fc.property(fieldAndElements(true), fc.integer({ min: -1000, max: 1000 }), ([m, a], i) => {
        const f = galoisField(m);
        expect(f.exp(f.log(a))).toBe(a);
        const l = f.log(f.exp(i));
        expect(l).toBe(((i % f.order) + f.order) % f.order);
      }),
    );
  });

  it("0^0 = 1, 0^e = 0 for e > 0", () => {
    const f = galoisField(5);
    expect(f.pow(0, 0)).toBe(1);
    expect(f.pow(0, 3)).toBe(0);
  });
});

describe("another primitive element as the base of the tables", () => {
  it("β = α^7 in GF(2^8): exp lists the powers of β and products are unchanged (gcd(7, 255) = 1)", () => {
    const base = galoisField(8);
    const beta = base.exp(7);
    const f = galoisField(8, 0x11d, beta);
    expect(f.generator).toBe(beta);
    let e = 1;
    for (let i = 0; i < 300; i++, e = plainMul(e, beta, 8, 0x11d)) expect(f.exp(i)).toBe(e);
    for (let a = 0; a < 256; a += 17) for (let b = 0; b < 256; b += 13) expect(f.mul(a, b)).toBe(base.mul(a, b));
  });

  it("β = α^5 has order 255/gcd(5, 255) = 51 and is rejected", () => {
    const beta = galoisField(8).exp(5);
    const e = inputError(() => galoisField(8, 0x11d, beta));
    expect(e.path).toEqual(["primitiveElement"]);
    expect(e.message).toBe(`primitiveElement 0x${beta.toString(16).toUpperCase()} has order 51, not 2^8 − 1 = 255; it is not primitive`);
  });

  it("0, 1 and out-of-range elements are rejected", () => {
    expect(inputError(() => galoisField(4, undefined, 0)).message).toMatch(/nonzero element of GF\(2\^4\), 1 to 15; got 0/);
    expect(inputError(() => galoisField(4, undefined, 16)).message).toMatch(/got 16/);
    expect(inputError(() => galoisField(4, undefined, 1)).message).toMatch(/has order 1, not 2\^4 − 1 = 15/);
  });
});

describe("user-supplied polynomials", () => {
  it("0x11B, the AES polynomial (FIPS 197), is irreducible but not primitive: x has order 51 (order by independent repeated multiplication)", () => {
    expect(plainOrderOfX(8, 0x11b)).toBe(51);
    const e = inputError(() => galoisField(8, 0x11b));
    expect(e.path).toEqual(["primitivePoly"]);
    expect(e.message).toBe("0x11B (x^8 + x^4 + x^3 + x + 1) is irreducible but not primitive: x has order 51, not 2^8 − 1 = 255");
  });

  it("x^4 + x^3 + x^2 + x + 1 divides x^5 − 1, so x has order 5: irreducible, not primitive (Lin & Costello 2004, ch. 2, from memory)", () => {
    expect(inputError(() => galoisField(4, 0x1f)).message).toMatch(/0x1F .* is irreducible but not primitive: x has order 5, not 2\^4 − 1 = 15/);
  });

  it("reducible polynomials name a factor: an even number of terms gives x + 1; no constant term gives x", () => {
    expect(inputError(() => galoisField(8, 0x11f)).message).toBe(
      "0x11F (x^8 + x^4 + x^3 + x^2 + x + 1) is reducible: x + 1 divides it; GF(2^8) needs a primitive polynomial",
    );
    expect(inputError(() => galoisField(8, 0x100)).message).toMatch(/is reducible: x divides it/);
    // (x^2 + x + 1)² = x^4 + x^2 + 1
    expect(inputError(() => galoisField(4, 0x15)).message).toMatch(/is reducible: x\^2 \+ x \+ 1 divides it/);
  });

  it("another primitive polynomial is accepted: x^8 + x^7 + x^2 + x + 1 (0x187, CCSDS 131.0-B field, from memory; checked by independent order)", () => {
    expect(plainOrderOfX(8, 0x187)).toBe(255);
    const f = galoisField(8, 0x187);
    expect(f.exp(8)).toBe(0x87);
  });

  it("wrong degree or not a positive integer", () => {
    const e = inputError(() => galoisField(8, 0x1d));
    expect(e.path).toEqual(["primitivePoly"]);
    expect(e.message).toBe("primitivePoly 0x1D has degree 4; GF(2^8) needs a polynomial of degree 8");
    expect(inputError(() => galoisField(8, 0x211)).message).toMatch(/has degree 9/);
    expect(inputError(() => galoisField(8, 0)).message).toMatch(/must be a positive integer/);
    expect(inputError(() => galoisField(8, 285.5)).message).toMatch(/must be a positive integer/);
    expect(inputError(() => galoisField(8, 2 ** 40)).message).toMatch(/has degree 40/);
  });
});

describe("errors and caching", () => {
  it("m out of range", () => {
    for (const m of [1, 17, 2.5, Number.NaN]) {
      const e = inputError(() => galoisField(m));
      expect(e.path).toEqual(["m"]);
      expect(e.message).toBe(`m must be an integer from 2 to 16; got ${m}`);
    }
  });

  it("0 has no inverse or logarithm; division by 0", () => {
    const f = galoisField(4);
    expect(inputError(() => f.inv(0)).message).toMatch(/no inverse/);
    expect(inputError(() => f.div(3, 0)).message).toMatch(/division by 0/);
    expect(inputError(() => f.log(0)).message).toMatch(/no logarithm/);
    expect(inputError(() => f.pow(0, -1)).message).toMatch(/no inverse/);
    expect(inputError(() => f.pow(3, 0.5)).message).toMatch(/integer/);
  });

  it("fields are cached by (m, polynomial, generator)", () => {
    expect(galoisField(8)).toBe(galoisField(8, 0x11d));
    expect(galoisField(8, 0x11d, 2)).toBe(galoisField(8));
    expect(galoisField(8, 0x187)).not.toBe(galoisField(8));
  });
});
