import { beforeAll, describe, expect, it } from "vitest";
import { postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

// Two keys: 1,024 single-word calls would exceed one key's 600 requests a minute.
let auths: string[];
beforeAll(async () => {
  auths = [(await makeOrgWithKey({ scopes: ["compute"] })).auth, (await makeOrgWithKey({ scopes: ["compute"] })).auth];
});

/** Seeded PRNG (mulberry32): the same words on every run. */
function rng(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let x = Math.imul(s ^ (s >>> 15), s | 1);
    x ^= x + Math.imul(x ^ (x >>> 7), x | 61);
    return ((x ^ (x >>> 14)) >>> 0) / 4294967296;
  };
}

async function decodeOk(body: unknown, auth: string) {
  const res = await postJson("/api/v1/decode", body, auth);
  expect(res.status, res.text).toBe(200);
  return res.body as { results: { failure: boolean; correctedPositions: number[] }[]; failures: number };
}

describe("POST /decode: a batch answers what the same words answer one per call", () => {
  it("extended Hamming (8,4): 1,024 seeded random 8-bit words (codewords, single and double errors) in one call = 1,024 calls of one word", async () => {
    const code = { family: "hamming", r: 3, extended: true };
    const next = rng(84);
    const words = Array.from({ length: 1024 }, () => Array.from({ length: 8 }, () => (next() < 0.5 ? "0" : "1")).join(""));
    const batch = await decodeOk({ code, words }, auths[0]!);
    expect(batch.results).toHaveLength(1024);

    const single: unknown[] = [];
    for (let start = 0; start < words.length; start += 16) {
      const chunk = words.slice(start, start + 16).map((w, j) => decodeOk({ code, words: [w] }, auths[(start + j) % 2]!));
      for (const body of await Promise.all(chunk)) single.push(body.results[0]);
    }
    batch.results.forEach((r, i) => expect(r, `word ${i}: ${words[i]}`).toEqual(single[i]));

    // Random 8-bit words hold all three cases: 16 of the 256 are codewords, 128 one error away, 112 two (MacWilliams & Sloane ch. 1: SEC-DED).
    expect(batch.failures).toBe(batch.results.filter((r) => r.failure).length);
    expect(batch.failures).toBeGreaterThan(0);
    expect(batch.results.some((r) => !r.failure && r.correctedPositions.length === 1)).toBe(true);
    expect(batch.results.some((r) => !r.failure && r.correctedPositions.length === 0)).toBe(true);
  }, 120000);
});
