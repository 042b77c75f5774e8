import { describe, expect, it } from "vitest";
import { rs } from "@/lib/core/codes/rs";
import { InputError } from "@/lib/core/errors";
import { mdsWeightDistribution, qarySphereVolume } from "@/lib/core/mds";

// ---- Plain arithmetic written here, independent of lib/core ----

/** C(n, k) from Pascal's triangle (MacWilliams & Sloane ch. 1). */
function binom(n: number, k: number): bigint {
  if (k < 0 || k > n) return 0n;
  let row = [1n];
  for (let i = 0; i < n; i++) row = [1n, ...row.slice(1).map((v, j) => v + row[j]!), 1n];
  return row[k]!;
}

/** Weight distribution of a Reed–Solomon code by encoding every one of its q^k messages with lib/core/codes/rs.ts. */
function enumerateRs(options: Parameters<typeof rs>[0]): bigint[] {
  const code = rs(options);
  const { n, k, q } = code;
  const counts = new Array<bigint>(n + 1).fill(0n);
  const message = new Uint16Array(k);
  const total = q ** k;
  for (let index = 0; index < total; index++) {
    // Message = the base-q digits of index.
    for (let i = 0, x = index; i < k; i++, x = Math.floor(x / q)) message[i] = x % q;
    const c = code.encode(message);
    let w = 0;
    for (let i = 0; i < n; i++) if (c[i] !== 0) w++;
    counts[w]!++;
  }
  return counts;
}

describe("mdsWeightDistribution against exhaustive enumeration of small Reed–Solomon codes", () => {
  it.each([
    ["RS (3,1) over GF(4)", { m: 2, k: 1 }, 3, 1, 4],
    ["RS (3,2) over GF(4)", { m: 2, k: 2 }, 3, 2, 4],
    ["RS (7,3) over GF(8): 512 codewords", { m: 3, k: 3 }, 7, 3, 8],
    ["RS (7,5) over GF(8): 32,768 codewords", { m: 3, k: 5 }, 7, 5, 8],
    ["RS (6,2) over GF(8), shortened by 1", { m: 3, n: 6, k: 2 }, 6, 2, 8],
    ["RS (5,3) over GF(8), shortened by 2, firstRoot 0", { m: 3, n: 5, k: 3, firstRoot: 0 }, 5, 3, 8],
    ["RS (15,3) over GF(16): 4,096 codewords", { m: 4, k: 3 }, 15, 3, 16],
    ["RS (10,4) over GF(16), shortened by 5", { m: 4, n: 10, k: 4 }, 10, 4, 16],
  ])("%s", (_name, options, n, k, q) => {
    const enumerated = enumerateRs(options);
    const formula = mdsWeightDistribution(n, k, q);
    expect(formula).toEqual(enumerated);
    // Sum = q^k words; A_0 = 1; nothing below d = n − k + 1; A_d = C(n, d)(q − 1) (MacWilliams & Sloane ch. 11).
    const d = n - k + 1;
    expect(formula.reduce((s, a) => s + a, 0n)).toBe(BigInt(q) ** BigInt(k));
    expect(formula[0]).toBe(1n);
    for (let w = 1; w < d; w++) expect(formula[w]).toBe(0n);
    expect(formula[d]).toBe(binom(n, d) * BigInt(q - 1));
  });
});

describe("mdsWeightDistribution: closed-form checks beyond enumeration", () => {
  it("RS (255,223) over GF(256): sums to 256^223, A_33 = C(255,33)·255, and A_w = 0 for 0 < w < 33", () => {
    const A = mdsWeightDistribution(255, 223, 256);
    expect(A).toHaveLength(256);
    expect(A.reduce((s, a) => s + a, 0n)).toBe(256n ** 223n);
    expect(A[33]).toBe(binom(255, 33) * 255n);
    expect(A.slice(1, 33).every((a) => a === 0n)).toBe(true);
    expect(A.every((a) => a >= 0n)).toBe(true);
  });

  it("k = n (the whole space, d = 1): A_w = C(n, w)(q − 1)^w, words with w non-zero symbols (edge case)", () => {
    const n = 6;
    const q = 5;
    const A = mdsWeightDistribution(n, n, q);
    A.forEach((a, w) => expect(a).toBe(binom(n, w) * BigInt(q - 1) ** BigInt(w)));
  });

  it("k = 1 (a repetition code over GF(q), d = n): A_0 = 1, A_n = q − 1, nothing else (edge case)", () => {
    const A = mdsWeightDistribution(7, 1, 8);
    expect(A).toEqual([1n, 0n, 0n, 0n, 0n, 0n, 0n, 7n]);
  });

  it("q = 2: the binary MDS codes [n, n−1, 2] (even weight) have A_w = C(n, w) for even w", () => {
    const n = 9;
    const A = mdsWeightDistribution(n, n - 1, 2);
    A.forEach((a, w) => expect(a).toBe(w % 2 === 0 ? binom(n, w) : 0n));
  });

  it.each([
    ["k = 0", 5, 0, 4],
    ["k > n", 5, 6, 4],
    ["non-integer n", 5.5, 2, 4],
    ["q = 1", 5, 2, 1],
  ])("refuses %s with an InputError", (_name, n, k, q) => {
    expect(() => mdsWeightDistribution(n, k, q)).toThrow(InputError);
  });
});

describe("qarySphereVolume against a direct count", () => {
  /** Words of length n over {0..q−1} with at most t non-zero entries, counted one by one. */
  function countBall(n: number, t: number, q: number): bigint {
    let count = 0n;
    const total = q ** n;
    for (let index = 0; index < total; index++) {
      let nonzero = 0;
      for (let i = 0, x = index; i < n; i++, x = Math.floor(x / q)) if (x % q !== 0) nonzero++;
      if (nonzero <= t) count++;
    }
    return count;
  }

  it.each([
    [5, 4],
    [6, 3],
    [4, 8],
    [8, 2],
  ])("n = %i, q = %i: every t from 0 to n + 1", (n, q) => {
    for (let t = 0; t <= n + 1; t++) expect(qarySphereVolume(n, t, q), `t = ${t}`).toBe(countBall(n, Math.min(t, n), q));
  });

  it("the radius-n ball is the whole space q^n; radius 0 is one word", () => {
    expect(qarySphereVolume(15, 15, 16)).toBe(16n ** 15n);
    expect(qarySphereVolume(15, 0, 16)).toBe(1n);
  });

  it("V_16(15, 2) = 1 + 15·15 + C(15,2)·15² = 23,851 (the RS (15,11) decoding sphere)", () => {
    expect(qarySphereVolume(15, 2, 16)).toBe(BigInt(1 + 15 * 15 + 105 * 225));
  });
});
