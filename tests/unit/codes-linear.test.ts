import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { hamming } from "@/lib/core/codes/hamming";
import { linear } from "@/lib/core/codes/linear";
import { InputError } from "@/lib/core/errors";
import { rank } from "@/lib/core/gf2";

const m = (...rows: string[]) => rows.map((r) => Uint8Array.from(r, Number));
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

/** Independent reference: every codeword m·G with its message, by the definition (sum of the selected rows). */
function codebook(g: Uint8Array[], n: number): { msg: Uint8Array; cw: Uint8Array }[] {
  const out = [];
  for (let mask = 0; mask < 2 ** g.length; mask++) {
    const msg = Uint8Array.from(g, (_, i) => (mask >> i) & 1);
    const cw = new Uint8Array(n);
    g.forEach((row, i) => msg[i] && row.forEach((b, j) => (cw[j]! ^= b)));
    out.push({ msg, cw });
  }
  return out;
}
const dist = (a: Uint8Array, b: Uint8Array) => a.reduce((s, x, i) => s + (x ^ b[i]!), 0);

/** Random full-rank k × n generator (rows drawn at random, kept when independent). */
const generatorArb = (maxK: number, maxN: number) =>
  fc
    .integer({ min: 1, max: maxK })
    .chain((k) => fc.integer({ min: k, max: maxN }).chain((n) => fc.array(fc.uint8Array({ minLength: n, maxLength: n, min: 0, max: 1 }), { minLength: k, maxLength: k }).map((g) => ({ g, n, k }))))
    .filter(({ g, k }) => rank(g) === k);

describe("linear codes from a generator or parity-check matrix", () => {
  it("property: encode is m·G, codewords have zero syndrome, dmin equals the brute-force minimum weight, and ≤ t errors are corrected", () => {
    fc.assert(
      fc.property(generatorArb(7, 14).chain((x) => fc.tuple(fc.constant(x), fc.nat(), fc.array(fc.nat(), { maxLength: 4 }))), ([{ g, n, k }, pick, errSeeds]) => {
        const code = linear({ generator: g });
        const book = codebook(g, n);
        const d = Math.min(...book.slice(1).map(({ cw }) => cw.reduce((a, b) => a + b, 0)));
        expect(code.dmin).toBe(d);
        const t = Math.floor((d - 1) / 2);
        const { msg, cw } = book[pick % book.length]!;
        expect(code.encode(msg)).toEqual(cw);
        expect(code.decode(cw)).toMatchObject({ failure: false, correctedPositions: [], syndrome: new Uint8Array(n - k) });
        const errs = [...new Set(errSeeds.map((s) => s % n))].slice(0, t);
        const received = cw.slice();
        for (const p of errs) received[p]! ^= 1;
        const res = code.decode(received);
        expect(res.failure).toBe(false);
        expect(res.message).toEqual(msg);
        expect(res.correctedPositions).toEqual(errs.sort((a, b) => a - b));
      }),
    );
  });

  it("property: beyond t — unique nearest codeword → decoded to it with failure; a tie → failure, unchanged (brute force over the codebook)", () => {
    fc.assert(
      fc.property(generatorArb(6, 12).chain((x) => fc.tuple(fc.constant(x), fc.uint8Array({ minLength: x.n, maxLength: x.n, min: 0, max: 1 }))), ([{ g, n }, received]) => {
        const code = linear({ generator: g });
        const t = Math.floor((code.dmin! - 1) / 2);
        const book = codebook(g, n);
        const ds = book.map(({ cw }) => dist(cw, received));
        const best = Math.min(...ds);
        const nearest = book.filter((_, i) => ds[i] === best);
        const res = code.decode(received);
        if (best <= t) {
          expect(nearest).toHaveLength(1);
          expect(res).toMatchObject({ failure: false, codeword: nearest[0]!.cw, message: nearest[0]!.msg });
        } else if (nearest.length === 1) {
          expect(res).toMatchObject({ failure: true, codeword: nearest[0]!.cw, message: nearest[0]!.msg });
          expect(res.reason).toMatch(/decoded to it \(maximum likelihood\)/);
        } else {
          expect(res).toMatchObject({ failure: true, codeword: received, correctedPositions: [] });
          expect(res.reason).toMatch(/coset leader is not unique/);
        }
      }),
    );
  });

  it("beyond t by hand: a unique nearest codeword is decoded to with failure; a tie is left alone", () => {
    // Codewords 00000, 11100, 00011, 11111: dmin 2, t = 0. 10000 is at distance 1 from 00000 only.
    const code = linear({ generator: m("11100", "00011") });
    expect(code.decode(bits("10000"))).toMatchObject({ failure: true, codeword: bits("00000"), correctedPositions: [0] });
    // 00001 is at distance 1 from both 00000 and 00011: a tie.
    expect(code.decode(bits("00001"))).toMatchObject({ failure: true, codeword: bits("00001"), correctedPositions: [] });
    // From the (8,4) extended Hamming generator every double error is a tie (SEC-DED semantics).
    const ext = linear({ generator: hamming(3, true).generatorRows!() });
    expect(ext.decode(bits("11000000"))).toMatchObject({ failure: true, correctedPositions: [] });
  });

  it("from the (7,4) Hamming generator it decodes like the Hamming codec", () => {
    const code = linear({ generator: hamming(3).generatorRows!() });
    expect(code).toMatchObject({ n: 7, k: 4, dmin: 3, messagePositions: [0, 1, 2, 3], name: "linear (7,4)" });
    for (let w = 0; w < 128; w++) {
      const word = Uint8Array.from({ length: 7 }, (_, i) => (w >> i) & 1);
      expect(code.decode(word).message).toEqual(hamming(3).decode(word).message);
    }
  });

  it("from a parity-check matrix: H·cᵀ = 0 for every codeword, message bits at the free columns of H", () => {
    // H of the (7,4) Hamming code with columns 1..7 in binary (MacWilliams & Sloane, ch. 1); pivots 0, 1, 3 after reduction.
    const h = m("0001111", "0110011", "1010101");
    const code = linear({ parityCheck: h });
    expect(code).toMatchObject({ n: 7, k: 4, dmin: 3 });
    expect(code.parityCheckRows()).toEqual(h);
    const free = code.messagePositions!;
    expect(free).toHaveLength(4);
    fc.assert(
      fc.property(fc.uint8Array({ minLength: 4, maxLength: 4, min: 0, max: 1 }), fc.integer({ min: 0, max: 6 }), (msg, e) => {
        const cw = code.encode(msg) as Uint8Array;
        for (const row of h) expect(row.reduce((s, x, j) => s + x * cw[j]!, 0) % 2).toBe(0);
        expect(free.map((p) => cw[p])).toEqual(Array.from(msg));
        const r = cw.slice();
        r[e]! ^= 1;
        expect(code.decode(r).message).toEqual(msg);
      }),
    );
  });

  it("edge cases: k = 0 (H = I), k = 1 (repetition generator), k = n (no redundancy)", () => {
    const zero = linear({ parityCheck: m("100", "010", "001") });
    expect(zero).toMatchObject({ n: 3, k: 0 });
    expect(zero.dmin).toBeUndefined();
    expect(zero.encode(new Uint8Array(0))).toEqual(new Uint8Array(3));
    expect(zero.decode(bits("101"))).toMatchObject({ failure: false, codeword: new Uint8Array(3), correctedPositions: [0, 2], message: new Uint8Array(0) });

    const rep = linear({ generator: m("11111") });
    expect(rep).toMatchObject({ k: 1, dmin: 5 });
    expect(rep.decode(bits("01101"))).toMatchObject({ failure: false, message: bits("1"), correctedPositions: [0, 3] });

    const all = linear({ generator: m("100", "010", "001") });
    expect(all).toMatchObject({ k: 3, dmin: 1 });
    expect(all.decode(bits("110"))).toMatchObject({ failure: false, message: bits("110"), correctedPositions: [], syndrome: new Uint8Array(0) });
  });

  it("n − k > 20: bounded-distance search over patterns of weight ≤ t agrees with the codebook", () => {
    // k = 4, n = 30: random generator, n − k = 26 > 20, dmin by enumeration of 16 codewords.
    let seed = 12345;
    const rnd = () => ((seed = (Math.imul(seed, 1103515245) + 12345) >>> 0) >>> 16) & 1;
    const g = Array.from({ length: 4 }, () => Uint8Array.from({ length: 30 }, rnd));
    expect(rank(g)).toBe(4);
    const code = linear({ generator: g });
    const book = codebook(g, 30);
    const d = Math.min(...book.slice(1).map(({ cw }) => cw.reduce((a, b) => a + b, 0)));
    expect(code.dmin).toBe(d);
    const t = Math.floor((d - 1) / 2);
    expect(t).toBeGreaterThanOrEqual(2);
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 15 }), fc.uniqueArray(fc.integer({ min: 0, max: 29 }), { maxLength: t + 2 }), (pick, errs) => {
        const { msg, cw } = book[pick]!;
        const r = cw.slice();
        for (const p of errs) r[p]! ^= 1;
        const res = code.decode(r);
        const ds = book.map((b) => dist(b.cw, r));
        const best = Math.min(...ds);
        if (errs.length <= t) expect(res).toMatchObject({ failure: false, message: msg });
        else if (best > t) expect(res).toMatchObject({ failure: true, codeword: r });
      }),
    );
  });

  it("n − k = 20 with n = 300: the coset table would be too big, so single errors are found by search", () => {
    // H = [random 20 × 280 | I_20]; its columns are distinct with high probability, giving dmin ≥ 3.
    let seed = 99;
    const rnd = () => ((seed = (Math.imul(seed, 1103515245) + 12345) >>> 0) >>> 16) & 1;
    const h = Array.from({ length: 20 }, (_, i) => Uint8Array.from({ length: 300 }, (_, j) => (j < 280 ? rnd() : j - 280 === i ? 1 : 0)));
    const code = linear({ parityCheck: h });
    expect(code.k).toBe(280);
    expect(code.dmin).toBeGreaterThanOrEqual(3);
    const msg = Uint8Array.from({ length: 280 }, rnd);
    const cw = code.encode(msg) as Uint8Array;
    const r = cw.slice();
    r[123]! ^= 1;
    expect(code.decode(r)).toMatchObject({ failure: false, correctedPositions: [123], message: msg });
  });

  it("over-limit sizes: decode throws an InputError that says why", () => {
    let seed = 7;
    const rnd = () => ((seed = (Math.imul(seed, 1103515245) + 12345) >>> 0) >>> 16) & 1;
    // k = 30, n − k = 40: neither the code nor its dual can be enumerated, so t is unknown.
    const big = linear({ generator: Array.from({ length: 30 }, (_, i) => Uint8Array.from({ length: 70 }, (_, j) => (j < 30 ? (i === j ? 1 : 0) : rnd()))) });
    expect(big.dmin).toBeUndefined();
    expect(big.encode(new Uint8Array(30))).toEqual(new Uint8Array(70));
    expectInputError(() => big.decode(new Uint8Array(70)), /minimum distance is unknown \(k = 30 and n − k = 40 both exceed 24\)/, ["generator"]);
    // k = 12, n = 72: dmin is known (large), but Σ_{i≤t} C(72, i) is far over 2^22.
    const wide = linear({ generator: Array.from({ length: 12 }, (_, i) => Uint8Array.from({ length: 72 }, (_, j) => (j < 12 ? (i === j ? 1 : 0) : rnd()))) });
    expect(wide.dmin).toBeGreaterThanOrEqual(9);
    expectInputError(() => wide.decode(new Uint8Array(72)), /n − k = 60 is too large for a coset-leader table \(limit 20\), and t-error search \(t = \d+\) would need Σ_\{i≤\d+\} C\(72, i\) = \d+ patterns per word \(limit 2\^22\)/, ["generator"]);
  });

  it("bad matrices: ragged, non-binary, empty, dependent rows, both or neither given", () => {
    expectInputError(() => linear({ generator: m("1010", "011") }), /generator row 1 has 3 entries but the matrix has 4 columns/, ["generator", 1]);
    expectInputError(() => linear({ parityCheck: [Uint8Array.of(1, 0, 2)] }), /parityCheck row 0, column 2 is 2/, ["parityCheck", 0, 2]);
    expectInputError(() => linear({ generator: [] }), /generator is empty/, ["generator"]);
    expectInputError(() => linear({ generator: m("1100", "0110", "1010") }), /generator rows are linearly dependent: row 2 is the sum of rows 0 \+ 1/, ["generator", 2]);
    expectInputError(() => linear({}), /give either generator or parityCheck/, []);
    expectInputError(() => linear({ generator: m("11"), parityCheck: m("11") }), /give either generator or parityCheck/, []);
    const code = linear({ generator: m("111") });
    expectInputError(() => code.encode(bits("10")), /message has 2 bits; linear \(3,1\) takes 1/, ["message"]);
    expectInputError(() => code.decode(Uint8Array.of(1, 1, 9)), /received bit 2 is 9/, ["received", 2]);
  });
});
