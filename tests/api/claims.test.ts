import betaQuantile from "@stdlib/stats-base-dists-beta-quantile";
import chisquareQuantile from "@stdlib/stats-base-dists-chisquare-quantile";
import erfc from "@stdlib/math-base-special-erfc";
import { describe, expect, it } from "vitest";
import { expectFieldError, expectProblem, getQuery, postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

/**
 * POST /claims, GET /claims/{id}, GET /claims: verdicts from measured counts (one-sided Clopper–Pearson
 * bounds, checked against @stdlib's beta and chi-square quantiles and the rule of three in REFERENCES.md)
 * and from formulas (checked against the binomial tail written out by hand and @stdlib's erfc).
 */
const relErr = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

async function claim(body: unknown, auth?: string) {
  const a = auth ?? (await makeOrgWithKey()).auth;
  return postJson("/api/v1/claims", body, a);
}

describe("measured evidence", () => {
  it("0 errors in 3·10⁹ bits supports BER ≤ 1e-9 at 95 %: the bound is −ln(0.05)/N ≈ 2.996/N (rule of three, REFERENCES.md)", async () => {
    const res = await claim({ label: "fw-1", target: { metric: "ber", atMost: 1e-9 }, evidence: { mode: "measured", trials: 3e9, errors: 0 } });
    expect(res.status, res.text).toBe(201);
    expect(res.body.verdict).toBe("supported");
    expect(res.body.confidence).toBe(0.95);
    // Exact for k = 0: 1 − 0.05^(1/N); −ln(0.05)/N agrees to about 1e-9 relative at this N.
    expect(relErr(res.body.interval.upper, -Math.log(0.05) / 3e9)).toBeLessThan(1e-6);
    expect(res.body.interval.lower).toBe(0);
    expect(res.body.exact).toBe(false);
    expect(res.body.reasoning).toMatch(/0 errors in 3,000,000,000 bits/);
  });

  it("2 errors in 5·10⁹ bits neither support nor refute BER ≤ 1e-9 at 95 %; about 1.3·10⁹ more error-free bits would (chi-square form 6.296/BER, common BER-test tables)", async () => {
    const res = await claim({ label: "rig-7", target: { metric: "ber", atMost: 1e-9 }, confidence: 0.95, evidence: { mode: "measured", trials: 5e9, errors: 2 } });
    expect(res.body.verdict).toBe("inconclusive");
    // One-sided bounds: Beta(k + 1, n − k) at 0.95 and Beta(k, n − k + 1) at 0.05 (@stdlib beta quantile).
    expect(relErr(res.body.interval.upper, betaQuantile(0.95, 3, 5e9 - 2))).toBeLessThan(1e-6);
    expect(relErr(res.body.interval.lower, betaQuantile(0.05, 2, 5e9 - 1))).toBeLessThan(1e-6);
    // The chi-square (Poisson) form χ²(6, 0.95)/(2·BER) = 6.296e9 bits for 2 errors; the exact binomial agrees to a few bits at this BER.
    const needed = chisquareQuantile(0.95, 6) / 2 / 1e-9;
    expect(Math.abs(res.body.moreTrialsToDecide - (needed - 5e9))).toBeLessThan(100);
    expect(res.body.reasoning).toMatch(/more bits without an error would support it/);
  });

  it("50 frame errors in 10⁶ frames refute FER ≤ 1e-5: the lower bound is far above it", async () => {
    const res = await claim({ label: "fw-2", target: { metric: "fer", atMost: 1e-5 }, confidence: 0.99, evidence: { mode: "measured", trials: 1e6, errors: 50 } });
    expect(res.body.verdict).toBe("refuted");
    expect(relErr(res.body.interval.lower, betaQuantile(0.01, 50, 1e6 - 50 + 1))).toBeLessThan(1e-6);
    expect(res.body.interval.lower).toBeGreaterThan(1e-5);
    expect(res.body.details.unit).toBe("frames");
  });

  it("a preset names the target: fibre is BER 1e-9 (common practice, DESIGN.md)", async () => {
    const res = await claim({ label: "fw-3", target: { preset: "fibre" }, evidence: { mode: "measured", trials: 1e6, errors: 0 } });
    expect(res.body.target).toEqual({ metric: "ber", atMost: 1e-9, preset: "fibre" });
    expect(res.body.verdict).toBe("inconclusive");
  });
});

describe("analytic evidence", () => {
  it("(7,4) Hamming on a BSC with p = 1e-3: FER = 1 − (1 − p)^7 − 7p(1 − p)^6, exact, supports FER ≤ 1e-4", async () => {
    const p = 1e-3;
    const res = await claim({ label: "modem", target: { metric: "fer", atMost: 1e-4 }, evidence: { mode: "analytic", code: { family: "hamming", r: 3 }, channel: { type: "bsc", p } } });
    expect(res.status, res.text).toBe(201);
    const fer = 1 - (1 - p) ** 7 - 7 * p * (1 - p) ** 6;
    expect(relErr(res.body.rate, fer)).toBeLessThan(1e-9);
    expect(res.body).toMatchObject({ verdict: "supported", exact: true, details: { n: 7, k: 4, dmin: 3, t: 1 } });
    expect(res.body.interval).toMatchObject({ lower: res.body.rate, upper: res.body.rate });
  });

  it("the same decoder's BER is an estimate, and the verdict says so (exact: false)", async () => {
    // About 6e-6: above a 1e-6 target.
    const res = await claim({ label: "modem", target: { metric: "ber", atMost: 1e-6 }, evidence: { mode: "analytic", code: { family: "hamming", r: 3 }, channel: { type: "bsc", p: 1e-3 } } });
    // (1/7)·Σ_{j≥2} j·C(7, j)p^j(1 − p)^(7−j), the post-decoding estimate written out by hand (Sklar 2001, from memory).
    const p = 1e-3;
    const c = [1, 7, 21, 35, 35, 21, 7, 1];
    let est = 0;
    for (let j = 2; j <= 7; j++) est += j * c[j]! * p ** j * (1 - p) ** (7 - j);
    est /= 7;
    expect(relErr(res.body.rate, est)).toBeLessThan(1e-9);
    expect(res.body.exact).toBe(false);
    expect(res.body.verdict).toBe("refuted");
    expect(res.body.reasoning).toMatch(/estimate/);
  });

  it("uncoded QPSK at 10.6 dB has BER ½·erfc(√(Eb/N0)) below 1e-6 (Proakis: 1e-6 at 10.53 dB)", async () => {
    const res = await claim({ label: "uplink", target: { preset: "data-strict" }, evidence: { mode: "analytic", channel: { type: "awgn", modulation: "qpsk", ebN0Db: 10.6 } } });
    expect(relErr(res.body.rate, 0.5 * erfc(Math.sqrt(10 ** 1.06)))).toBeLessThan(1e-9);
    expect(res.body).toMatchObject({ verdict: "supported", exact: true });
  });

  it("a code on AWGN with hard decisions sees p = Q(√(2·R·Eb/N0)): (7,4) Hamming at 7 dB", async () => {
    const res = await claim({ label: "modem", target: { metric: "fer", atMost: 1e-3 }, evidence: { mode: "analytic", code: { family: "hamming", r: 3 }, channel: { type: "awgn", modulation: "bpsk", ebN0Db: 7 } } });
    const p = 0.5 * erfc(Math.sqrt((4 / 7) * 10 ** 0.7));
    expect(relErr(res.body.details.channelBitErrorProbability, p)).toBeLessThan(1e-9);
    expect(relErr(res.body.rate, 1 - (1 - p) ** 7 - 7 * p * (1 - p) ** 6)).toBeLessThan(1e-9);
  });

  it("Reed–Solomon (255,223) on a BSC: FER from 8-bit symbol errors, more than t = 16 of 255 (bounded-distance decoding)", async () => {
    const p = 1e-3;
    const res = await claim({ label: "deep-space", target: { metric: "fer", atMost: 1e-6 }, evidence: { mode: "analytic", code: { family: "rs", m: 8, n: 255, k: 223 }, channel: { type: "bsc", p } } });
    expect(res.status, res.text).toBe(201);
    const ps = 1 - (1 - p) ** 8;
    // P(Bin(255, ps) > 16) summed term by term in log space.
    let tail = 0;
    let logC = 0;
    for (let j = 0; j <= 255; j++) {
      if (j > 0) logC += Math.log((255 - j + 1) / j);
      if (j > 16) tail += Math.exp(logC + j * Math.log(ps) + (255 - j) * Math.log1p(-ps));
    }
    expect(relErr(res.body.rate, tail)).toBeLessThan(1e-8);
    expect(res.body.details).toMatchObject({ n: 255, k: 223, t: 16 });
  });
});

describe("claims as resources", () => {
  it("201 with Location; GET by id returns the same claim; another organisation cannot see it", async () => {
    const { auth } = await makeOrgWithKey();
    const res = await claim({ label: "fw-9", statement: "no errors in the overnight soak", target: { preset: "data" }, evidence: { mode: "measured", trials: 1e6, errors: 0 } }, auth);
    expect(res.headers.location).toBe(`/api/v1/claims/${res.body.id}`);
    expect(res.body.id).toMatch(/^clm-[0-9a-z]{16}$/);
    const got = await getQuery(res.headers.location!, {}, auth);
    expect(got.status).toBe(200);
    expect(got.body).toEqual(res.body);
    const other = await makeOrgWithKey();
    expectProblem(await getQuery(res.headers.location!, {}, other.auth), 404, "not-found");
    expectProblem(await getQuery("/api/v1/claims/clm-0000000000000000", {}, auth), 404, "not-found");
    expectProblem(await getQuery("/api/v1/claims/not-an-id", {}, auth), 404, "not-found");
  });

  it("a label's history, newest first, page by page", async () => {
    const { auth } = await makeOrgWithKey();
    const ids: string[] = [];
    for (const errors of [0, 1, 2, 3, 4]) {
      ids.push((await claim({ label: "gauge/fw-5", target: { metric: "ber", atMost: 1e-6 }, evidence: { mode: "measured", trials: 1e7, errors } }, auth)).body.id);
    }
    await claim({ label: "other", target: { preset: "voice" }, evidence: { mode: "measured", trials: 10, errors: 0 } }, auth);
    const first = await getQuery("/api/v1/claims", { label: "gauge/fw-5", limit: 3 }, auth);
    expect(first.status, first.text).toBe(200);
    const second = await getQuery("/api/v1/claims", { label: "gauge/fw-5", limit: 3, cursor: first.body.nextCursor }, auth);
    expect([...first.body.data, ...second.body.data].map((c: { id: string }) => c.id)).toEqual([...ids].reverse());
    expect(second.body.nextCursor).toBeNull();
    const supported = await getQuery("/api/v1/claims", { label: "gauge/fw-5", verdict: "supported" }, auth);
    expect(supported.body.data.map((c: { verdict: string }) => c.verdict)).toEqual(supported.body.data.map(() => "supported"));
  });

  it("needs the claims scope", async () => {
    const { auth } = await makeOrgWithKey({ scopes: ["compute"] });
    expectProblem(await claim({ label: "x", target: { preset: "voice" }, evidence: { mode: "measured", trials: 10, errors: 0 } }, auth), 403, "forbidden");
  });
});

describe("bad claims get a problem that says what to fix", () => {
  it.each([
    ["a label with a leading space", { label: " fw", target: { preset: "voice" }, evidence: { mode: "measured", trials: 10, errors: 0 } }, "/label"],
    ["more errors than trials", { label: "fw", target: { preset: "voice" }, evidence: { mode: "measured", trials: 10, errors: 11 } }, "/evidence/errors"],
    ["an unknown preset", { label: "fw", target: { preset: "satellite" }, evidence: { mode: "measured", trials: 10, errors: 0 } }, "/target"],
    ["a confidence of 1", { label: "fw", target: { preset: "voice" }, confidence: 1, evidence: { mode: "measured", trials: 10, errors: 0 } }, "/confidence"],
    ["an uncoded FER without a frame length", { label: "fw", target: { metric: "fer", atMost: 1e-3 }, evidence: { mode: "analytic", channel: { type: "bsc", p: 1e-4 } } }, "/evidence/frameBits"],
    ["a CRC", { label: "fw", target: { metric: "fer", atMost: 1e-3 }, evidence: { mode: "analytic", code: { family: "crc", preset: "CRC-32/ISO-HDLC" }, channel: { type: "bsc", p: 1e-4 } } }, "/evidence/code/family"],
    ["16-QAM under a code", { label: "fw", target: { metric: "fer", atMost: 1e-3 }, evidence: { mode: "analytic", code: { family: "hamming", r: 3 }, channel: { type: "awgn", modulation: "qam", order: 16, ebN0Db: 9 } } }, "/evidence/channel/modulation"],
    ["a BER target on Reed–Solomon", { label: "fw", target: { metric: "ber", atMost: 1e-3 }, evidence: { mode: "analytic", code: { family: "rs", m: 4, n: 15, k: 11 }, channel: { type: "bsc", p: 1e-3 } } }, "/target/metric"],
  ])("%s", async (_name, body, pointer) => {
    expectFieldError(await claim(body), pointer);
  });
});
