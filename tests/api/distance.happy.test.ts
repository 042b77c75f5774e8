import { beforeAll, describe, expect, it } from "vitest";
import { postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

const call = (body: unknown) => postJson("/api/v1/distance", body, auth);

/** Independent reference: distance of two words given as integers, by XOR and counting the ones of its binary expansion. */
const xorCount = (x: bigint, y: bigint) => [...(x ^ y).toString(2)].filter((c) => c === "1").length;
const ones = (x: bigint) => [...x.toString(2)].filter((c) => c === "1").length;

/** Independent reference: Σ_{i≤t} C(n, i) by Pascal's rule (MacWilliams & Sloane, ch. 1). */
function sphere(n: number, t: number): bigint {
  let row = [1n];
  for (let i = 0; i < n; i++) row = [1n, ...row.slice(1).map((v, j) => v + row[j]!), 1n];
  return row.slice(0, t + 1).reduce((a, b) => a + b, 0n);
}

describe("POST /distance: a pair of words", () => {
  it('"1011 0010" vs "1001_0110": distance 2 at positions 2 and 5 (counted by hand, and by XOR one-liner)', async () => {
    const res = await call({ a: "1011 0010", b: "1001_0110" });
    expect(res.status, res.text).toBe(200);
    expect(res.headers["content-type"]).toMatch(/^application\/json/);
    // By hand: 1 0 1 1 0 0 1 0 / 1 0 0 1 0 1 1 0 differ at 0-based positions 2 and 5.
    expect(res.body).toMatchObject({ kind: "pair", length: 8, distance: 2, positions: [2, 5], positionsTruncated: false });
    // Independent one-liner: popcount(0b10110010 ^ 0b10010110).
    expect(res.body.distance).toBe(xorCount(0b10110010n, 0b10010110n));
    // Weights counted by hand: 1011 0010 → 4, 1001 0110 → 4.
    expect(res.body.weightA).toBe(4);
    expect(res.body.weightB).toBe(4);
  });

  it("hex f00d vs beef: distance and weights equal the XOR/popcount one-liner over the same integers", async () => {
    const res = await call({ a: { hex: "f00d" }, b: { hex: "0xBEEF" } });
    expect(res.status, res.text).toBe(200);
    expect(res.body.length).toBe(16);
    // Independent: (0xf00d ^ 0xbeef).toString(2) has 8 ones; by hand 0100 1110 1110 0010.
    expect(res.body.distance).toBe(xorCount(0xf00dn, 0xbeefn));
    expect(res.body.distance).toBe(8);
    expect(res.body.weightA).toBe(ones(0xf00dn));
    expect(res.body.weightB).toBe(ones(0xbeefn));
    // Positions where the binary expansions differ, first (most significant) bit = position 0.
    const x = (0xf00d ^ 0xbeef).toString(2).padStart(16, "0");
    expect(res.body.positions).toEqual([...x].flatMap((c, i) => (c === "1" ? [i] : [])));
  });

  it("the three ways of writing a word give the same answer", async () => {
    // 1011 0010 = 0xb2; 1001 0110 = 0x96 (hand conversion).
    const asString = await call({ a: "10110010", b: "10010110" });
    const asArray = await call({ a: [1, 0, 1, 1, 0, 0, 1, 0], b: [1, 0, 0, 1, 0, 1, 1, 0] });
    const asHex = await call({ a: { hex: "b2" }, b: { hex: "96" } });
    for (const r of [asString, asArray, asHex]) expect(r.status, r.text).toBe(200);
    expect(asArray.body).toEqual(asString.body);
    expect(asHex.body).toEqual(asString.body);
  });

  it("hex with a length keeps only the first bits: {hex:'f', length:3} is 111", async () => {
    const res = await call({ a: { hex: "f", length: 3 }, b: "000" });
    expect(res.status, res.text).toBe(200);
    expect(res.body).toMatchObject({ length: 3, distance: 3, weightA: 3, weightB: 0, positions: [0, 1, 2] });
  });

  it("identical words: distance 0, no positions (edge case)", async () => {
    const res = await call({ a: "1100", b: "1100" });
    expect(res.body).toMatchObject({ distance: 0, positions: [], positionsTruncated: false, weightA: 2, weightB: 2 });
  });

  it("empty words: length 0, distance 0 (edge case)", async () => {
    const res = await call({ a: "", b: [] });
    expect(res.status, res.text).toBe(200);
    expect(res.body).toMatchObject({ length: 0, distance: 0, weightA: 0, weightB: 0, positions: [] });
  });

  it("one-bit words (n = 1)", async () => {
    const res = await call({ a: "1", b: "0" });
    expect(res.body).toMatchObject({ length: 1, distance: 1, positions: [0] });
  });

  it("the largest allowed words (1,048,576 bits): all-zero vs 0101…: distance 524,288, positions truncated, 3 units", async () => {
    const n = 1_048_576;
    const a = "0".repeat(n);
    const b = "01".repeat(n / 2);
    const res = await call({ a, b });
    expect(res.status, res.text).toBe(200);
    // Half the positions differ: n/2, counted by construction.
    expect(res.body.length).toBe(n);
    expect(res.body.distance).toBe(n / 2);
    expect(res.body.weightA).toBe(0);
    expect(res.body.weightB).toBe(n / 2);
    expect(res.body.positionsTruncated).toBe(true);
    // The odd positions, in increasing order, as many as the response lists.
    const shown: number[] = res.body.positions;
    expect(shown.length).toBeGreaterThan(0);
    expect(shown.length).toBeLessThan(n / 2);
    shown.forEach((p, i) => expect(p).toBe(2 * i + 1));
    // The documented rule: 4 work per bit of the two words + 64 = 8,388,672; 1 unit per started 2^22 → 3.
    expect(res.headers["x-compute-units"]).toBe(String(Math.ceil((4 * 2 * n + 64) / 2 ** 22)));
    expect(res.headers["x-compute-units"]).toBe("3");
  });

  it("cost: 1 unit up to 524,280-bit words and 2 units from 524,281 (the documented rule: 4·2n + 64 work, 1 unit per started 2^22)", async () => {
    const at = async (n: number) => (await call({ a: "0".repeat(n), b: "1".repeat(n) })).headers["x-compute-units"];
    // The largest n with 4·2n + 64 ≤ 2^22.
    const largest = (2 ** 22 - 64) / 8;
    expect(largest).toBe(524_280);
    expect(await at(largest)).toBe("1");
    expect(await at(largest + 1)).toBe("2");
  });
});

describe("POST /distance: a codebook", () => {
  it("the four-word length-5 example code has dmin 3, t 1, detects 2, is not perfect (distances by hand)", async () => {
    const words = ["00000", "01101", "10110", "11011"];
    const res = await call({ codebook: words });
    expect(res.status, res.text).toBe(200);
    // By hand: weights 3, 3, 4; 01101⊕10110 = 11011 (4), 01101⊕11011 = 10110 (3), 10110⊕11011 = 01101 (3).
    expect(res.body).toMatchObject({
      kind: "codebook",
      words: 4,
      length: 5,
      minimumDistance: 3,
      correctingRadius: 1,
      detectionCapability: 2,
      closestPairs: [
        [0, 1],
        [0, 2],
        [1, 3],
        [2, 3],
      ],
      closestPairsTruncated: false,
      pairsCompared: 6,
    });
    // V(5, 1) = 1 + 5 = 6; 4·6 = 24 < 32 = 2^5: the Hamming bound holds, the code is not perfect.
    expect(res.body.sphereVolume).toBe("6");
    expect(res.body.log2SphereVolume).toBeCloseTo(Math.log2(6), 12);
    expect(res.body.perfect).toBe(false);
    expect(res.body.hammingBoundHolds).toBe(true);
  });

  it("the Hamming (7,4) code, enumerated in the test from its generator matrix: dmin 3, t 1, perfect (MacWilliams & Sloane)", async () => {
    // Systematic generator G = [I4 | P]; the columns of P with the identity give all 7 non-zero syndromes.
    const G = [
      [1, 0, 0, 0, 1, 1, 0],
      [0, 1, 0, 0, 1, 0, 1],
      [0, 0, 1, 0, 0, 1, 1],
      [0, 0, 0, 1, 1, 1, 1],
    ];
    const codewords: number[][] = [];
    for (let m = 0; m < 16; m++) {
      const bits = [0, 1, 2, 3].map((i) => (m >> (3 - i)) & 1);
      codewords.push([0, 1, 2, 3, 4, 5, 6].map((j) => bits.reduce((s, b, i) => s ^ (b & G[i]![j]!), 0)));
    }
    // The enumeration is right: weight distribution A0=1, A3=7, A4=7, A7=1 (MacWilliams & Sloane).
    const A = new Array(8).fill(0);
    for (const c of codewords) A[c.reduce((s, b) => s + b, 0)]++;
    expect(A).toEqual([1, 0, 0, 7, 7, 0, 0, 1]);

    const res = await call({ codebook: codewords.map((c) => c.join("")) });
    expect(res.status, res.text).toBe(200);
    expect(res.body).toMatchObject({ words: 16, length: 7, minimumDistance: 3, correctingRadius: 1, detectionCapability: 2, perfect: true, hammingBoundHolds: true });
    // V(7, 1) = 8 and 16·8 = 2^7 (MacWilliams & Sloane: the Hamming codes are perfect).
    expect(res.body.sphereVolume).toBe("8");
    expect(res.body.log2SphereVolume).toBeCloseTo(3, 12);
    // A linear code: every codeword has A3 = 7 neighbours at distance 3, so 16·7/2 = 56 closest pairs.
    expect(res.body.closestPairs).toHaveLength(56);
    expect(res.body.pairsCompared).toBe((16 * 15) / 2);
    for (const [i, j] of res.body.closestPairs as [number, number][]) {
      expect(i).toBeLessThan(j);
      expect(codewords[i]!.filter((b, k) => b !== codewords[j]![k]).length).toBe(3);
    }
  });

  it("the repetition code (5,1) has dmin = n = 5, t = 2, and is perfect (common practice; M·V(5,2) = 2·16 = 32)", async () => {
    const res = await call({ codebook: ["00000", "11111"] });
    expect(res.body).toMatchObject({ minimumDistance: 5, correctingRadius: 2, detectionCapability: 4, perfect: true, closestPairs: [[0, 1]] });
    expect(res.body.sphereVolume).toBe(sphere(5, 2).toString());
  });

  it("the even-weight (single parity check) code of length 4: dmin 2, t 0, detects 1", async () => {
    const even = Array.from({ length: 16 }, (_, m) => m.toString(2).padStart(4, "0")).filter((w) => [...w].filter((c) => c === "1").length % 2 === 0);
    expect(even).toHaveLength(8);
    const res = await call({ codebook: even });
    expect(res.body).toMatchObject({ words: 8, minimumDistance: 2, correctingRadius: 0, detectionCapability: 1, perfect: false, sphereVolume: "1" });
  });

  it("a codebook with a repeated word has dmin 0 and is not perfect (edge case)", async () => {
    const res = await call({ codebook: ["101", "010", "101"] });
    expect(res.body).toMatchObject({ minimumDistance: 0, correctingRadius: 0, detectionCapability: 0, perfect: false, closestPairs: [[0, 2]] });
  });

  it("codebook words may be mixed notations of one length", async () => {
    const res = await call({ codebook: ["1111", [0, 0, 0, 0], { hex: "a" }] });
    // 1111 vs 1010: 2; 0000 vs 1010: 2; 1111 vs 0000: 4.
    expect(res.body).toMatchObject({ length: 4, minimumDistance: 2, closestPairs: [[0, 2], [1, 2]] });
  });

  it("the largest allowed codebook (4,096 distinct 12-bit words): dmin 1, C(4096, 2) pairs, documented cost", async () => {
    const words = Array.from({ length: 4096 }, (_, i) => i.toString(2).padStart(12, "0"));
    const res = await call({ codebook: words });
    expect(res.status, res.text).toBe(200);
    expect(res.body.words).toBe(4096);
    expect(res.body.minimumDistance).toBe(1);
    // Every word has 12 neighbours at distance 1: 4096·12/2 = 24,576 pairs, more than the list shows.
    expect(res.body.closestPairsTruncated).toBe(true);
    expect(res.body.pairsCompared).toBe((4096 * 4095) / 2);
    // The documented rule: 4·M(M − 1)/2·⌈n/32⌉ + 8·M·n + 64 = 33,939,520 work; 1 unit per started 2^22 → 9.
    const work = 4 * ((4096 * 4095) / 2) * Math.ceil(12 / 32) + 8 * 4096 * 12 + 64;
    expect(res.headers["x-compute-units"]).toBe(String(Math.ceil(work / 2 ** 22)));
    expect(res.headers["x-compute-units"]).toBe("9");
  });

  it("the largest allowed codebook words (4,096 bits)", async () => {
    const n = 4096;
    const res = await call({ codebook: ["0".repeat(n), "1".repeat(n), "01".repeat(n / 2)] });
    expect(res.status, res.text).toBe(200);
    expect(res.body).toMatchObject({ length: n, minimumDistance: n / 2 });
  });
});
