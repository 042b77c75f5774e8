import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { codeSpec } from "@/lib/api/code-spec";
import { codeWork } from "@/lib/api/code-work";
import { bch } from "@/lib/core/codes/bch";
import { golay } from "@/lib/core/codes/golay";
import { hamming } from "@/lib/core/codes/hamming";
import { linear } from "@/lib/core/codes/linear";
import { parity } from "@/lib/core/codes/parity";
import { repetition } from "@/lib/core/codes/repetition";
import { rs } from "@/lib/core/codes/rs";

/**
 * The work estimate reads a code's shape off its spec without building it; the built codes of lib/core/codes
 * are the reference for n and k.
 */
const shapeOf = (spec: unknown) => {
  const w = codeWork(codeSpec.parse(spec));
  return { n: w.n, k: w.k };
};

describe("BCH: n − k from the cyclotomic cosets equals the degree of the built generator", () => {
  it("every t of GF(2^3) … GF(2^10) (t up to 2^(m−1) − 1)", () => {
    for (let m = 3; m <= 10; m++) {
      for (let t = 1; t <= 2 ** (m - 1) - 1; t++) {
        const code = bch({ m, t });
        expect(shapeOf({ family: "bch", m, t }), `m = ${m}, t = ${t}`).toEqual({ n: code.n, k: code.k });
      }
    }
  });

  it.each([11, 12, 13, 14, 15, 16])("GF(2^%d): small, middling and largest t", (m) => {
    const top = 2 ** (m - 1) - 1;
    for (const t of [1, 2, 3, 7, 30, 100, Math.floor(top / 3), top - 1, top].filter((t) => t <= top && (m < 14 || t <= 300))) {
      const code = bch({ m, t });
      expect(shapeOf({ family: "bch", m, t }), `m = ${m}, t = ${t}`).toEqual({ n: code.n, k: code.k });
    }
  });

  it("the BCH (65535, k) code of t = 4,000: n − k = 47,292 < m·t = 64,000 (cosets overlap)", () => {
    const code = bch({ m: 16, t: 4000 });
    expect(shapeOf({ family: "bch", m: 16, t: 4000 })).toEqual({ n: code.n, k: code.k });
    expect(code.n - code.k).toBe(47_292);
  });

  it("shortened codes keep n − k and lose `shorten` from n and k", () => {
    for (const [m, t, shorten] of [
      [5, 2, 10],
      [6, 3, 20],
      [8, 4, 100],
      [10, 12, 500],
    ] as const) {
      const code = bch({ m, t, shorten });
      expect(shapeOf({ family: "bch", m, t, shorten }), `m = ${m}, t = ${t}, shorten = ${shorten}`).toEqual({ n: code.n, k: code.k });
    }
  });
});

describe("Reed–Solomon and the fixed families: n and k as built", () => {
  it("Reed–Solomon full-length and shortened, GF(4) … GF(2^16)", () => {
    for (const [m, n, k] of [
      [2, undefined, 1],
      [3, undefined, 5],
      [4, 10, 4],
      [8, undefined, 223],
      [8, 204, 188],
      [10, 1000, 900],
      [12, undefined, 4000],
      [16, undefined, 65535 - 64],
      [16, 4096, 4000],
    ] as const) {
      const code = rs({ m, n, k });
      expect(shapeOf({ family: "rs", m, n, k }), `m = ${m}, n = ${n}, k = ${k}`).toEqual({ n: code.n, k: code.k });
    }
  });

  it("repetition, parity, Hamming (plain and extended) and Golay", () => {
    for (const n of [1, 2, 7, 65535]) expect(shapeOf({ family: "repetition", n })).toEqual({ n, k: repetition(n).k });
    for (const n of [2, 9, 1_048_576]) expect(shapeOf({ family: "parity", n })).toEqual({ n, k: parity(n).k });
    for (const r of [2, 3, 5, 10]) {
      for (const extended of [false, true]) {
        const code = hamming(r, extended);
        expect(shapeOf({ family: "hamming", r, extended })).toEqual({ n: code.n, k: code.k });
      }
    }
    for (const extended of [false, true]) expect(shapeOf({ family: "golay", extended })).toEqual({ n: golay(extended).n, k: golay(extended).k });
  });
});

describe("linear codes: n and k from the matrix's first row and row count, as built", () => {
  /** [I_k | P] with P drawn by fast-check: full rank by construction. Rows as 0/1 text. */
  const systematic = (k: number, r: number, p: boolean[]) =>
    Array.from({ length: k }, (_, i) => Array.from({ length: k + r }, (_, j) => (j < k ? (i === j ? "1" : "0") : p[(i * r + j - k) % p.length] ? "1" : "0")).join(""));
  const toUint8 = (rows: string[]) => rows.map((row) => Uint8Array.from(row, Number));

  it("property: a generator [I_k | P] gives k rows of n = k + r; the parity-check [Pᵀ | I_r] the same code", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 40 }), fc.integer({ min: 1, max: 40 }), fc.array(fc.boolean(), { minLength: 1, maxLength: 64 }), (k, r, p) => {
        const g = systematic(k, r, p);
        const built = linear({ generator: toUint8(g) });
        expect(shapeOf({ family: "linear", generator: g })).toEqual({ n: built.n, k: built.k });
        // H = [Pᵀ | I_r]: row j has P's column j, then the unit vector e_j.
        const h = Array.from({ length: r }, (_, j) => g.map((row) => row[k + j]).join("") + Array.from({ length: r }, (_, i) => (i === j ? "1" : "0")).join(""));
        const fromH = linear({ parityCheck: toUint8(h) });
        expect(shapeOf({ family: "linear", parityCheck: h })).toEqual({ n: fromH.n, k: fromH.k });
        expect(fromH.k).toBe(built.k);
      }),
      { numRuns: 60 },
    );
  });

  it("rows written as { hex, length }: a 3 × 10 generator (n from the first row's length)", () => {
    const g = [
      { hex: "802", length: 10 },
      { hex: "40c", length: 10 },
      { hex: "208", length: 10 },
    ];
    const built = linear({ generator: [Uint8Array.from("1000000000", Number), Uint8Array.from("0100000011", Number), Uint8Array.from("0010000010", Number)] });
    expect(shapeOf({ family: "linear", generator: g })).toEqual({ n: built.n, k: built.k });
    expect(built.n).toBe(10);
    expect(built.k).toBe(3);
  });
});
