import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { type BchCode, bch } from "@/lib/core/codes/bch";
import { InputError } from "@/lib/core/errors";
import { DEFAULT_PRIMITIVE_POLYNOMIALS } from "@/lib/core/gfpm";
import * as poly2 from "@/lib/core/poly2";
import { rng } from "../helpers/rng";

// ---- Independent construction, written here with plain arithmetic (no lib/core/gfpm, poly2 or polym) ----

function plainMul(a: number, b: number, m: number, poly: number): number {
  let r = 0;
  for (; b !== 0; b >>>= 1) {
    if (b & 1) r ^= a;
    a <<= 1;
    if (a & (1 << m)) a ^= poly;
  }
  return r;
}

/** g(x) = ∏ (x − α^j) over j in the union of the cyclotomic cosets of 1..2t, as an octal string. */
function independentGenerator(m: number, t: number): string {
  const order = 2 ** m - 1;
  const poly = DEFAULT_PRIMITIVE_POLYNOMIALS[m]!;
  const roots = new Set<number>();
  for (let i = 1; i <= 2 * t; i++) for (let e = i % order; !roots.has(e); e = (e * 2) % order) roots.add(e);
  const alpha = [1];
  for (let i = 1; i < order; i++) alpha.push(plainMul(alpha[i - 1]!, 2, m, poly));
  let g = [1]; // lowest power first, coefficients in GF(2^m)
  for (const j of roots) {
    const next = [0, ...g];
    for (let i = 0; i < g.length; i++) next[i]! ^= plainMul(g[i]!, alpha[j]!, m, poly);
    g = next;
  }
  expect(g.every((c) => c === 0 || c === 1)).toBe(true);
  let v = 0n;
  for (let i = g.length - 1; i >= 0; i--) v = (v << 1n) | BigInt(g[i]!);
  return v.toString(8);
}

function randomBits(next: () => number, length: number): Uint8Array {
  return Uint8Array.from({ length }, () => (next() < 0.5 ? 1 : 0));
}

function distinctPositions(next: () => number, n: number, count: number): number[] {
  const all = Array.from({ length: n }, (_, i) => i);
  for (let i = 0; i < count; i++) {
    const j = i + Math.floor(next() * (n - i));
    [all[i], all[j]] = [all[j]!, all[i]!];
  }
  return all.slice(0, count).sort((a, b) => a - b);
}

function flip(word: Uint8Array, positions: number[]): Uint8Array {
  const w = word.slice();
  for (const i of positions) w[i]! ^= 1;
  return w;
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

// A systematic word is a codeword iff it equals the encoding of its message part.
const isCodeword = (code: BchCode, w: Uint8Array) => Buffer.from(code.encode(w.slice(0, code.k))).equals(Buffer.from(w));

// ---- Generator polynomials ----

// [m, t, n, k, octal, source]
const TABLE: [number, number, number, number, string, string][] = [
  [4, 2, 15, 7, "721", "REFERENCES.md: Lin & Costello 2004, BCH table (from memory)"],
  [4, 3, 15, 5, "2467", "REFERENCES.md: Lin & Costello 2004, BCH table (from memory)"],
  [5, 2, 31, 21, "3551", "REFERENCES.md: Lin & Costello 2004, BCH table (from memory)"],
  [4, 1, 15, 11, "23", "Lin & Costello 2004, BCH table (from memory)"],
  [5, 1, 31, 26, "45", "Lin & Costello 2004, BCH table (from memory)"],
  [5, 3, 31, 16, "107657", "Lin & Costello 2004, BCH table (from memory)"],
  [5, 5, 31, 11, "5423325", "Lin & Costello 2004, BCH table (from memory)"],
  [5, 7, 31, 6, "313365047", "Lin & Costello 2004, BCH table (from memory)"],
  [6, 1, 63, 57, "103", "Lin & Costello 2004, BCH table (from memory)"],
  [6, 2, 63, 51, "12471", "Lin & Costello 2004, BCH table (from memory)"],
  [6, 3, 63, 45, "1701317", "Lin & Costello 2004, BCH table (from memory)"],
  [7, 1, 127, 120, "211", "Lin & Costello 2004, BCH table (from memory)"],
  [7, 2, 127, 113, "41567", "Lin & Costello 2004, BCH table (from memory)"],
  [8, 1, 255, 247, "435", "Lin & Costello 2004, BCH table (from memory)"],
  [8, 2, 255, 239, "267543", "Lin & Costello 2004, BCH table (from memory)"],
  [8, 3, 255, 231, "156720665", "Lin & Costello 2004, BCH table (from memory)"],
];

describe("generator polynomials", () => {
  it.each(TABLE)("m = %i, t = %i: BCH (%i,%i) has g = %s octal (%s), and the independent product ∏(x − α^j) agrees", (m, t, n, k, octal) => {
    const code = bch({ m, t });
    expect(code.n).toBe(n);
    expect(code.k).toBe(k);
    expect(code.generatorOctal).toBe(octal);
    expect(independentGenerator(m, t)).toBe(octal);
    expect(code.generator).toBe(BigInt("0o" + octal));
  });

  it("BCH (15,7): g = x^8 + x^7 + x^6 + x^4 + 1 (REFERENCES.md: Lin & Costello 2004, from memory)", () => {
    expect(bch({ m: 4, t: 2 }).generatorExponents).toEqual([8, 7, 6, 4, 0]);
  });

  it.each([
    [6, 4],
    [7, 3],
    [8, 4],
    [9, 3],
    [10, 5],
  ])("m = %i, t = %i: the generator equals the independent product over the cyclotomic cosets", (m, t) => {
    expect(bch({ m, t }).generatorOctal).toBe(independentGenerator(m, t));
  });

  it("g(x) divides x^n − 1 (cyclic code; Lin & Costello 2004, ch. 5)", () => {
    for (const [m, t] of [[4, 2], [5, 3], [8, 2], [10, 7]] as const) {
      const code = bch({ m, t });
      const full = 2 ** m - 1;
      expect(poly2.divmod((1n << BigInt(full)) | 1n, code.generator).remainder).toBe(0n);
    }
  });
});

describe("parameters", () => {
  it("BCH (15,7): designed distance 5 is the Bose distance, t = 2, systematic positions 0..6", () => {
    const code = bch({ m: 4, t: 2 });
    expect(code).toMatchObject({ family: "bch", name: "BCH (15,7)", n: 15, k: 7, q: 2, t: 2, dmin: 5, dminIsDesigned: true, designedDistance: 5, m: 4, primitivePoly: 0x13, shorten: 0 });
    expect(code.messagePositions).toEqual([0, 1, 2, 3, 4, 5, 6]);
    expect(code.supportsErasures).toBe(false);
    expect(code.bitOrder).toMatch(/Bit 0 is the coefficient of x\^\(n−1\)/);
  });

  it("m = 5, t = 4 gives the same code as t = 5: α^9 is a conjugate of α^5, so the Bose distance is 11 and the decoder corrects 5", () => {
    const code = bch({ m: 5, t: 4 });
    expect(code.generatorOctal).toBe(bch({ m: 5, t: 5 }).generatorOctal);
    expect(code).toMatchObject({ n: 31, k: 11, t: 5, dmin: 11, designedDistance: 9 });
    const next = rng(7);
    const msg = randomBits(next, 11);
    const errors = [0, 6, 13, 22, 30];
    const d = code.decode(flip(code.encode(msg), errors));
    expect(d.failure).toBe(false);
    expect(d.message).toEqual(msg);
    expect(d.correctedPositions).toEqual(errors);
  });

  it("m = 2, t = 1 is the (3,1) repetition code; the largest t for m = 4 is 7, the (15,1) repetition code", () => {
    const c3 = bch({ m: 2, t: 1 });
    expect([c3.n, c3.k, c3.dmin]).toEqual([3, 1, 3]);
    expect(c3.encode(Uint8Array.of(1))).toEqual(Uint8Array.of(1, 1, 1));
    const c15 = bch({ m: 4, t: 7 });
    expect([c15.n, c15.k, c15.dmin, c15.t]).toEqual([15, 1, 15, 7]);
    expect(c15.encode(Uint8Array.of(1))).toEqual(new Uint8Array(15).fill(1));
  });

  it("a custom primitive polynomial: m = 4 with x^4 + x^3 + 1 gives the reciprocal generator for t = 1", () => {
    const code = bch({ m: 4, t: 1, primitivePoly: 0x19 });
    expect(code.generatorOctal).toBe("31");
    expect(code.primitivePoly).toBe(0x19);
  });
});

describe("encoding", () => {
  it("c = m followed by x^(n−k)·m(x) mod g(x), checked by bigint long division (Lin & Costello 2004, ch. 5)", () => {
    const next = rng(1);
    for (const [m, t, shorten] of [[4, 2, 0], [5, 3, 4], [8, 2, 0], [8, 2, 100], [10, 3, 17], [11, 40, 0], [2, 1, 0]] as const) {
      const code = bch({ m, t, shorten });
      const r = code.n - code.k;
      for (let trial = 0; trial < 5; trial++) {
        const msg = randomBits(next, code.k);
        let mx = 0n;
        for (const b of msg) mx = (mx << 1n) | BigInt(b);
        const parity = poly2.divmod(mx << BigInt(r), code.generator).remainder;
        const expected = Array.from(msg);
        for (let j = r - 1; j >= 0; j--) expected.push(Number((parity >> BigInt(j)) & 1n));
        expect(Array.from(code.encode(msg))).toEqual(expected);
      }
    }
  });

  it("a shortened code drops the leading zero message bits of the full code", () => {
    const full = bch({ m: 4, t: 2 });
    const short = bch({ m: 4, t: 2, shorten: 2 });
    expect([short.n, short.k, short.name]).toEqual([13, 5, "BCH (13,5)"]);
    const msg = Uint8Array.of(1, 0, 1, 1, 0);
    expect(short.encode(msg)).toEqual(full.encode(Uint8Array.of(0, 0, ...msg)).slice(2));
  });

  it("generatorRows is offered while k·n ≤ MAX_GENERATOR_ENTRIES", () => {
    expect(bch({ m: 11, t: 2 }).generatorRows).toBeDefined();
    expect(bch({ m: 12, t: 2 }).generatorRows).toBeUndefined();
    expect(bch({ m: 12, t: 2, shorten: 3000 }).generatorRows).toBeDefined();
  });

  it("generatorRows: row i is the encoding of the unit message e_i, and the rows span the code", () => {
    for (const [m, t, shorten] of [[4, 2, 0], [6, 3, 5], [9, 2, 0]] as const) {
      const code = bch({ m, t, shorten });
      const rows = code.generatorRows!();
      expect(rows.length).toBe(code.k);
      rows.forEach((row, i) => {
        const unit = new Uint8Array(code.k);
        unit[i] = 1;
        expect(row).toEqual(code.encode(unit));
      });
      const next = rng(m);
      const msg = randomBits(next, code.k);
      const sum = new Uint8Array(code.n);
      msg.forEach((b, i) => b && rows[i]!.forEach((v, j) => (sum[j]! ^= v)));
      expect(sum).toEqual(code.encode(msg));
    }
  });
});

describe("decoding", () => {
  it.each([
    [4, 2],
    [4, 3],
    [5, 2],
  ])("m = %i, t = %i: every error pattern of weight ≤ t is corrected (exhaustive, bounded-distance decoding)", (m, t) => {
    const code = bch({ m, t });
    const next = rng(m * 10 + t);
    const patterns: number[][] = [[]];
    for (let w = 1; w <= t; w++) {
      const extend = (start: number, acc: number[]) => {
        if (acc.length === w) return void patterns.push(acc);
        for (let i = start; i < code.n; i++) extend(i + 1, [...acc, i]);
      };
      extend(0, []);
    }
    for (let trial = 0; trial < 3; trial++) {
      const msg = randomBits(next, code.k);
      const cw = code.encode(msg);
      for (const e of patterns) {
        const d = code.decode(flip(cw, e));
        expect(d.failure).toBe(false);
        expect(d.message).toEqual(msg);
        expect(d.codeword).toEqual(cw);
        expect(d.correctedPositions).toEqual(e);
      }
    }
  });

  it("BCH (15,7) with 3 errors: every pattern either fails or lands on another codeword (weight-3 patterns, exhaustive)", () => {
    const code = bch({ m: 4, t: 2 });
    const cw = code.encode(new Uint8Array(7));
    let failures = 0;
    for (let a = 0; a < 15; a++)
      for (let b = a + 1; b < 15; b++)
        for (let c = b + 1; c < 15; c++) {
          const d = code.decode(flip(cw, [a, b, c]));
          if (d.failure) failures++;
          else expect(isCodeword(code, d.codeword as Uint8Array)).toBe(true);
        }
    expect(failures).toBeGreaterThan(0);
  });

  it("a codeword decodes to itself with an all-zero syndrome; a single error has syndrome x^p mod g", () => {
    const code = bch({ m: 4, t: 2 });
    const cw = code.encode(Uint8Array.of(1, 0, 0, 1, 1, 0, 1));
    const d = code.decode(cw);
    expect(d).toMatchObject({ failure: false, correctedPositions: [] });
    expect(d.syndrome).toEqual(new Uint8Array(8));
    // An error in the last bit (x^0) leaves the syndrome 1: 00000001.
    expect(code.decode(flip(cw, [14])).syndrome).toEqual(Uint8Array.of(0, 0, 0, 0, 0, 0, 0, 1));
    // An error at x^8 (bit 6): x^8 mod g = x^7 + x^6 + x^4 + 1.
    expect(code.decode(flip(cw, [6])).syndrome).toEqual(Uint8Array.of(1, 1, 0, 1, 0, 0, 0, 1));
  });

  it("m = 16, t = 1: BCH (65535,65519) corrects a single error (largest field)", () => {
    const code = bch({ m: 16, t: 1 });
    expect([code.n, code.k, code.generatorOctal]).toEqual([65535, 65519, (0x1100b).toString(8)]);
    const msg = randomBits(rng(16), code.k);
    const d = code.decode(flip(code.encode(msg), [40000]));
    expect(d).toMatchObject({ failure: false, correctedPositions: [40000] });
    expect(d.message).toEqual(msg);
  });

  // m from 3 to 10, t up to 24 (below the k ≥ 1 limit), any shortening, and a seed for message and errors.
  const params = fc.record({
    m: fc.integer({ min: 3, max: 10 }),
    t: fc.integer({ min: 1, max: 24 }),
    shorten: fc.nat(),
    seed: fc.integer(),
  });
  const codes = new Map<string, BchCode>();
  function codeFor({ m, t, shorten }: { m: number; t: number; shorten: number }): BchCode {
    const tt = Math.min(t, 2 ** (m - 1) - 1);
    const full = bch({ m, t: tt });
    const s = shorten % full.k;
    const key = `${m}:${tt}:${s}`;
    if (!codes.has(key)) codes.set(key, bch({ m, t: tt, shorten: s }));
    return codes.get(key)!;
  }

  it("property: decode(encode(u) ⊕ e) = u for every error pattern of weight ≤ t; every codeword has zero syndrome (fast-check)", () => {
    fc.assert(
      fc.property(params, (p) => {
        const code = codeFor(p);
        const next = rng(p.seed);
        const msg = randomBits(next, code.k);
        const cw = code.encode(msg);
        const clean = code.decode(cw);
        expect(clean.failure).toBe(false);
        expect(clean.syndrome.every((v) => v === 0)).toBe(true);
        const errors = distinctPositions(next, code.n, Math.floor(next() * (code.t + 1)));
        const d = code.decode(flip(cw, errors));
        expect(d.failure).toBe(false);
        expect(d.message).toEqual(msg);
        expect(d.correctedPositions).toEqual(errors);
        expect(d.syndrome.some((v) => v !== 0)).toBe(errors.length > 0);
      }),
      { numRuns: 200 },
    );
  });

  it("property: more than t errors give failure: true or a codeword (never a non-codeword with failure: false) (fast-check)", () => {
    fc.assert(
      fc.property(params, fc.integer({ min: 1, max: 8 }), (p, extra) => {
        const code = codeFor(p);
        const next = rng(p.seed);
        const msg = randomBits(next, code.k);
        const cw = code.encode(msg);
        const errors = distinctPositions(next, code.n, Math.min(code.n, code.t + extra));
        const d = code.decode(flip(cw, errors));
        if (d.failure) {
          expect(d.reason).toBeTruthy();
          expect(d.correctedPositions).toEqual([]);
          expect(d.codeword).toEqual(flip(cw, errors));
        } else {
          expect(isCodeword(code, d.codeword as Uint8Array)).toBe(true);
          expect(d.correctedPositions.length).toBeLessThanOrEqual(code.t);
          expect(flip(d.codeword as Uint8Array, d.correctedPositions)).toEqual(flip(cw, errors));
        }
      }),
      { numRuns: 300 },
    );
  });

  it("property: on random words the decoder either fails or returns a codeword within t of the word (fast-check)", () => {
    fc.assert(
      fc.property(params, (p) => {
        const code = codeFor(p);
        const word = randomBits(rng(p.seed), code.n);
        const d = code.decode(word);
        if (!d.failure) {
          expect(isCodeword(code, d.codeword as Uint8Array)).toBe(true);
          expect(d.correctedPositions.length).toBeLessThanOrEqual(code.t);
        }
      }),
      { numRuns: 200 },
    );
  });
});

describe("errors", () => {
  it("m out of range", () => {
    for (const m of [1, 17, 3.5]) {
      const e = inputError(() => bch({ m, t: 1 }));
      expect(e.path).toEqual(["m"]);
      expect(e.message).toBe(`m must be an integer from 2 to 16; got ${m}`);
    }
  });

  it("t too big, zero or not an integer", () => {
    const e = inputError(() => bch({ m: 4, t: 8 }));
    expect(e.path).toEqual(["t"]);
    expect(e.message).toBe("t = 8 leaves no message bits (k ≤ 0) in GF(2^4); t can be at most 7");
    expect(inputError(() => bch({ m: 4, t: 0 })).message).toBe("t must be an integer of at least 1; got 0");
    expect(inputError(() => bch({ m: 4, t: 1.5 })).path).toEqual(["t"]);
  });

  it("shorten too big or negative", () => {
    const e = inputError(() => bch({ m: 4, t: 2, shorten: 7 }));
    expect(e.path).toEqual(["shorten"]);
    expect(e.message).toBe("shorten = 7 leaves no message bits: BCH (15,7) can be shortened by at most 6");
    expect(bch({ m: 4, t: 2, shorten: 6 }).k).toBe(1);
    expect(inputError(() => bch({ m: 4, t: 2, shorten: -1 })).path).toEqual(["shorten"]);
  });

  it("a non-primitive field polynomial", () => {
    const e = inputError(() => bch({ m: 8, t: 2, primitivePoly: 0x11b }));
    expect(e.path).toEqual(["primitivePoly"]);
    expect(e.message).toMatch(/irreducible but not primitive: x has order 51/);
  });

  it("wrong lengths, non-binary entries, symbol words, erasures", () => {
    const code = bch({ m: 4, t: 2 });
    const short = inputError(() => code.encode(new Uint8Array(6)));
    expect(short.path).toEqual(["message"]);
    expect(short.message).toBe("message has 6 bits; BCH (15,7) takes 7");
    const long = inputError(() => code.decode(new Uint8Array(16)));
    expect(long.path).toEqual(["received"]);
    expect(long.message).toBe("received has 16 bits; BCH (15,7) takes 15");
    const e = inputError(() => code.encode(Uint8Array.of(0, 1, 2, 0, 0, 0, 0)));
    expect(e.path).toEqual(["message", 2]);
    expect(e.message).toBe("message bit 2 is 2; bits are 0 or 1");
    expect(inputError(() => code.encode(new Uint16Array(7))).message).toBe("message must be bits (0/1); BCH (15,7) is a binary code");
    const er = inputError(() => code.decode(new Uint8Array(15), [3]));
    expect(er.path).toEqual(["erasures"]);
    expect(er.message).toBe("BCH (15,7) decoding does not take erasures");
    expect(code.decode(new Uint8Array(15), []).failure).toBe(false);
  });
});
