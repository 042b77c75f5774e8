import binomcoef from "@stdlib/math-base-special-binomcoef";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { type Bits, parseBits } from "@/lib/core/bits";
import {
  codebookDistance,
  correctingRadius,
  detectionCapability,
  hammingBoundHolds,
  hammingDistance,
  hammingWeight,
  isPerfect,
  log2BigInt,
  sphereVolume,
} from "@/lib/core/distance";
import { InputError } from "@/lib/core/errors";

const b = (s: string): Bits => parseBits(s, 1 << 20);
const bitsArb = (len: number) => fc.array(fc.integer({ min: 0, max: 1 }), { minLength: len, maxLength: len }).map((a) => Uint8Array.from(a));

// Reference by definition: compare entry by entry.
function naiveDistance(x: Bits, y: Bits): number[] {
  const out: number[] = [];
  for (let i = 0; i < x.length; i++) if (x[i] !== y[i]) out.push(i);
  return out;
}

// Exact binomial coefficient by Pascal's rule, independent of the code's multiplicative form.
function pascalRow(n: number): bigint[] {
  let row = [1n];
  for (let i = 0; i < n; i++) row = [1n, ...row.slice(1).map((v, j) => v + row[j]!), 1n];
  return row;
}

describe("hammingWeight and hammingDistance", () => {
  it("counts ones and differing positions (worked by hand)", () => {
    expect(hammingWeight(b("1011 0010"))).toBe(4);
    expect(hammingWeight(b(""))).toBe(0);
    // 10110 vs 11100 differ at positions 1 and 3 (0-based), read by eye.
    expect(hammingDistance(b("10110"), b("11100"), 10)).toEqual({ distance: 2, positions: [1, 3], positionsTruncated: false });
    expect(hammingDistance(b(""), b(""), 10)).toEqual({ distance: 0, positions: [], positionsTruncated: false });
  });

  it("lists at most maxPositions and says when it truncated", () => {
    const r = hammingDistance(b("1111"), b("0000"), 2);
    expect(r).toEqual({ distance: 4, positions: [0, 1], positionsTruncated: true });
    expect(hammingDistance(b("1111"), b("0000"), 0).positions).toEqual([]);
    expect(hammingDistance(b("1111"), b("0000"), 4).positionsTruncated).toBe(false);
  });

  it("rejects words of different lengths", () => {
    expect(() => hammingDistance(b("101"), b("10"), 5)).toThrow(InputError);
    expect(() => hammingDistance(b("101"), b("10"), 5)).toThrow(/3 and 2 bits/);
  });

  it("agrees with entry-by-entry comparison across word boundaries (property)", () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 200 }).chain((n) => fc.tuple(bitsArb(n), bitsArb(n))), ([x, y]) => {
        const expected = naiveDistance(x, y);
        const r = hammingDistance(x, y, 1000);
        expect(r.distance).toBe(expected.length);
        expect(r.positions).toEqual(expected);
      }),
    );
  });

  it("is a metric: identity, symmetry, triangle inequality (property)", () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 130 }).chain((n) => fc.tuple(bitsArb(n), bitsArb(n), bitsArb(n))), ([x, y, z]) => {
        const d = (u: Bits, v: Bits) => hammingDistance(u, v, 0).distance;
        expect(d(x, x)).toBe(0);
        expect(d(x, y) === 0).toBe(naiveDistance(x, y).length === 0);
        expect(d(x, y)).toBe(d(y, x));
        expect(d(x, z)).toBeLessThanOrEqual(d(x, y) + d(y, z));
      }),
    );
  });

  it("handles the largest allowed words, 1,048,576 bits", () => {
    const n = 1 << 20;
    const x = new Uint8Array(n);
    const y = new Uint8Array(n);
    // Differ at every 1000th position: ⌈n/1000⌉ = 1049 differences.
    for (let i = 0; i < n; i += 1000) y[i] = 1;
    y[n - 1] = 1;
    const r = hammingDistance(x, y, 5);
    expect(r.distance).toBe(1049 + 1);
    expect(r.positions).toEqual([0, 1000, 2000, 3000, 4000]);
    expect(r.positionsTruncated).toBe(true);
    expect(hammingWeight(y)).toBe(1050);
  });
});

describe("codebookDistance", () => {
  // Hamming (7,4) codebook: all 16 combinations of the rows of a systematic generator.
  const G = ["1000110", "0100101", "0010011", "0001111"].map(b);
  const hamming74 = Array.from({ length: 16 }, (_, m) => {
    const w = new Uint8Array(7);
    G.forEach((row, r) => {
      if ((m >> r) & 1) row.forEach((bit, i) => (w[i]! ^= bit));
    });
    return w;
  });

  it("finds dmin = 3 for Hamming (7,4) (MacWilliams & Sloane: A3 = 7 words of weight 3)", () => {
    const r = codebookDistance(hamming74, 1000);
    expect(r.minimumDistance).toBe(3);
    expect(r.pairsCompared).toBe(120);
    // Linear code: each codeword has A3 = 7 neighbours at distance 3 → 16·7/2 = 56 pairs.
    expect(r.closestPairs.length).toBe(56);
    expect(r.closestPairsTruncated).toBe(false);
    for (const [i, j] of r.closestPairs) expect(naiveDistance(hamming74[i]!, hamming74[j]!).length).toBe(3);
  });

  it("truncates the pair list in lexicographic order", () => {
    const r = codebookDistance(hamming74, 3);
    expect(r.closestPairs.length).toBe(3);
    expect(r.closestPairsTruncated).toBe(true);
    const sorted = [...r.closestPairs].sort((p, q) => p[0] - q[0] || p[1] - q[1]);
    expect(r.closestPairs).toEqual(sorted);
  });

  it("duplicates give distance 0; empty words are all at distance 0", () => {
    expect(codebookDistance([b("101"), b("010"), b("101")], 10)).toEqual({
      minimumDistance: 0,
      closestPairs: [[0, 2]],
      closestPairsTruncated: false,
      pairsCompared: 3,
    });
    expect(codebookDistance([b(""), b(""), b("")], 10).closestPairs).toEqual([
      [0, 1],
      [0, 2],
      [1, 2],
    ]);
  });

  it("rejects fewer than 2 words and points at a word of another length", () => {
    expect(() => codebookDistance([b("1")], 10)).toThrow(InputError);
    try {
      codebookDistance([b("101"), b("110"), b("1")], 10);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(InputError);
      expect((e as InputError).path).toEqual([2]);
    }
  });

  it("agrees with brute force over all pairs (property)", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: 70 }).chain((n) => fc.array(bitsArb(n), { minLength: 2, maxLength: 12 })),
        (words) => {
          let best = Infinity;
          let pairs: [number, number][] = [];
          for (let i = 0; i < words.length; i++)
            for (let j = i + 1; j < words.length; j++) {
              const d = naiveDistance(words[i]!, words[j]!).length;
              if (d < best) [best, pairs] = [d, []];
              if (d === best) pairs.push([i, j]);
            }
          const r = codebookDistance(words, 1000);
          expect(r.minimumDistance).toBe(best);
          expect(r.closestPairs).toEqual(pairs);
        },
      ),
    );
  });

  it("handles 1,048,576-bit words", () => {
    const n = 1 << 20;
    const words = [0, 1, 2].map(() => new Uint8Array(n));
    words[1]!.fill(1);
    words[2]![n - 1] = 1;
    const r = codebookDistance(words, 10);
    expect(r.minimumDistance).toBe(1);
    expect(r.closestPairs).toEqual([[0, 2]]);
  });
});

describe("radius and detection", () => {
  it("t = ⌊(dmin − 1)/2⌋ and detects dmin − 1 (REFERENCES.md, common practice)", () => {
    const cases: [number, number, number][] = [
      // [dmin, t, detect] worked from the formulas by hand
      [0, 0, 0],
      [1, 0, 0],
      [2, 0, 1],
      [3, 1, 2],
      [4, 1, 3],
      [5, 2, 4],
      [7, 3, 6], // Golay (23,12): t = 3 (REFERENCES.md)
      [8, 3, 7],
    ];
    for (const [d, t, det] of cases) {
      expect(correctingRadius(d)).toBe(t);
      expect(detectionCapability(d)).toBe(det);
    }
    expect(() => correctingRadius(-1)).toThrow(InputError);
    expect(() => correctingRadius(2.5)).toThrow(InputError);
  });
});

describe("sphere volume and the Hamming bound", () => {
  it("V(7,1) = 8 and 16·8 = 128 = 2^7: Hamming (7,4) is perfect (REFERENCES.md)", () => {
    expect(sphereVolume(7, 1)).toBe(8n);
    expect(isPerfect(16, 7, 1)).toBe(true);
    expect(isPerfect(16n, 7, 1)).toBe(true);
  });

  it("Golay (23,12) with t = 3: 2^12·(1 + 23 + 253 + 1771) = 2^23 (REFERENCES.md)", () => {
    expect(sphereVolume(23, 3)).toBe(1n + 23n + 253n + 1771n);
    expect(2n ** 12n * (1n + 23n + 253n + 1771n)).toBe(2n ** 23n);
    expect(isPerfect(2 ** 12, 23, 3)).toBe(true);
    expect(hammingBoundHolds(2 ** 12, 23, 3)).toBe(true);
    expect(hammingBoundHolds(2 ** 12 + 1, 23, 3)).toBe(false);
  });

  it("non-perfect codes: extended Hamming (8,4) meets the bound but is not perfect", () => {
    // 16·(1 + 8) = 144 < 256.
    expect(isPerfect(16, 8, 1)).toBe(false);
    expect(hammingBoundHolds(16, 8, 1)).toBe(true);
  });

  it("matches Pascal's triangle, and @stdlib binomcoef where it is exact", () => {
    for (const n of [0, 1, 5, 30, 64, 120]) {
      const row = pascalRow(n);
      let acc = 0n;
      for (let t = 0; t <= n + 2; t++) {
        acc += row[t] ?? 0n;
        expect(sphereVolume(n, t)).toBe(acc);
      }
      expect(sphereVolume(n, n)).toBe(2n ** BigInt(n));
    }
    // @stdlib binomcoef is exact below 2^53.
    expect(sphereVolume(40, 2)).toBe(BigInt(1 + binomcoef(40, 1) + binomcoef(40, 2)));
  });

  it("log2BigInt is accurate for huge values", () => {
    expect(log2BigInt(1n)).toBe(0);
    expect(log2BigInt(0n)).toBe(-Infinity);
    expect(log2BigInt(2n ** 100000n)).toBe(100000);
    // log2(3·2^5000) = 5000 + log2 3.
    expect(log2BigInt(3n * 2n ** 5000n)).toBeCloseTo(5000 + Math.log2(3), 9);
    // log2(10^3000) = 3000·log2(10).
    expect(Math.abs(log2BigInt(10n ** 3000n) / (3000 * Math.log2(10)) - 1)).toBeLessThan(1e-15);
    // V(1000, 500) is half of 2^1000 plus half the middle coefficient: log2 slightly above 999.
    const v = sphereVolume(1000, 500);
    expect(v * 2n - pascalRow(1000)[500]!).toBe(2n ** 1000n);
    expect(log2BigInt(v)).toBeGreaterThan(999);
    expect(log2BigInt(v)).toBeLessThan(999.1);
    expect(() => log2BigInt(-1n)).toThrow(InputError);
  });
});
