import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { InputError } from "@/lib/core/errors";
import { galoisField } from "@/lib/core/gfpm";
import * as poly2 from "@/lib/core/poly2";
import * as polym from "@/lib/core/polym";

const bin = (s: string) => BigInt("0b" + s);
const p2 = fc.bigInt({ min: 0n, max: (1n << 80n) - 1n });
const p2nonzero = fc.bigInt({ min: 1n, max: (1n << 40n) - 1n });

describe("polynomials over GF(2) (bigint, bit i = coefficient of x^i)", () => {
  it("degree, exponents and format", () => {
    expect(poly2.degree(0n)).toBe(-1);
    expect(poly2.degree(1n)).toBe(0);
    expect(poly2.degree(0o721n)).toBe(8);
    expect(poly2.exponents(0o721n)).toEqual([8, 7, 6, 4, 0]);
    expect(poly2.exponents(0n)).toEqual([]);
    expect(poly2.format(0x11bn)).toBe("x^8 + x^4 + x^3 + x + 1");
    expect(poly2.format(0n)).toBe("0");
    expect(poly2.format(2n)).toBe("x");
  });

  it("(x + 1)(x^2 + x + 1) = x^3 + 1 (x^3 − 1 factorisation, Lin & Costello 2004, ch. 2)", () => {
    expect(poly2.mul(0b11n, 0b111n)).toBe(0b1001n);
    expect(poly2.mul(0n, 0b111n)).toBe(0n);
  });

  it("division: a = q·b + r with deg r < deg b (fast-check)", () => {
    fc.assert(
      fc.property(p2, p2nonzero, (a, b) => {
        const { quotient, remainder } = poly2.divmod(a, b);
        expect(poly2.mul(quotient, b) ^ remainder).toBe(a);
        expect(poly2.degree(remainder)).toBeLessThan(poly2.degree(b));
      }),
    );
    expect(() => poly2.divmod(5n, 0n)).toThrow(InputError);
  });

  it("multiplication is commutative and distributes over + (XOR) (fast-check)", () => {
    fc.assert(
      fc.property(p2, p2, p2, (a, b, c) => {
        expect(poly2.mul(a, b)).toBe(poly2.mul(b, a));
        expect(poly2.mul(a, b ^ c)).toBe(poly2.mul(a, b) ^ poly2.mul(a, c));
        expect(poly2.degree(poly2.mul(a, b))).toBe(a === 0n || b === 0n ? -1 : poly2.degree(a) + poly2.degree(b));
      }),
    );
  });

  it("gcd divides both and gcd(a·c, b·c) is a multiple of c (fast-check)", () => {
    fc.assert(
      fc.property(p2nonzero, p2nonzero, p2nonzero, (a, b, c) => {
        const g = poly2.gcd(poly2.mul(a, c), poly2.mul(b, c));
        expect(poly2.divmod(poly2.mul(a, c), g).remainder).toBe(0n);
        expect(poly2.divmod(poly2.mul(b, c), g).remainder).toBe(0n);
        expect(poly2.divmod(g, c).remainder).toBe(0n);
      }),
    );
    expect(poly2.gcd(0n, 0n)).toBe(0n);
    expect(poly2.gcd(0b1001n, 0b110n)).toBe(0b11n);
  });

  it("formal derivative: (x^5 + x^4 + x)' = x^4 + 1, and the product rule (fast-check)", () => {
    expect(poly2.derivative(bin("110010"))).toBe(bin("10001"));
    expect(poly2.derivative(1n)).toBe(0n);
    fc.assert(
      fc.property(p2, p2, (a, b) => {
        expect(poly2.derivative(poly2.mul(a, b))).toBe(poly2.mul(poly2.derivative(a), b) ^ poly2.mul(a, poly2.derivative(b)));
      }),
    );
  });

  it("evaluation at a field element is a ring homomorphism (fast-check)", () => {
    const f = galoisField(8);
    fc.assert(
      fc.property(p2, p2, fc.integer({ min: 0, max: 255 }), (a, b, x) => {
        expect(poly2.evaluate(f, poly2.mul(a, b), x)).toBe(f.mul(poly2.evaluate(f, a, x), poly2.evaluate(f, b, x)));
        expect(poly2.evaluate(f, a ^ b, x)).toBe(poly2.evaluate(f, a, x) ^ poly2.evaluate(f, b, x));
      }),
    );
    expect(poly2.evaluate(f, 0x11dn, 2)).toBe(0);
  });

  it("smallestFactor finds a least-degree factor or reports irreducible", () => {
    expect(poly2.smallestFactor(0x13n)).toBeUndefined();
    expect(poly2.smallestFactor(poly2.mul(0x13n, 0x19n))).toBe(0x13n);
    expect(poly2.smallestFactor(poly2.mul(0x25n, 0b111n))).toBe(0b111n);
    expect(poly2.smallestFactor(0b110n)).toBe(0b10n);
  });
});

describe("cyclotomic cosets and minimal polynomials", () => {
  it("cosets modulo 15: {0} {1,2,4,8} {3,6,9,12} {5,10} {7,11,13,14} (Lin & Costello 2004, ch. 2, from memory; re-derived from s·2^j below)", () => {
    expect(poly2.cyclotomicCoset(0, 4)).toEqual([0]);
    expect(poly2.cyclotomicCoset(1, 4)).toEqual([1, 2, 4, 8]);
    expect(poly2.cyclotomicCoset(3, 4)).toEqual([3, 6, 9, 12]);
    expect(poly2.cyclotomicCoset(5, 4)).toEqual([5, 10]);
    expect(poly2.cyclotomicCoset(7, 4)).toEqual([7, 11, 13, 14]);
    expect(poly2.cyclotomicCoset(22, 4)).toEqual([7, 11, 13, 14]);
    for (let s = 0; s < 15; s++) {
      const direct = new Set<number>();
      for (let j = 0; j < 4; j++) direct.add((s * 2 ** j) % 15);
      expect(poly2.cyclotomicCoset(s, 4)).toEqual([...direct].sort((a, b) => a - b));
    }
  });

  it("GF(16) from x^4 + x + 1: m1 = x^4+x+1, m3 = x^4+x^3+x^2+x+1, m5 = x^2+x+1, m7 = x^4+x^3+1 (Lin & Costello 2004, ch. 2 table, from memory)", () => {
    const f = galoisField(4);
    expect(poly2.minimalPolynomial(f, 0)).toBe(0b11n);
    expect(poly2.minimalPolynomial(f, 1)).toBe(0x13n);
    expect(poly2.minimalPolynomial(f, 3)).toBe(0x1fn);
    expect(poly2.minimalPolynomial(f, 5)).toBe(0b111n);
    expect(poly2.minimalPolynomial(f, 7)).toBe(0x19n);
    expect(poly2.minimalPolynomial(f, 14)).toBe(0x19n);
  });

  it.each([3, 4, 5, 6, 7, 8, 9, 10])(
    "m = %i: each minimal polynomial is irreducible, has α^s as a root, and their product over the cosets is x^(2^m−1) − 1 (MacWilliams & Sloane 1977, ch. 4)",
    (m) => {
      const f = galoisField(m);
      const seen = new Set<number>();
      let product = 1n;
      for (let s = 0; s < f.order; s++) {
        if (seen.has(s)) continue;
        const coset = poly2.cyclotomicCoset(s, m);
        coset.forEach((e) => seen.add(e));
        const mp = poly2.minimalPolynomial(f, s);
        expect(poly2.degree(mp)).toBe(coset.length);
        expect(poly2.evaluate(f, mp, f.exp(s))).toBe(0);
        if (m <= 8) expect(poly2.smallestFactor(mp)).toBeUndefined();
        product = poly2.mul(product, mp);
      }
      expect(product).toBe((1n << BigInt(f.order)) | 1n);
    },
  );
});

describe("polynomials over GF(2^m) (Uint16Array, p[i] = coefficient of x^i)", () => {
  const field = fc.integer({ min: 2, max: 10 }).map((m) => galoisField(m));
  const polyIn = (q: number, maxLength = 12) => fc.array(fc.integer({ min: 0, max: q - 1 }), { maxLength }).map((a) => Uint16Array.from(a));
  const withPolys = () => field.chain((f) => fc.tuple(fc.constant(f), polyIn(f.size), polyIn(f.size), polyIn(f.size)));
  const add = (a: polym.PolyM, b: polym.PolyM) => {
    const r = new Uint16Array(Math.max(a.length, b.length));
    r.set(a);
    b.forEach((v, i) => (r[i]! ^= v));
    return polym.trim(r);
  };

  it("degree and trim", () => {
    expect(polym.degree(Uint16Array.of(1, 0, 3, 0, 0))).toBe(2);
    expect(polym.degree(Uint16Array.of(0, 0))).toBe(-1);
    expect(polym.trim(Uint16Array.of(1, 0, 3, 0, 0))).toEqual(Uint16Array.of(1, 0, 3));
  });

  it("division: a = q·b + r with deg r < deg b (fast-check)", () => {
    fc.assert(
      fc.property(withPolys(), ([f, a, b]) => {
        fc.pre(polym.degree(b) >= 0);
        const { quotient, remainder } = polym.divmod(f, a, b);
        expect(add(polym.mul(f, quotient, b), remainder)).toEqual(polym.trim(a));
        expect(polym.degree(remainder)).toBeLessThan(polym.degree(b));
      }),
    );
    expect(() => polym.divmod(galoisField(4), Uint16Array.of(1), Uint16Array.of(0))).toThrow(InputError);
  });

  it("evaluation is a ring homomorphism and the formal derivative obeys the product rule (fast-check)", () => {
    fc.assert(
      fc.property(withPolys(), fc.nat(), ([f, a, b], xs) => {
        const x = xs % f.size;
        expect(polym.evaluate(f, polym.mul(f, a, b), x)).toBe(f.mul(polym.evaluate(f, a, x), polym.evaluate(f, b, x)));
        expect(polym.evaluate(f, add(a, b), x)).toBe(polym.evaluate(f, a, x) ^ polym.evaluate(f, b, x));
        const lhs = polym.trim(polym.derivative(polym.mul(f, a, b)));
        expect(lhs).toEqual(add(polym.mul(f, polym.derivative(a), b), polym.mul(f, a, polym.derivative(b))));
      }),
    );
  });

  it("gcd is monic, divides both, and recovers a common factor (fast-check)", () => {
    fc.assert(
      fc.property(withPolys(), ([f, a, b, c]) => {
        fc.pre(polym.degree(c) >= 0 && (polym.degree(a) >= 0 || polym.degree(b) >= 0));
        const ac = polym.mul(f, a, c);
        const bc = polym.mul(f, b, c);
        const g = polym.gcd(f, ac, bc);
        expect(g[g.length - 1]).toBe(1);
        if (polym.degree(ac) >= 0) expect(polym.divmod(f, ac, g).remainder.length).toBe(0);
        if (polym.degree(bc) >= 0) expect(polym.divmod(f, bc, g).remainder.length).toBe(0);
        expect(polym.divmod(f, g, c).remainder.length).toBe(0);
      }),
    );
    expect(polym.gcd(galoisField(3), new Uint16Array(0), new Uint16Array(2)).length).toBe(0);
  });

  // Λ(x) = ∏ (1 − X_l x) for distinct X_l = β^(p_l), and S_j = Σ Y_l X_l^(b+j): the sequence Λ must generate.
  const locatorCase = fc
    .integer({ min: 3, max: 9 })
    .chain((m) =>
      fc.record({
        m: fc.constant(m),
        positions: fc.uniqueArray(fc.integer({ min: 0, max: (1 << m) - 2 }), { minLength: 1, maxLength: 8 }),
        values: fc.array(fc.integer({ min: 1, max: (1 << m) - 1 }), { minLength: 8, maxLength: 8 }),
        b: fc.integer({ min: 0, max: (1 << m) - 2 }),
        extra: fc.integer({ min: 0, max: 4 }),
      }),
    );

  it("Berlekamp–Massey recovers ∏ (1 − X_l x) from 2ν syndromes of ν errors, and Chien search finds the p_l (fast-check; Lin & Costello 2004, ch. 7)", () => {
    fc.assert(
      fc.property(locatorCase, ({ m, positions, values, b, extra }) => {
        const f = galoisField(m);
        const nu = positions.length;
        const s = new Uint16Array(2 * nu + extra);
        for (let j = 0; j < s.length; j++) positions.forEach((p, l) => (s[j]! ^= f.mul(values[l]!, f.exp(p * (b + j)))));
        let expected: polym.PolyM = Uint16Array.of(1);
        for (const p of positions) expected = polym.mul(f, expected, Uint16Array.of(1, f.exp(p)));
        const { locator, length } = polym.berlekampMassey(f, s);
        expect(length).toBe(nu);
        expect(locator).toEqual(polym.trim(expected));
        expect(polym.chienSearch(f, locator, f.order)).toEqual([...positions].sort((x, y) => x - y));
      }),
    );
  });

  it("Berlekamp–Massey started from an erasure locator Γ returns Γ·σ (fast-check)", () => {
    fc.assert(
      fc.property(locatorCase, fc.integer({ min: 0, max: 8 }), ({ m, positions, values, b }, split) => {
        const f = galoisField(m);
        const rho = Math.min(split, positions.length);
        const erased = positions.slice(0, rho);
        const nu = positions.length - rho;
        const s = new Uint16Array(2 * nu + rho);
        for (let j = 0; j < s.length; j++) positions.forEach((p, l) => (s[j]! ^= f.mul(values[l]!, f.exp(p * (b + j)))));
        let gamma: polym.PolyM = Uint16Array.of(1);
        for (const p of erased) gamma = polym.mul(f, gamma, Uint16Array.of(1, f.exp(p)));
        let expected: polym.PolyM = Uint16Array.of(1);
        for (const p of positions) expected = polym.mul(f, expected, Uint16Array.of(1, f.exp(p)));
        const { locator, length } = polym.berlekampMassey(f, s, gamma);
        expect(length).toBe(positions.length);
        expect(locator).toEqual(polym.trim(expected));
      }),
    );
    expect(() => polym.berlekampMassey(galoisField(4), new Uint16Array(2), Uint16Array.of(1, 1, 1, 1))).toThrow(/degree at most 2/);
  });

  it("Chien search stops at n and finds nothing for a locator without roots among the first n powers", () => {
    const f = galoisField(4);
    // Λ = 1 + α^3 x has its root at x = α^(−3): exponent p = 3.
    expect(polym.chienSearch(f, Uint16Array.of(1, f.exp(3)), 15)).toEqual([3]);
    expect(polym.chienSearch(f, Uint16Array.of(1, f.exp(3)), 3)).toEqual([]);
    // x^2 + x + 1 has its roots in GF(4) ⊂ GF(16): α^5, α^10.
    expect(polym.chienSearch(f, Uint16Array.of(1, 1, 1), 15)).toEqual([5, 10]);
    // Any locator: the same roots as evaluating at every α^(−p).
    const p = Uint16Array.of(f.exp(1), 1, 1);
    const brute = Array.from({ length: 15 }, (_, i) => i).filter((i) => polym.evaluate(f, p, f.exp(-i)) === 0);
    expect(polym.chienSearch(f, p, 15)).toEqual(brute);
  });
});
