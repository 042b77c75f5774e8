import binomialCdf from "@stdlib/stats-base-dists-binomial-cdf";
import binomialLogPmf from "@stdlib/stats-base-dists-binomial-logpmf";
import binomialPmf from "@stdlib/stats-base-dists-binomial-pmf";
import { beforeAll, describe, expect, it } from "vitest";
import { postJson, relErr } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

// References: the @stdlib binomial pmf / cdf / logpmf (general-purpose library), and textbook identities named at each check.
// Tolerances: relative 1e-9 on probabilities, absolute 1e-9 on their log10, unless a check says otherwise.
const REL = 1e-9;
const ABS_LOG = 1e-9;

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

const call = async (body: unknown) => {
  const res = await postJson("/api/v1/channels/bsc", body, auth);
  expect(res.status, res.text).toBe(200);
  return res;
};

/** Independent: ln Σ_{j=from}^{to} exp(logpmf(j)) by log-sum-exp over the @stdlib log pmf, stopping once terms are negligible. */
function lnUpperTail(n: number, t: number, p: number, weight: (j: number) => number = () => 1): number {
  const terms: number[] = [];
  for (let j = t + 1; j <= n; j++) {
    const lt = binomialLogPmf(j, n, p) + Math.log(weight(j));
    terms.push(lt);
    const top = Math.max(...terms.slice(0, 50));
    if (j > t + 50 && lt < top - 60) break;
  }
  const m = Math.max(...terms);
  return m + Math.log(terms.reduce((s, x) => s + Math.exp(x - m), 0));
}

/** Independent: 1 − H2(p) (Shannon 1948) straight from the definition. */
const bscCap = (p: number) => (p === 0 || p === 1 ? 1 : 1 + p * Math.log2(p) + (1 - p) * Math.log2(1 - p));

function expectTail(tail: { value: number; log10: number | null }, ref: number, log10Ref = Math.log10(ref)) {
  expect(relErr(tail.value, ref)).toBeLessThan(REL);
  expect(tail.log10).not.toBeNull();
  expect(Math.abs(tail.log10! - log10Ref)).toBeLessThan(ABS_LOG);
}

describe("POST /channels/bsc", () => {
  it("P(more than 1 flip in 7) at p = 1e-3 equals 1 − binomial cdf(1; 7, 1e-3) (@stdlib binomial-cdf)", async () => {
    const res = await call({ n: 7, p: 1e-3, flips: 1 });
    // @stdlib/stats-base-dists-binomial-cdf and -pmf.
    const moreThan = 1 - binomialCdf(1, 7, 1e-3);
    expectTail(res.body.flips.moreThan, moreThan);
    // The same tail summed term by term from @stdlib binomial-pmf.
    const summed = [2, 3, 4, 5, 6, 7].reduce((s, j) => s + binomialPmf(j, 7, 1e-3), 0);
    expect(relErr(res.body.flips.moreThan.value, summed)).toBeLessThan(REL);
    expectTail(res.body.flips.exactly, binomialPmf(1, 7, 1e-3));
    expectTail(res.body.flips.atMost, binomialCdf(1, 7, 1e-3));
    expect(res.body.flips.i).toBe(1);
  });

  it("a single-error-correcting length-7 code: block error = P(>1 flip), post-decoding BER = (1/n)·Σ_{j>1} j·P(j) (@stdlib binomial-pmf)", async () => {
    const res = await call({ n: 7, p: 1e-3, t: 1 });
    expect(res.body.decoding.t).toBe(1);
    const block = [2, 3, 4, 5, 6, 7].reduce((s, j) => s + binomialPmf(j, 7, 1e-3), 0);
    expectTail(res.body.decoding.blockError, block);
    const ber = [2, 3, 4, 5, 6, 7].reduce((s, j) => s + j * binomialPmf(j, 7, 1e-3), 0) / 7;
    expectTail(res.body.decoding.postDecodingBer, ber);
    // Capacity 1 − H2(p) (Shannon 1948), relative 1e-12.
    expect(relErr(res.body.capacity.value, bscCap(1e-3))).toBeLessThan(1e-12);
    expect(res.body.capacity.unit).toBe("bits per channel use");
    expect(res.body).toMatchObject({ n: 7, p: 1e-3 });
    expect(res.body.caution).toMatch(/safety-critical/);
    expect(res.body.flips).toBeUndefined();
  });

  it("more than 3 flips in a 1,000-bit frame at p = 5e-4 (@stdlib binomial-cdf)", async () => {
    const res = await call({ n: 1000, p: 0.0005, flips: 3 });
    expectTail(res.body.flips.moreThan, 1 - binomialCdf(3, 1000, 0.0005), undefined);
    expect(res.body.decoding).toBeUndefined();
  });

  it("at the largest n (10^6) and the mean number of flips: pmf and cdf (@stdlib; relative 1e-8)", async () => {
    const res = await call({ n: 1_000_000, p: 1e-3, flips: 1000 });
    expect(relErr(res.body.flips.exactly.value, binomialPmf(1000, 1_000_000, 1e-3))).toBeLessThan(1e-8);
    expect(relErr(res.body.flips.atMost.value, binomialCdf(1000, 1_000_000, 1e-3))).toBeLessThan(1e-8);
    expect(relErr(res.body.flips.moreThan.value, 1 - binomialCdf(1000, 1_000_000, 1e-3))).toBeLessThan(1e-8);
  });

  it("a deep tail (n = 10^6, p = 1e-9, t = 60): log10 of the block error from a log-sum-exp of @stdlib binomial-logpmf", async () => {
    const res = await call({ n: 1_000_000, p: 1e-9, t: 60 });
    const ln = lnUpperTail(1_000_000, 60, 1e-9);
    expect(Math.abs(res.body.decoding.blockError.log10 - ln / Math.LN10)).toBeLessThan(1e-8);
    expect(relErr(res.body.decoding.blockError.value, Math.exp(ln))).toBeLessThan(1e-7);
    const lnBer = lnUpperTail(1_000_000, 60, 1e-9, (j) => j) - Math.log(1_000_000);
    expect(Math.abs(res.body.decoding.postDecodingBer.log10 - lnBer / Math.LN10)).toBeLessThan(1e-8);
  });

  it("a tail below the double range (n = 10^6, p = 1e-15, t = 100): value 0, log10 finite and right (@stdlib binomial-logpmf)", async () => {
    const res = await call({ n: 1_000_000, p: 1e-15, t: 100 });
    const log10 = lnUpperTail(1_000_000, 100, 1e-15) / Math.LN10;
    expect(log10).toBeLessThan(-400);
    expect(res.body.decoding.blockError.value).toBe(0);
    expect(res.body.decoding.blockError.log10).not.toBeNull();
    // Relative 1e-9 on a log10 near −1000.
    expect(relErr(res.body.decoding.blockError.log10, log10)).toBeLessThan(1e-9);
  });

  it("t = 0 (no correction): block error = 1 − (1 − p)^n, post-decoding BER = p (the binomial mean n·p divided by n)", async () => {
    const p = 1e-3;
    const res = await call({ n: 7, p, t: 0 });
    // 1 − (1 − p)^7 computed without cancellation: −expm1(7·log1p(−p)).
    expectTail(res.body.decoding.blockError, -Math.expm1(7 * Math.log1p(-p)));
    expectTail(res.body.decoding.postDecodingBer, p);
  });

  it("t = n: a block can never fail; the impossible event has value 0 and log10 null", async () => {
    const res = await call({ n: 7, p: 0.2, t: 7 });
    expect(res.body.decoding.blockError).toEqual({ value: 0, log10: null });
    expect(res.body.decoding.postDecodingBer).toEqual({ value: 0, log10: null });
  });

  it("flips = n: P(more than n) is impossible, P(at most n) = 1, P(exactly n) = p^n", async () => {
    const res = await call({ n: 5, p: 0.3, flips: 5 });
    expect(res.body.flips.moreThan).toEqual({ value: 0, log10: null });
    expect(Math.abs(res.body.flips.atMost.value - 1)).toBeLessThan(1e-15);
    expectTail(res.body.flips.exactly, 0.3 ** 5);
  });

  it("n = 1: exactly/at most 0 flips = 1 − p, more than 0 = p; t = 0 gives block error p", async () => {
    const res = await call({ n: 1, p: 0.3, flips: 0, t: 0 });
    expectTail(res.body.flips.exactly, 0.7);
    expectTail(res.body.flips.atMost, 0.7);
    expectTail(res.body.flips.moreThan, 0.3);
    expectTail(res.body.decoding.blockError, 0.3);
    expectTail(res.body.decoding.postDecodingBer, 0.3);
  });

  it("p = 0: no flip ever happens; capacity 1", async () => {
    const res = await call({ n: 7, p: 0, flips: 0, t: 1 });
    expect(res.body.flips.exactly).toEqual({ value: 1, log10: 0 });
    expect(res.body.flips.moreThan).toEqual({ value: 0, log10: null });
    expect(res.body.decoding.blockError).toEqual({ value: 0, log10: null });
    expect(res.body.decoding.postDecodingBer).toEqual({ value: 0, log10: null });
    expect(res.body.capacity.value).toBe(1);
  });

  it("p = 1: every bit flips; a 1-correcting block of 7 always fails, BER 1; capacity 1 (1 − H2(1))", async () => {
    const res = await call({ n: 7, p: 1, flips: 7, t: 1 });
    expect(res.body.flips.exactly.value).toBe(1);
    expect(res.body.flips.moreThan).toEqual({ value: 0, log10: null });
    expect(res.body.decoding.blockError.value).toBeCloseTo(1, 15);
    expect(res.body.decoding.postDecodingBer.value).toBeCloseTo(1, 15);
    expect(res.body.capacity.value).toBe(1);
  });

  it("p = 0.5: capacity 0 (REFERENCES: C(0.5) = 0); flips follow Bin(n, ½) (@stdlib binomial-pmf)", async () => {
    const res = await call({ n: 10, p: 0.5, flips: 5 });
    expect(Math.abs(res.body.capacity.value)).toBeLessThan(1e-15);
    // C(10, 5)/2^10 = 252/1024 by hand.
    expectTail(res.body.flips.exactly, 252 / 1024);
    expect(relErr(res.body.flips.exactly.value, binomialPmf(5, 10, 0.5))).toBeLessThan(REL);
  });

  it("capacity near p = ½ keeps its relative accuracy: 1 − H2(0.5 − δ) ≈ 2δ²/ln 2 (Taylor series of H2)", async () => {
    const d = 1e-6;
    const res = await call({ n: 1, p: 0.5 - d });
    // Leading term of the series 1 − H2(½ − δ) = (2/ln 2)·(δ² + (4/3)δ⁴ + …); the next term is 1e-12 relative.
    expect(relErr(res.body.capacity.value, (2 * d * d) / Math.LN2)).toBeLessThan(1e-6);
  });

  it("costs 1 unit (documented cost)", async () => {
    const res = await call({ n: 7, p: 0.01 });
    expect(res.headers["x-compute-units"]).toBe("1");
  });
});
