import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { InputError } from "@/lib/core/errors";
import {
  checkBinaryWord,
  checkFullRank,
  checkMatrix,
  dependentRow,
  generatorFromParityCheck,
  nullSpace,
  parityCheckFromGenerator,
  permuteColumns,
  rank,
  rref,
  syndrome,
  systematicForm,
  vecMatMul,
} from "@/lib/core/gf2";

const m = (...rows: string[]) => rows.map((r) => Uint8Array.from(r, Number));
const str = (rows: Uint8Array[]) => rows.map((r) => r.join(""));

/** Independent reference: the span of the rows as a set of strings, by adding every subset of rows (definition of the row space). */
function span(rows: Uint8Array[], n: number): Set<string> {
  const out = new Set<string>();
  for (let mask = 0; mask < 2 ** rows.length; mask++) {
    const v = new Uint8Array(n);
    rows.forEach((r, i) => {
      if ((mask >> i) & 1) r.forEach((b, j) => (v[j]! ^= b));
    });
    out.add(v.join(""));
  }
  return out;
}

/** Independent reference: a·bᵀ over GF(2) as a plain sum mod 2. */
const dot = (a: Uint8Array, b: Uint8Array) => a.reduce((s, x, i) => s + x * b[i]!, 0) % 2;

const matrixArb = (maxRows: number, maxCols: number) =>
  fc.integer({ min: 1, max: maxCols }).chain((n) => fc.array(fc.uint8Array({ minLength: n, maxLength: n, min: 0, max: 1 }), { minLength: 1, maxLength: maxRows }).map((rows) => ({ rows, n })));

function expectInputError(f: () => unknown, message: RegExp, path?: (string | number)[]) {
  let err: unknown;
  try {
    f();
  } catch (e) {
    err = e;
  }
  expect(err).toBeInstanceOf(InputError);
  expect((err as InputError).message).toMatch(message);
  if (path) expect((err as InputError).path).toEqual(path);
}

describe("gf2: rank and reduced row echelon form", () => {
  it("a hand-reduced 3 × 4 example (worked by hand)", () => {
    // Rows 1100, 0110, 1010: row 2 = row 0 + row 1, so rank 2; RREF 1010 / 0110.
    const { rows, pivots } = rref(m("1100", "0110", "1010"));
    expect(str(rows)).toEqual(["1010", "0110"]);
    expect(pivots).toEqual([0, 1]);
    expect(rank(m("1100", "0110", "1010"))).toBe(2);
  });

  it("identity has full rank; repeated rows rank 1; the empty matrix rank 0 (by definition)", () => {
    expect(rank(m("100", "010", "001"))).toBe(3);
    expect(rank(m("111", "111", "111"))).toBe(1);
    expect(rank([])).toBe(0);
  });

  it("property: 2^rank equals the size of the row space, counted by adding every subset of rows", () => {
    fc.assert(
      fc.property(matrixArb(7, 10), ({ rows, n }) => {
        expect(2 ** rank(rows)).toBe(span(rows, n).size);
        const { rows: reduced, pivots } = rref(rows);
        // Same row space, pivot columns are unit columns, pivots increase.
        expect(span(reduced, n)).toEqual(span(rows, n));
        pivots.forEach((p, i) => reduced.forEach((r, j) => expect(r[p]).toBe(i === j ? 1 : 0)));
        expect([...pivots].sort((a, b) => a - b)).toEqual(pivots);
      }),
    );
  });
});

describe("gf2: dependent rows", () => {
  it("names the first row that is a sum of earlier ones (by hand: 101 + 011 = 110)", () => {
    expect(dependentRow(m("101", "011", "110", "001"))).toEqual({ row: 2, sumOf: [0, 1] });
    expect(dependentRow(m("101", "000"))).toEqual({ row: 1, sumOf: [] });
    expect(dependentRow(m("101", "011"))).toBeUndefined();
    expectInputError(() => checkFullRank(m("1010", "0101", "1111"), "generator"), /generator rows are linearly dependent: row 2 is the sum of rows 0 \+ 1/, ["generator", 2]);
    expectInputError(() => checkFullRank(m("1010", "0000"), "parityCheck"), /row 1 is all zero/, ["parityCheck", 1]);
  });

  it("property: the reported rows really sum to the dependent row", () => {
    fc.assert(
      fc.property(matrixArb(8, 6), ({ rows, n }) => {
        const dep = dependentRow(rows);
        if (rank(rows) === rows.length) {
          expect(dep).toBeUndefined();
          return;
        }
        expect(dep).toBeDefined();
        const sum = new Uint8Array(n);
        for (const i of dep!.sumOf) rows[i]!.forEach((b, j) => (sum[j]! ^= b));
        expect(sum).toEqual(rows[dep!.row]);
        expect(rank(rows.slice(0, dep!.row))).toBe(dep!.row);
      }),
    );
  });
});

describe("gf2: systematic form, null space, G ↔ H", () => {
  it("the (7,4) Hamming generator [I | P] is already systematic (identity permutation)", () => {
    const g = m("1000011", "0100101", "0010110", "0001111");
    const { rows, permutation } = systematicForm(g);
    expect(str(rows)).toEqual(str(g));
    expect(permutation).toEqual([0, 1, 2, 3, 4, 5, 6]);
    // H = [Pᵀ | I] (MacWilliams & Sloane, ch. 1): columns of Pᵀ are the rows of P.
    expect(str(parityCheckFromGenerator(g))).toEqual(["0111100", "1011010", "1101001"]);
  });

  it("a generator whose pivots are not the first columns gets a column permutation (by hand)", () => {
    // 1100 / 0011: pivots at columns 0 and 2, so the order is 0, 2, 1, 3 and the form is 1010 / 0101.
    const { rows, permutation } = systematicForm(m("1100", "0011"));
    expect(permutation).toEqual([0, 2, 1, 3]);
    expect(str(rows)).toEqual(["1010", "0101"]);
    expect(str(permuteColumns(m("1100", "0011"), permutation))).toEqual(["1010", "0101"]);
  });

  it("property: H·Gᵀ = 0, ranks add up to n, and G from H spans the original code", () => {
    fc.assert(
      fc.property(matrixArb(6, 10), ({ rows, n }) => {
        const { rows: g } = rref(rows);
        fc.pre(g.length > 0);
        const h = parityCheckFromGenerator(g);
        expect(h.length).toBe(n - g.length);
        for (const hr of h) for (const gr of g) expect(dot(hr, gr)).toBe(0);
        if (h.length > 0) {
          expect(rank(h)).toBe(h.length);
          expect(span(generatorFromParityCheck(h), n)).toEqual(span(g, n));
        }
        const sys = systematicForm(g);
        sys.rows.forEach((r, i) => r.slice(0, g.length).forEach((b, j) => expect(b).toBe(i === j ? 1 : 0)));
        expect(span(sys.rows, n)).toEqual(span(permuteColumns(g, sys.permutation), n));
      }),
    );
  });

  it("null space of a square full-rank matrix is empty; of no rows with n given, the identity", () => {
    expect(nullSpace(m("10", "01"))).toEqual([]);
    expect(str(nullSpace([], 3))).toEqual(["100", "010", "001"]);
  });
});

describe("gf2: products and syndromes", () => {
  it("property: v·M and H·rᵀ equal the sums written out entry by entry", () => {
    fc.assert(
      fc.property(
        matrixArb(6, 12).chain(({ rows, n }) => fc.tuple(fc.constant(rows), fc.constant(n), fc.uint8Array({ minLength: rows.length, maxLength: rows.length, min: 0, max: 1 }), fc.uint8Array({ minLength: n, maxLength: n, min: 0, max: 1 }))),
        ([rows, n, v, r]) => {
          const prod = vecMatMul(v, rows);
          for (let j = 0; j < n; j++) expect(prod[j]).toBe(rows.reduce((s, row, i) => s + v[i]! * row[j]!, 0) % 2);
          expect(Array.from(syndrome(rows, r))).toEqual(rows.map((row) => dot(row, r)));
        },
      ),
    );
  });

  it("empty message times no rows is the zero word of length n", () => {
    expect(vecMatMul(new Uint8Array(0), [], 4)).toEqual(new Uint8Array(4));
  });
});

describe("gf2: input errors", () => {
  it("ragged rows, non-binary entries, empty matrices and empty rows name the place", () => {
    expectInputError(() => checkMatrix(m("101", "11"), "generator"), /generator row 1 has 2 entries but the matrix has 3 columns/, ["generator", 1]);
    expectInputError(() => checkMatrix([Uint8Array.of(1, 2, 0)], "generator"), /row 0, column 1 is 2; entries are 0 or 1/, ["generator", 0, 1]);
    expectInputError(() => checkMatrix([], "parityCheck"), /parityCheck is empty/, ["parityCheck"]);
    expectInputError(() => checkMatrix([new Uint8Array(0)], "generator"), /rows are empty/, ["generator", 0]);
    expectInputError(() => rank(m("10", "1")), /row 1 has 1 entries/);
    expectInputError(() => nullSpace([]), /has no rows, so its number of columns is unknown/);
    expectInputError(() => vecMatMul(Uint8Array.of(1), m("10", "01")), /the vector has 1 entries but the matrix has 2 rows/);
    expectInputError(() => syndrome(m("101"), Uint8Array.of(1, 0)), /row 0 has 3 entries but the matrix has 2 columns/);
    expectInputError(() => parityCheckFromGenerator(m("11", "11")), /row 1 is the sum of row 0/, ["generator", 1]);
  });

  it("words: wrong length, non-binary bit, symbols instead of bits", () => {
    expectInputError(() => checkBinaryWord(Uint8Array.of(1, 0), 3, "message", "Hamming (7,4)"), /message has 2 bits; Hamming \(7,4\) takes 3/, ["message"]);
    expectInputError(() => checkBinaryWord(Uint8Array.of(1, 3), 2, "received", "x"), /received bit 1 is 3/, ["received", 1]);
    expectInputError(() => checkBinaryWord(Uint16Array.of(1, 0), 2, "received", "x"), /must be bits/, ["received"]);
  });
});
