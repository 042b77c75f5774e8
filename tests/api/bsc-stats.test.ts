import binomialPmf from "@stdlib/stats-base-dists-binomial-pmf";
import { beforeAll, describe, expect, it } from "vitest";
import { postJson, relErr } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

interface Tail {
  value: number;
  log10: number | null;
}
interface BscBody {
  flipCount: { mean: number; standardDeviation: number; mostLikely: number; mostLikelyProbability: Tail; tiedWith?: number };
  flips?: unknown;
  decoding?: unknown;
  more?: string;
}

async function bsc(body: unknown): Promise<BscBody> {
  const res = await postJson("/api/v1/channels/bsc", body, auth);
  expect(res.status, res.text).toBe(200);
  return res.body as BscBody;
}

/** Reference moments and modes of Bin(n, p) summed straight from the @stdlib binomial pmf over every count 0..n. */
function reference(n: number, p: number) {
  const pmf = Array.from({ length: n + 1 }, (_, i) => binomialPmf(i, n, p));
  const mean = pmf.reduce((s, q, i) => s + i * q, 0);
  const variance = pmf.reduce((s, q, i) => s + (i - mean) ** 2 * q, 0);
  const top = Math.max(...pmf);
  // Counts within rounding of the largest probability: two when the mode is tied.
  const modes = pmf.flatMap((q, i) => (relErr(q, top) < 1e-12 ? [i] : []));
  return { mean, sd: Math.sqrt(variance), modes, top };
}

describe("POST /channels/bsc with n and p only: the flip count's statistics (reference: @stdlib binomial pmf)", () => {
  it.each([
    [7, 0.001],
    [10, 0.3],
    [100, 0.05],
    [1000, 0.5],
    [250, 0.0173],
  ])("n = %i, p = %f: mean, standard deviation and most likely count with its probability", async (n, p) => {
    const { flipCount } = await bsc({ n, p });
    const ref = reference(n, p);
    expect(relErr(flipCount.mean, ref.mean)).toBeLessThan(1e-12);
    expect(relErr(flipCount.standardDeviation, ref.sd)).toBeLessThan(1e-9);
    expect(ref.modes).toEqual([flipCount.mostLikely]);
    expect(flipCount.tiedWith).toBeUndefined();
    expect(relErr(flipCount.mostLikelyProbability.value, ref.top)).toBeLessThan(1e-9);
  });

  it("n = 9, p = 0.1: (n + 1)p = 1, so 0 and 1 flips are equally likely, and the response says so", async () => {
    const { flipCount } = await bsc({ n: 9, p: 0.1 });
    const ref = reference(9, 0.1);
    expect(ref.modes).toEqual([0, 1]);
    expect(flipCount).toMatchObject({ mostLikely: 1, tiedWith: 0 });
    expect(relErr(flipCount.mostLikelyProbability.value, ref.top)).toBeLessThan(1e-9);
  });

  it("p = 1: every bit flips, the most likely count is n with probability 1 and no spread", async () => {
    const { flipCount } = await bsc({ n: 12, p: 1 });
    expect(flipCount).toMatchObject({ mean: 12, standardDeviation: 0, mostLikely: 12, mostLikelyProbability: { value: 1, log10: 0 } });
    expect(flipCount.tiedWith).toBeUndefined();
  });

  it("the `more` note names what `flips` and `t` would add, and only what is missing", async () => {
    const bare = await bsc({ n: 7, p: 0.01 });
    expect(bare.flips).toBeUndefined();
    expect(bare.decoding).toBeUndefined();
    expect(bare.more).toMatch(/`flips: i` adds P\(exactly \/ at most \/ more than i flips\)/);
    expect(bare.more).toMatch(/`t`.*block error probability.*post-decoding BER/);
    const withFlips = await bsc({ n: 7, p: 0.01, flips: 2 });
    expect(withFlips.more).not.toMatch(/flips: i/);
    expect(withFlips.more).toMatch(/`t`/);
    const all = await bsc({ n: 7, p: 0.01, flips: 2, t: 1 });
    expect(all.more).toBeUndefined();
    expect(all.flipCount.mostLikely).toBe(0);
  });
});
