import { beforeAll, describe, expect, it } from "vitest";
import { postJson, relErr } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

interface Bound {
  holds: boolean;
  tight: boolean;
  maxDistance?: number;
}
interface AnalyzeBody {
  code: { family: string; name: string; n: number; k: number; q: number };
  n: number;
  k: number;
  rate: number;
  minimumDistance: number;
  correctingRadius: number;
  detectionCapability: number;
  sphereVolume: string;
  log2SphereVolume: number;
  weightDistribution: { method: string; terms: { weight: number; count: string }[] };
  bounds: { hamming: Bound; singleton: Bound & { maxDistance: number }; plotkin?: { applicable: boolean }; gilbertVarshamov?: { distance: number; reached: boolean } };
  perfect: boolean;
  mds: boolean;
  undetectedError?: { value: number; log10: number | null };
  matrices?: { generator: string[]; parityCheck: string[]; permutation: number[]; permuted: boolean };
  matricesOmitted?: string;
}

async function analyze(body: unknown): Promise<AnalyzeBody> {
  const res = await postJson("/api/v1/codes/analyze", body, auth);
  expect(res.status, res.text).toBe(200);
  return res.body as AnalyzeBody;
}

/** The weight distribution as { weight: count } with BigInt counts. */
const dist = (b: AnalyzeBody) => Object.fromEntries(b.weightDistribution.terms.map((t) => [t.weight, BigInt(t.count)]));
const total = (b: AnalyzeBody) => b.weightDistribution.terms.reduce((s, t) => s + BigInt(t.count), 0n);

/** C(n, k) exactly, by the multiplicative formula. */
function binom(n: number, k: number): bigint {
  let r = 1n;
  for (let i = 1; i <= k; i++) r = (r * BigInt(n - k + i)) / BigInt(i);
  return r;
}

/** G·Hᵀ over GF(2), computed here: every entry must be 0 when H is a parity-check matrix of the code of G. */
function expectOrthogonal(G: string[], H: string[]) {
  for (const g of G) for (const h of H) expect([...g].reduce((s, x, j) => s ^ (Number(x) & Number(h[j])), 0), `${g} · ${h}`).toBe(0);
}

/** Rank over GF(2) by Gaussian elimination on BigInt rows. */
function rank(rows: string[]): number {
  const v = rows.map((r) => BigInt(`0b${r}`));
  let r = 0;
  for (let bit = rows[0]!.length - 1; bit >= 0; bit--) {
    const mask = 1n << BigInt(bit);
    const p = v.findIndex((x, i) => i >= r && (x & mask) !== 0n);
    if (p < 0) continue;
    [v[r], v[p]] = [v[p]!, v[r]!];
    for (let i = 0; i < v.length; i++) if (i !== r && (v[i]! & mask) !== 0n) v[i]! ^= v[r]!;
    r++;
  }
  return r;
}

/** Checks that the returned matrices are G = [I_k | P] and H = [Pᵀ | I_{n−k}] (after the stated permutation), of full rank, with G·Hᵀ = 0. */
function expectSystematicMatrices(b: AnalyzeBody) {
  const m = b.matrices!;
  expect(m).toBeDefined();
  const { n, k } = b;
  expect(m.generator).toHaveLength(k);
  expect(m.parityCheck).toHaveLength(n - k);
  m.generator.forEach((row, i) => expect(row.slice(0, k)).toBe("0".repeat(i) + "1" + "0".repeat(k - 1 - i)));
  m.parityCheck.forEach((row, j) => {
    expect(row.slice(k)).toBe("0".repeat(j) + "1" + "0".repeat(n - k - 1 - j));
    // H's left block is Pᵀ: entry (j, i) = P(i, j) = G(i, k + j).
    expect(row.slice(0, k)).toBe(m.generator.map((g) => g[k + j]).join(""));
  });
  expectOrthogonal(m.generator, m.parityCheck);
  expect(rank(m.generator)).toBe(k);
  expect(rank(m.parityCheck)).toBe(n - k);
  expect([...m.permutation].sort((a, c) => a - c)).toEqual(Array.from({ length: n }, (_, j) => j));
}

describe("POST /codes/analyze: Hamming codes", () => {
  it("(7,4): A0=1, A3=7, A4=7, A7=1, perfect, dmin 3, t 1, detects 2 (MacWilliams & Sloane; REFERENCES.md)", async () => {
    const b = await analyze({ code: { family: "hamming", r: 3 } });
    expect(b).toMatchObject({ n: 7, k: 4, minimumDistance: 3, correctingRadius: 1, detectionCapability: 2, perfect: true, mds: false });
    expect(b.rate).toBe(4 / 7);
    expect(dist(b)).toEqual({ 0: 1n, 3: 7n, 4: 7n, 7: 1n });
    // V(7, 1) = 1 + 7 = 8 and 2^4 · 8 = 2^7: the Hamming bound is met with equality (perfect).
    expect(b.sphereVolume).toBe("8");
    expect(b.log2SphereVolume).toBe(3);
    expect(b.bounds.hamming).toMatchObject({ holds: true, tight: true });
    // Singleton: d ≤ n − k + 1 = 4, not tight for d = 3.
    expect(b.bounds.singleton).toMatchObject({ holds: true, tight: false, maxDistance: 4 });
  });

  it("(7,4): systematic G and H are returned with G·Hᵀ = 0, and G's rows are codewords of the code /encode produces", async () => {
    const b = await analyze({ code: { family: "hamming", r: 3 } });
    expectSystematicMatrices(b);
    const m = b.matrices!;
    const units = ["1000", "0100", "0010", "0001"];
    const enc = await postJson("/api/v1/encode", { code: { family: "hamming", r: 3 }, messages: units }, auth);
    const codewords = (enc.body as { codewords: { codeword: string }[] }).codewords.map((c) => c.codeword);
    // Row i of the systematic G, columns put back in the code's order, is the codeword of unit message i.
    m.generator.forEach((row, i) => {
      const original = new Array<string>(7);
      m.permutation.forEach((col, j) => (original[col] = row[j]!));
      expect(original.join("")).toBe(codewords[i]);
    });
  });

  it("(7,4) at p = 0.01: undetected-error probability = 7p^3(1−p)^4 + 7p^4(1−p)^3 + p^7 (Σ A_i p^i (1−p)^(n−i), MacWilliams & Sloane ch. 1), relative tolerance 1e-12", async () => {
    const p = 0.01;
    const b = await analyze({ code: { family: "hamming", r: 3 }, p });
    const expected = 7 * p ** 3 * (1 - p) ** 4 + 7 * p ** 4 * (1 - p) ** 3 + p ** 7;
    expect(relErr(b.undetectedError!.value, expected)).toBeLessThan(1e-12);
    expect(Math.abs(b.undetectedError!.log10! - Math.log10(expected))).toBeLessThan(1e-12);
  });

  it("(7,4): p = 0 gives an undetected-error probability of exactly 0 (edge case); without p the field is absent", async () => {
    const b = await analyze({ code: { family: "hamming", r: 3 }, p: 0 });
    expect(b.undetectedError).toEqual({ value: 0, log10: null });
    const none = await analyze({ code: { family: "hamming", r: 3 } });
    expect(none.undetectedError).toBeUndefined();
  });

  it("extended (8,4): A0=1, A4=14, A8=1, dmin 4, not perfect (MacWilliams & Sloane)", async () => {
    const b = await analyze({ code: { family: "hamming", r: 3, extended: true } });
    expect(b).toMatchObject({ n: 8, k: 4, minimumDistance: 4, correctingRadius: 1, detectionCapability: 3, perfect: false, mds: false });
    expect(dist(b)).toEqual({ 0: 1n, 4: 14n, 8: 1n });
    expectSystematicMatrices(b);
  });

  it("(511,502): A_3 = n(n−1)/6 = 43,435 (weight-3 words of a Hamming code, MacWilliams & Sloane ch. 1), 2^502 words in all, perfect; G and H too large to return", async () => {
    const b = await analyze({ code: { family: "hamming", r: 9 } });
    expect(b.weightDistribution.method).toBe("dual");
    expect(dist(b)[3]).toBe(BigInt((511 * 510) / 6));
    expect(total(b)).toBe(2n ** 502n);
    expect(b.perfect).toBe(true);
    // 502 · 511 entries are more than 65,536.
    expect(b.matrices).toBeUndefined();
    expect(b.matricesOmitted).toMatch(/65536/);
  });

  it("matrices: false leaves them out", async () => {
    const b = await analyze({ code: { family: "hamming", r: 3 }, matrices: false });
    expect(b.matrices).toBeUndefined();
    expect(b.matricesOmitted).toBeUndefined();
  });
});

describe("POST /codes/analyze: Golay codes", () => {
  it("(23,12): A0=1, A7=253, A8=506, A11=1288, A12=1288, A15=506, A16=253, A23=1; perfect, t = 3 (MacWilliams & Sloane; REFERENCES.md)", async () => {
    const b = await analyze({ code: { family: "golay" } });
    expect(dist(b)).toEqual({ 0: 1n, 7: 253n, 8: 506n, 11: 1288n, 12: 1288n, 15: 506n, 16: 253n, 23: 1n });
    expect(b).toMatchObject({ n: 23, k: 12, minimumDistance: 7, correctingRadius: 3, perfect: true });
    // V(23, 3) = 1 + 23 + 253 + 1771 = 2048 = 2^11.
    expect(b.sphereVolume).toBe(String(1 + 23 + 253 + 1771));
    expect(b.bounds.hamming.tight).toBe(true);
    expectSystematicMatrices(b);
  });

  it("(24,12): A0=1, A8=759, A12=2576, A16=759, A24=1; dmin 8, not perfect (MacWilliams & Sloane)", async () => {
    const b = await analyze({ code: { family: "golay", extended: true } });
    expect(dist(b)).toEqual({ 0: 1n, 8: 759n, 12: 2576n, 16: 759n, 24: 1n });
    expect(b).toMatchObject({ n: 24, k: 12, minimumDistance: 8, correctingRadius: 3, detectionCapability: 7, perfect: false });
    expect(total(b)).toBe(4096n);
    expectSystematicMatrices(b);
  });
});

describe("POST /codes/analyze: BCH", () => {
  it("(15,7), t = 2: dmin 5, and the weight distribution equals the one enumerated here from g(x) = 721 octal (Lin & Costello BCH table)", async () => {
    const b = await analyze({ code: { family: "bch", m: 4, t: 2 } });
    expect(b).toMatchObject({ n: 15, k: 7, minimumDistance: 5, correctingRadius: 2, detectionCapability: 4 });
    // Independent enumeration: the codewords are m(x)·g(x) for all 2^7 messages m(x) of degree < 7 (a cyclic code, Lin & Costello ch. 5).
    const counts: Record<number, bigint> = {};
    for (let m = 0; m < 128; m++) {
      let c = 0;
      for (let i = 0; i < 7; i++) if ((m >> i) & 1) c ^= 0o721 << i;
      const w = c.toString(2).replaceAll("0", "").length;
      counts[w] = (counts[w] ?? 0n) + 1n;
    }
    expect(dist(b)).toEqual(counts);
    expectSystematicMatrices(b);
  });

  it("(31,21), t = 2, from the dual (n − k = 10): dmin 5 and 2^21 words", async () => {
    const b = await analyze({ code: { family: "bch", m: 5, t: 2 }, matrices: false });
    expect(b.weightDistribution.method).toBe("dual");
    expect(b.minimumDistance).toBe(5);
    expect(total(b)).toBe(2n ** 21n);
  });
});

describe("POST /codes/analyze: Reed–Solomon (MDS)", () => {
  it("RS (15,11) over GF(16): MDS, dmin 5; weights sum to 16^11 and A_5 = C(15,5)·(16−1) (MacWilliams & Sloane ch. 11: A_d = C(n,d)(q−1))", async () => {
    const b = await analyze({ code: { family: "rs", m: 4, k: 11 } });
    expect(b).toMatchObject({ n: 15, k: 11, minimumDistance: 5, correctingRadius: 2, detectionCapability: 4, mds: true, perfect: false });
    expect(b.code.q).toBe(16);
    expect(b.weightDistribution.method).toBe("mds-formula");
    expect(total(b)).toBe(16n ** 11n);
    const A = dist(b);
    expect(A[0]).toBe(1n);
    expect(A[5]).toBe(binom(15, 5) * 15n);
    // No non-zero word lighter than d = n − k + 1 = 5.
    expect(b.weightDistribution.terms.filter((t) => t.weight > 0).every((t) => t.weight >= 5)).toBe(true);
    expect(b.bounds.singleton).toMatchObject({ holds: true, tight: true, maxDistance: 5 });
    // V_16(15, 2) = 1 + 15·15 + C(15,2)·15² and q^k·V ≤ q^n holds, not tight.
    expect(b.sphereVolume).toBe(String(1 + 15 * 15 + 105 * 225));
    expect(b.bounds.hamming).toMatchObject({ holds: true, tight: false });
  });

  it("RS (26,16) over GF(256), QR parameters: dmin 11, t 5, weights sum to 256^16", async () => {
    const b = await analyze({ code: { family: "rs", m: 8, n: 26, k: 16, firstRoot: 0 } });
    expect(b).toMatchObject({ minimumDistance: 11, correctingRadius: 5, mds: true });
    expect(total(b)).toBe(256n ** 16n);
    expect(dist(b)[11]).toBe(binom(26, 11) * 255n);
  });
});

describe("POST /codes/analyze: bound flags on trivial codes", () => {
  it("repetition (5,1): MDS (d = n = n − k + 1) and perfect (odd-length repetition codes are perfect, MacWilliams & Sloane ch. 6)", async () => {
    const b = await analyze({ code: { family: "repetition", n: 5 } });
    expect(b).toMatchObject({ minimumDistance: 5, correctingRadius: 2, perfect: true, mds: true });
    expect(dist(b)).toEqual({ 0: 1n, 5: 1n });
    expect(b.bounds.singleton.tight).toBe(true);
    expect(b.bounds.hamming.tight).toBe(true);
  });

  it("repetition (4,1): MDS but not perfect (even length)", async () => {
    const b = await analyze({ code: { family: "repetition", n: 4 } });
    expect(b).toMatchObject({ minimumDistance: 4, perfect: false, mds: true });
  });

  it("even parity (6,5): MDS with d = 2, A_w = C(6, w) for even w (every even-weight word is a codeword)", async () => {
    const b = await analyze({ code: { family: "parity", n: 6 } });
    expect(b).toMatchObject({ minimumDistance: 2, correctingRadius: 0, detectionCapability: 1, mds: true, perfect: false });
    expect(dist(b)).toEqual({ 0: 1n, 2: binom(6, 2), 4: binom(6, 4), 6: 1n });
  });
});

describe("POST /codes/analyze: closed forms of the repetition and even-parity families", () => {
  /** Weights of all 2^k sums of the rows of G, enumerated here over integers (MacWilliams & Sloane, ch. 1). */
  function enumerate(rows: string[]): Record<number, bigint> {
    const counts: Record<number, bigint> = {};
    for (let mask = 0; mask < 2 ** rows.length; mask++) {
      let c = 0n;
      rows.forEach((row, i) => {
        if ((mask >> i) & 1) c ^= BigInt("0b" + row);
      });
      const w = [...c.toString(2)].filter((b) => b === "1").length;
      counts[w] = (counts[w] ?? 0n) + 1n;
    }
    return counts;
  }

  it.each([1, 2, 9, 16])("repetition (%d,1): closed form = enumeration of G = [1 1 … 1]", async (n) => {
    const b = await analyze({ code: { family: "repetition", n } });
    expect(b.weightDistribution.method).toBe("closed-form");
    expect(dist(b)).toEqual(enumerate(["1".repeat(n)]));
    expect(b.minimumDistance).toBe(n);
  });

  it.each([2, 3, 10, 14])("even parity (%d, n − 1): closed form = enumeration of G = [I | 1]", async (n) => {
    const b = await analyze({ code: { family: "parity", n } });
    expect(b.weightDistribution.method).toBe("closed-form");
    const rows = Array.from({ length: n - 1 }, (_, i) => "0".repeat(i) + "1" + "0".repeat(n - 2 - i) + "1");
    expect(dist(b)).toEqual(enumerate(rows));
    expect(b).toMatchObject({ minimumDistance: 2, mds: true });
  });

  it("the systematic matrices still come with a closed-form distribution: repetition (5,1) has G = [1 1 1 1 1]", async () => {
    const b = await analyze({ code: { family: "repetition", n: 5 } });
    expect(b.matrices?.generator).toEqual(["11111"]);
    expect(b.matrices?.parityCheck).toHaveLength(4);
  });
});

describe("POST /codes/analyze: linear codes and CRCs", () => {
  it("a (6,3) code from G: the weights enumerated here from the 8 combinations of rows, and G·Hᵀ = 0", async () => {
    const G = ["100110", "010101", "001011"];
    const b = await analyze({ code: { family: "linear", generator: G }, p: 0.01 });
    const counts: Record<number, bigint> = {};
    for (let m = 0; m < 8; m++) {
      let c = 0;
      G.forEach((row, i) => {
        if ((m >> i) & 1) c ^= parseInt(row, 2);
      });
      const w = c.toString(2).replaceAll("0", "").length;
      counts[w] = (counts[w] ?? 0n) + 1n;
    }
    expect(dist(b)).toEqual(counts);
    expect(b.minimumDistance).toBe(3);
    expectSystematicMatrices(b);
    // The given G is already systematic, so no column moves and the returned G is G itself.
    expect(b.matrices!.permuted).toBe(false);
    expect(b.matrices!.generator).toEqual(G);
    // P_ud = Σ A_i p^i (1−p)^(6−i), summed here.
    const p = 0.01;
    const expected = Object.entries(counts).reduce((s, [w, a]) => (Number(w) === 0 ? s : s + Number(a) * p ** Number(w) * (1 - p) ** (6 - Number(w))), 0);
    expect(relErr(b.undetectedError!.value, expected)).toBeLessThan(1e-12);
  });

  it("a code from a parity-check matrix whose G needs a column permutation: permutation stated, G·Hᵀ = 0", async () => {
    // Columns 3 and 4 of this H are equal, so columns 3..5 of H are dependent and columns 0..2 of any G of the code are
    // too (G = [I|P] in the given order would need H = [Pᵀ|I] there): a column permutation is needed.
    const H = ["100110", "010110", "001001"];
    const b = await analyze({ code: { family: "linear", parityCheck: H } });
    expect(b).toMatchObject({ n: 6, k: 3 });
    expectSystematicMatrices(b);
    expect(b.matrices!.permuted).toBe(true);
    // Back in the code's own column order, each row of G must satisfy the given H.
    const m = b.matrices!;
    const rows = m.generator.map((row) => {
      const original = new Array<string>(6);
      m.permutation.forEach((col, j) => (original[col] = row[j]!));
      return original.join("");
    });
    expectOrthogonal(rows, H);
  });

  it("CRC-3/GSM (g = x^3 + x + 1, primitive) protecting 4 bits is the cyclic Hamming (7,4) code: A0=1, A3=7, A4=7, A7=1 (MacWilliams & Sloane ch. 7)", async () => {
    const b = await analyze({ code: { family: "crc", preset: "CRC-3/GSM" }, crcMessageBits: 4 });
    expect(b).toMatchObject({ n: 7, k: 4, minimumDistance: 3, perfect: true });
    expect(dist(b)).toEqual({ 0: 1n, 3: 7n, 4: 7n, 7: 1n });
  });

  it("CRC-8/SMBUS protecting 16 bits: 2^16 words, weights all even (g(x) = x^8+x^2+x+1 has the factor x + 1)", async () => {
    const b = await analyze({ code: { family: "crc", preset: "CRC-8/SMBUS" }, crcMessageBits: 16, p: 0.01 });
    expect(b).toMatchObject({ n: 24, k: 16 });
    expect(total(b)).toBe(2n ** 16n);
    // (x + 1) | g: g(1) = 1 + 1 + 1 + 1 = 0 over GF(2), so every codeword has even weight.
    expect(b.weightDistribution.terms.every((t) => t.weight % 2 === 0)).toBe(true);
    expect(b.undetectedError!.value).toBeGreaterThan(0);
  });

  it("a small analysis costs 1 compute unit", async () => {
    const res = await postJson("/api/v1/codes/analyze", { code: { family: "hamming", r: 3 } }, auth);
    expect(Number(res.headers["x-compute-units"])).toBe(1);
  });
});
