import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  analyzeCode,
  codeBounds,
  codeParameters,
  enumerateWeightDistribution,
  gilbertVarshamovDistance,
  macWilliamsTransform,
  minimumDistanceFromWeights,
  undetectedErrorProbability,
  weightDistribution,
  weightDistributionMethod,
} from "@/lib/core/analysis";
import { golay } from "@/lib/core/codes/golay";
import { hamming } from "@/lib/core/codes/hamming";
import { parity } from "@/lib/core/codes/parity";
import { repetition } from "@/lib/core/codes/repetition";
import { InputError } from "@/lib/core/errors";
import { nullSpace, rank } from "@/lib/core/gf2";

const m = (...rows: string[]) => rows.map((r) => Uint8Array.from(r, Number));
const big = (xs: number[]) => xs.map(BigInt);

function expectInputError(f: () => unknown, message: RegExp, path: (string | number)[]) {
  expect(f).toThrow(InputError);
  expect(f).toThrow(message);
  try {
    f();
  } catch (e) {
    expect((e as InputError).path).toEqual(path);
  }
}

/** Independent reference: weights of all 2^k sums of rows, by the definition (no Gray code, no packing). */
function bruteWeights(rows: Uint8Array[], n: number): bigint[] {
  const a = new Array<bigint>(n + 1).fill(0n);
  for (let mask = 0; mask < 2 ** rows.length; mask++) {
    const v = new Uint8Array(n);
    rows.forEach((r, i) => (mask >> i) & 1 && r.forEach((b, j) => (v[j]! ^= b)));
    a[v.reduce((s, x) => s + x, 0)]! += 1n;
  }
  return a;
}
const binom = (n: number, k: number): bigint => (k < 0 || k > n ? 0n : k === 0 ? 1n : (binom(n, k - 1) * BigInt(n - k + 1)) / BigInt(k));

/** Distribution written sparsely as {weight: count} → dense list of length n + 1. */
const dense = (n: number, sparse: Record<number, number>) => Array.from({ length: n + 1 }, (_, j) => BigInt(sparse[j] ?? 0));

const codeArb = (maxK: number, maxN: number) =>
  fc
    .integer({ min: 1, max: maxK })
    .chain((k) => fc.integer({ min: k, max: maxN }).chain((n) => fc.array(fc.uint8Array({ minLength: n, maxLength: n, min: 0, max: 1 }), { minLength: k, maxLength: k }).map((g) => ({ g, n, k }))))
    .filter(({ g, k }) => rank(g) === k);

describe("weight distributions of known codes (MacWilliams & Sloane 1977)", () => {
  it("Hamming (7,4): A0 = 1, A3 = 7, A4 = 7, A7 = 1; perfect, t = 1", () => {
    const a = analyzeCode(hamming(3).generatorRows!());
    expect(a.weightDistribution).toEqual(dense(7, { 0: 1, 3: 7, 4: 7, 7: 1 }));
    expect(a).toMatchObject({ n: 7, k: 4, minimumDistance: 3, correctingRadius: 1, detectionCapability: 2, perfect: true, mds: false, sphereVolume: 8n });
  });

  it("extended Hamming (8,4): A0 = 1, A4 = 14, A8 = 1; not perfect", () => {
    const a = analyzeCode(hamming(3, true).generatorRows!());
    expect(a.weightDistribution).toEqual(dense(8, { 0: 1, 4: 14, 8: 1 }));
    expect(a).toMatchObject({ minimumDistance: 4, correctingRadius: 1, detectionCapability: 3, perfect: false });
  });

  it("Golay (23,12): A0=1, A7=253, A8=506, A11=1288, A12=1288, A15=506, A16=253, A23=1; perfect, t = 3", () => {
    const a = analyzeCode(golay().generatorRows!());
    expect(a.weightDistribution).toEqual(dense(23, { 0: 1, 7: 253, 8: 506, 11: 1288, 12: 1288, 15: 506, 16: 253, 23: 1 }));
    expect(a).toMatchObject({ minimumDistance: 7, correctingRadius: 3, perfect: true, sphereVolume: 2048n });
  });

  it("Golay (24,12): A0=1, A8=759, A12=2576, A16=759, A24=1", () => {
    const a = analyzeCode(golay(true).generatorRows!());
    expect(a.weightDistribution).toEqual(dense(24, { 0: 1, 8: 759, 12: 2576, 16: 759, 24: 1 }));
    expect(a).toMatchObject({ minimumDistance: 8, correctingRadius: 3, perfect: false });
  });

  it("both methods agree on the Golay codes (enumeration of 2^12 codewords vs the dual through MacWilliams)", () => {
    for (const c of [golay(), golay(true)]) {
      const g = c.generatorRows!();
      expect(macWilliamsTransform(enumerateWeightDistribution(nullSpace(g), c.n))).toEqual(enumerateWeightDistribution(g));
    }
  });
});

describe("closed-form weight distributions of the repetition and even-parity families (MacWilliams & Sloane 1977, ch. 1)", () => {
  // The reference is brute-force enumeration of every combination of each code's own generator rows.
  it("repetition (n, 1), n = 1 … 16: the zero and the all-one word, as enumeration of G = [1 1 … 1] gives", () => {
    for (let n = 1; n <= 16; n++) {
      const code = repetition(n);
      expect(code.weightDistribution!(), `n = ${n}`).toEqual(bruteWeights(code.generatorRows!(), n));
    }
  });

  it("even parity (n, n − 1), n = 2 … 16: A_w = C(n, w) for even w, as enumeration of its 2^(n−1) codewords gives", () => {
    for (let n = 2; n <= 16; n++) {
      const code = parity(n, "even");
      const closed = code.weightDistribution!();
      expect(closed, `n = ${n}`).toEqual(bruteWeights(code.generatorRows!(), n));
      // Written out as well: every even-weight word is a codeword.
      expect(closed).toEqual(Array.from({ length: n + 1 }, (_, w) => (w % 2 === 0 ? binom(n, w) : 0n)));
    }
  });

  it("the closed forms give the same parameters as analysing the enumerated distribution (d, t, perfect, MDS)", () => {
    for (const code of [repetition(7), repetition(8), parity(9, "even"), parity(10, "even")]) {
      const fromForm = codeParameters(code.k, code.weightDistribution!(), "closed-form");
      const fromRows = analyzeCode(code.generatorRows!());
      expect(fromForm).toMatchObject({ minimumDistance: fromRows.minimumDistance, correctingRadius: fromRows.correctingRadius, perfect: fromRows.perfect, mds: fromRows.mds, sphereVolume: fromRows.sphereVolume });
      expect(fromForm.weightDistribution).toEqual(fromRows.weightDistribution);
    }
  });
});

describe("weight distribution properties", () => {
  it("property: the distribution matches brute force and sums to 2^k, by whichever method is chosen", () => {
    fc.assert(
      fc.property(codeArb(8, 14), ({ g, n, k }) => {
        const { weights, method } = weightDistribution(g);
        expect(method).toBe(k <= n - k ? "enumeration" : "dual");
        expect(weights).toEqual(bruteWeights(g, n));
        expect(weights.reduce((a, b) => a + b, 0n)).toBe(2n ** BigInt(k));
      }),
    );
  });

  it("property: MacWilliams identity both ways — A from B and B from A — against brute-force enumeration of the code and its dual", () => {
    fc.assert(
      fc.property(codeArb(7, 13), ({ g, n }) => {
        const h = nullSpace(g);
        const a = bruteWeights(g, n);
        const b = bruteWeights(h, n);
        expect(macWilliamsTransform(b)).toEqual(a);
        expect(macWilliamsTransform(a)).toEqual(b);
      }),
    );
  });

  it("MacWilliams of the trivial codes: {0} ↔ the whole space, whose weights are C(n, j)", () => {
    expect(macWilliamsTransform(big([1, 0, 0, 0, 0]))).toEqual([0, 1, 2, 3, 4].map((j) => binom(4, j)));
    expect(macWilliamsTransform([0, 1, 2, 3, 4].map((j) => binom(4, j)))).toEqual(big([1, 0, 0, 0, 0]));
  });

  it("edge case k = n: every word is a codeword, d = 1, MDS (Singleton tight)", () => {
    const a = analyzeCode(m("100", "010", "001"));
    expect(a.weightDistribution).toEqual(big([1, 3, 3, 1]));
    expect(a).toMatchObject({ minimumDistance: 1, correctingRadius: 0, mds: true, perfect: true, weightDistributionMethod: "dual" });
    expect(a.parityCheck).toEqual([]);
  });

  it("k = 24, the enumeration limit, counts all 2^24 codewords (n = 48)", () => {
    let seed = 5;
    const rnd = () => ((seed = (Math.imul(seed, 1103515245) + 12345) >>> 0) >>> 16) & 1;
    const g = Array.from({ length: 24 }, (_, i) => Uint8Array.from({ length: 48 }, (_, j) => (j < 24 ? (i === j ? 1 : 0) : rnd())));
    const w = enumerateWeightDistribution(g);
    expect(w.reduce((a, b) => a + b, 0n)).toBe(2n ** 24n);
  });
});

describe("bounds (MacWilliams & Sloane 1977, ch. 1, 2 and 17)", () => {
  it("property: Hamming, Singleton, Plotkin (where it applies) and Griesmer hold for every random code; perfect ⇔ Hamming tight", () => {
    fc.assert(
      fc.property(codeArb(8, 16), ({ g, n, k }) => {
        const a = analyzeCode(g);
        const d = a.minimumDistance;
        expect(a.bounds.hamming.holds).toBe(true);
        expect(a.bounds.singleton.holds).toBe(true);
        expect(a.bounds.griesmer.holds).toBe(true);
        if (2 * d >= n) expect(a.bounds.plotkin).toMatchObject({ applicable: true, holds: true });
        else expect(a.bounds.plotkin.applicable).toBe(false);
        expect(a.perfect).toBe(a.bounds.hamming.lhs === a.bounds.hamming.rhs);
        expect(a.mds).toBe(d === n - k + 1);
        // Independent: 2^k·V(n, t) written out with binomials.
        let v = 0n;
        for (let i = 0; i <= a.correctingRadius; i++) v += binom(n, i);
        expect(a.bounds.hamming.lhs).toBe(2n ** BigInt(k) * v);
        // Systematic forms: G = [I | P], H = [Pᵀ | I], and H·Gᵀ = 0 in the original column order.
        a.systematic.generator.forEach((row, i) => row.slice(0, k).forEach((x, j) => expect(x).toBe(i === j ? 1 : 0)));
        a.systematic.parityCheck.forEach((row, i) => row.slice(k).forEach((x, j) => expect(x).toBe(i === j ? 1 : 0)));
        for (const h of a.parityCheck) for (const r of g) expect(h.reduce((s, x, j) => s + x * r[j]!, 0) % 2).toBe(0);
      }),
    );
  });

  it("Gilbert–Varshamov by hand: (7,4) → 3 (sums 0, 1, 7 < 8 ≤ 22); (23,12) → 5; k = n → 1", () => {
    expect(gilbertVarshamovDistance(7, 4)).toBe(3);
    // (23,12): Σ_{i≤3} C(22, i) = 1 + 22 + 231 + 1540 = 1794 < 2048 ≤ 1794 + 7315.
    expect(gilbertVarshamovDistance(23, 12)).toBe(5);
    expect(gilbertVarshamovDistance(5, 5)).toBe(1);
  });

  it("property: the GV distance is the largest d with Σ_{i≤d−2} C(n−1, i) < 2^(n−k) (sum recomputed)", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 40 }).chain((n) => fc.tuple(fc.constant(n), fc.integer({ min: 1, max: n }))), ([n, k]) => {
        const d = gilbertVarshamovDistance(n, k);
        const s = (dd: number) => Array.from({ length: Math.max(dd - 1, 0) }, (_, i) => binom(n - 1, i)).reduce((a, b) => a + b, 0n);
        expect(s(d) < 2n ** BigInt(n - k)).toBe(true);
        if (d < n) expect(s(d + 1) >= 2n ** BigInt(n - k)).toBe(true);
      }),
    );
  });

  it("simplex [7,3,4] meets Plotkin (M = 8 = 2⌊4/1⌋) and Griesmer (4 + 2 + 1 = 7); repetition (5,1) is MDS and perfect", () => {
    const simplex = codeBounds(7, 3, 4);
    expect(simplex.plotkin).toEqual({ applicable: true, maxSize: 8n, holds: true, tight: true });
    expect(simplex.griesmer).toEqual({ minLength: 7, holds: true, tight: true });
    const rep = analyzeCode(m("11111"));
    expect(rep).toMatchObject({ minimumDistance: 5, mds: true, perfect: true });
    // (8,4) extended Hamming: 2d = n, so M ≤ 2n = 16 = 2^4, tight.
    expect(codeBounds(8, 4, 4).plotkin).toEqual({ applicable: true, maxSize: 16n, holds: true, tight: true });
    expect(codeBounds(7, 4, 3).plotkin).toEqual({ applicable: false });
  });

  it("a generator needing a column permutation reports it, and G_sys is G's row space after that permutation", () => {
    // Rows 1100 and 0011: pivots 0 and 2 (by hand).
    const a = analyzeCode(m("1100", "0011"));
    expect(a.systematic).toMatchObject({ permutation: [0, 2, 1, 3], permuted: true });
    expect(a.systematic.generator).toEqual(m("1010", "0101"));
    expect(a.systematic.parityCheck).toEqual(m("1010", "0101"));
    expect(analyzeCode(hamming(3).generatorRows!()).systematic.permuted).toBe(false);
  });
});

describe("undetected-error probability on a BSC", () => {
  it("property: Hamming (7,4) P_ud = 7p³(1−p)⁴ + 7p⁴(1−p)³ + p⁷ (formula written out; MacWilliams & Sloane, ch. 1)", () => {
    const w = analyzeCode(hamming(3).generatorRows!()).weightDistribution;
    fc.assert(
      fc.property(fc.double({ min: 1e-6, max: 1, noNaN: true }), (p) => {
        const q = 1 - p;
        const direct = 7 * p ** 3 * q ** 4 + 7 * p ** 4 * q ** 3 + p ** 7;
        const got = undetectedErrorProbability(w, p);
        expect(got.value).toBeCloseTo(direct, 14);
        expect(Math.abs(got.value - direct)).toBeLessThanOrEqual(1e-12 * direct);
      }),
    );
  });

  it("edge cases: p = 0 → 0 (log10 −∞); p = 1 → A_n; p = ½ → (2^k − 1)/2^n; tiny p stays finite in log10", () => {
    const w = analyzeCode(hamming(3).generatorRows!()).weightDistribution;
    expect(undetectedErrorProbability(w, 0)).toEqual({ value: 0, log10: -Infinity });
    expect(undetectedErrorProbability(w, 1).value).toBeCloseTo(1, 15);
    expect(undetectedErrorProbability(w, 0.5).value).toBeCloseTo(15 / 128, 15);
    const tiny = undetectedErrorProbability(w, 1e-200);
    expect(tiny.value).toBe(0);
    // 7·p³ dominates: log10 = log10(7) − 600.
    expect(tiny.log10).toBeCloseTo(Math.log10(7) - 600, 9);
  });

  it("input errors", () => {
    expectInputError(() => undetectedErrorProbability(big([1, 1]), 1.5), /p must be a probability from 0 to 1/, ["p"]);
    expectInputError(() => undetectedErrorProbability(big([1, 1]), Number.NaN), /p must be a probability/, ["p"]);
  });
});

describe("analysis input errors", () => {
  it("k > 24 and n − k > 24 is refused with the reason; so is k > 24 for plain enumeration, and 2^24 words of 1000 bits", () => {
    const g = Array.from({ length: 25 }, (_, i) => Uint8Array.from({ length: 50 }, (_, j) => (j === i || j === 25 + i || (j > 25 && (i * j) % 3 === 0) ? 1 : 0)));
    expect(rank(g)).toBe(25);
    expectInputError(() => weightDistribution(g), /the weight distribution needs the code or its dual enumerated, but k = 25 and n − k = 25 both exceed 24/, ["generator"]);
    expectInputError(() => analyzeCode(g), /both exceed 24/, ["generator"]);
    expectInputError(() => enumerateWeightDistribution(g), /enumerating 2\^25 codewords of 50 bits is beyond the limit \(dimension ≤ 24, at most 2\^28 word operations\)/, ["generator"]);
    // k = 24, n = 1000: 2^24 words × 32 machine words each = 2^29 > 2^28.
    const wide = Array.from({ length: 24 }, (_, i) => Uint8Array.from({ length: 1000 }, (_, j) => (j === i || j === 500 + i ? 1 : 0)));
    expectInputError(() => weightDistribution(wide), /enumerating 2\^24 words of 1000 bits would take more than 2\^28 word operations/, ["generator"]);
    expect(weightDistributionMethod(1000, 20)).toBe("enumeration");
    expect(weightDistributionMethod(1000, 990)).toBe("dual");
    expect(weightDistributionMethod(1000, 24)).toBeUndefined();
  });

  it("bad matrices: empty, ragged, non-binary, dependent", () => {
    expectInputError(() => analyzeCode([]), /generator is empty/, ["generator"]);
    expectInputError(() => analyzeCode(m("101", "10")), /row 1 has 2 entries/, ["generator", 1]);
    expectInputError(() => analyzeCode([Uint8Array.of(1, 3)]), /row 0, column 1 is 3/, ["generator", 0, 1]);
    expectInputError(() => analyzeCode(m("110", "011", "101")), /linearly dependent: row 2 is the sum of rows 0 \+ 1/, ["generator", 2]);
  });

  it("MacWilliams input checks: not starting with 1, not a power of two, not a linear code's distribution", () => {
    expectInputError(() => macWilliamsTransform([]), /empty/, ["weights"]);
    expectInputError(() => macWilliamsTransform(big([2, 0, 0])), /A_0 is 2/, ["weights", 0]);
    expectInputError(() => macWilliamsTransform(big([1, 2, 0])), /add up to 3, not a power of two/, ["weights"]);
    // Length 7, one word each of weight 0 and 1 and two of weight 6: 4 words, but the transform is not integral.
    expectInputError(() => macWilliamsTransform(big([1, 1, 0, 0, 0, 0, 2, 0])), /not the weights of a linear code/, ["weights"]);
    expect(minimumDistanceFromWeights(big([1, 0, 0]))).toBeUndefined();
    expectInputError(() => codeBounds(7, 4, 0), /d must be an integer from 1 to n = 7/, ["d"]);
    expectInputError(() => gilbertVarshamovDistance(7, 8), /k must be an integer from 1 to n = 7/, ["k"]);
  });
});
