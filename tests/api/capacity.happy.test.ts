import { beforeAll, describe, expect, it } from "vitest";
import { postJson, relErr } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

const call = async (body: unknown) => {
  const res = await postJson("/api/v1/capacity", body, auth);
  expect(res.status, res.text).toBe(200);
  return res;
};

const db = (x: number) => 10 * Math.log10(x);

/** Independent: 1 − H2(p) from its definition (Shannon 1948). */
const bscCap = (p: number) => (p === 0 || p === 1 ? 1 : 1 + p * Math.log2(p) + (1 - p) * Math.log2(1 - p));

/**
 * Independent BPSK-input AWGN capacity, computed here from the definition of mutual information for
 * equiprobable ±1 (Shannon 1948): with unit symbol energy, σ² = 1/(2·Es/N0), Y = 1 + σZ,
 * C = 1 − E_Z[log2(1 + exp(−2Y/σ²))], by composite Simpson's rule on z ∈ [−14, 14] with 40,000 panels.
 */
function bpskCapacityRef(esN0: number): number {
  const s2 = 1 / (2 * esN0);
  const s = Math.sqrt(s2);
  const softplus = (u: number) => Math.max(u, 0) + Math.log1p(Math.exp(-Math.abs(u)));
  const f = (z: number) => (Math.exp(-0.5 * z * z) / Math.sqrt(2 * Math.PI)) * softplus((-2 * (1 + s * z)) / s2);
  const a = -14;
  const b = 14;
  const m = 40_000;
  const h = (b - a) / m;
  let sum = f(a) + f(b);
  for (let i = 1; i < m; i++) sum += (i % 2 ? 4 : 2) * f(a + i * h);
  return 1 - (sum * h) / 3 / Math.LN2;
}

/** Independent: the Eb/N0 (dB) where C_BPSK(R·Eb/N0) = R, by bisection on Es/N0 in dB. */
function bpskLimitDbRef(rate: number): number {
  let lo = -20;
  let hi = 20;
  for (let i = 0; i < 80; i++) {
    const mid = (lo + hi) / 2;
    if (bpskCapacityRef(10 ** (mid / 10)) < rate) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2 - db(rate);
}

describe("POST /capacity: BSC and BEC", () => {
  it("BSC p = 0.11: capacity ≈ 0.5 (REFERENCES: C(0.11) ≈ 0.500) and equals 1 − H2(0.11) (relative 1e-12)", async () => {
    const res = await call({ channel: "bsc", p: 0.11 });
    expect(Math.abs(res.body.capacity.value - 0.5)).toBeLessThan(1e-3);
    expect(relErr(res.body.capacity.value, bscCap(0.11))).toBeLessThan(1e-12);
    expect(res.body.capacity.unit).toBe("bits per channel use");
    expect(res.body.channel).toBe("bsc");
    expect(res.body.caution).toMatch(/safety-critical/);
  });

  it("BSC p = 0.5 has capacity 0; p = 0 and p = 1 have capacity 1 (Shannon 1948; edge cases)", async () => {
    expect(Math.abs((await call({ channel: "bsc", p: 0.5 })).body.capacity.value)).toBeLessThan(1e-15);
    expect((await call({ channel: "bsc", p: 0 })).body.capacity.value).toBe(1);
    expect((await call({ channel: "bsc", p: 1 })).body.capacity.value).toBe(1);
  });

  it("BSC with a rate: margin C − R (1 − H2(0.05) − 0.5 from the definition)", async () => {
    const res = await call({ channel: "bsc", p: 0.05, rate: 0.5 });
    expect(res.body.rate).toBe(0.5);
    expect(Math.abs(res.body.rateMargin.value - (bscCap(0.05) - 0.5))).toBeLessThan(1e-12);
  });

  it("BEC: capacity 1 − ε (Elias 1955) at ε = 0.2, 0, 1; margin at rate 3/4 is 0.05", async () => {
    const res = await call({ channel: "bec", erasure: 0.2, rate: 0.75 });
    expect(Math.abs(res.body.capacity.value - 0.8)).toBeLessThan(1e-15);
    expect(Math.abs(res.body.rateMargin.value - 0.05)).toBeLessThan(1e-15);
    expect((await call({ channel: "bec", erasure: 0 })).body.capacity.value).toBe(1);
    expect((await call({ channel: "bec", erasure: 1 })).body.capacity.value).toBe(0);
  });

  it("a rate above capacity gives a negative margin", async () => {
    const res = await call({ channel: "bec", erasure: 0.5, rate: 0.6 });
    expect(res.body.rateMargin.value).toBeLessThan(0);
  });
});

describe("POST /capacity: real AWGN", () => {
  it("Shannon–Hartley: 25 kHz at 12 dB gives B·log2(1 + 10^1.2) bits/s (computed here; Shannon 1948), relative 1e-12", async () => {
    const res = await call({ channel: "awgn", snrDb: 12, bandwidthHz: 25_000 });
    const snr = 10 ** 1.2;
    expect(relErr(res.body.capacityBitsPerSecond.value, 25_000 * Math.log2(1 + snr))).toBeLessThan(1e-12);
    expect(res.body.capacityBitsPerSecond.unit).toBe("bits/s");
    expect(relErr(res.body.capacity.value, 0.5 * Math.log2(1 + snr))).toBeLessThan(1e-12);
    expect(relErr(res.body.snr.linear, snr)).toBeLessThan(1e-12);
    expect(Math.abs(res.body.snr.db - 12)).toBeLessThan(1e-12);
  });

  it("S/N = 3 (linear): ½·log2 4 = 1 bit per real use; 1 MHz gives log2 4 · 10^6 = 2 Mbit/s (by hand)", async () => {
    const res = await call({ channel: "awgn", snr: 3, bandwidthHz: 1e6 });
    expect(Math.abs(res.body.capacity.value - 1)).toBeLessThan(1e-15);
    expect(relErr(res.body.capacityBitsPerSecond.value, 2e6)).toBeLessThan(1e-15);
    expect(res.body.shannonLimit).toBeUndefined();
  });

  it("S/N = 0 (no signal): capacity 0 (edge case)", async () => {
    const res = await call({ channel: "awgn", snr: 0 });
    expect(res.body.capacity.value).toBe(0);
  });

  it("rate ½: the Shannon limit (2^(2R) − 1)/(2R) is 0 dB (REFERENCES, Shannon 1948); gap = operating − limit", async () => {
    const res = await call({ channel: "awgn", ebN0Db: 1, rate: 0.5 });
    expect(Math.abs(res.body.shannonLimit.ebN0Db - 0)).toBeLessThan(1e-12);
    expect(Math.abs(res.body.shannonLimit.ebN0 - 1)).toBeLessThan(1e-15);
    expect(res.body.operatingEbN0Db).toBe(1);
    expect(Math.abs(res.body.gapDb - 1)).toBeLessThan(1e-12);
    // S/N = 2R·Eb/N0 per real dimension = 10^0.1.
    expect(relErr(res.body.snr.linear, 10 ** 0.1)).toBeLessThan(1e-12);
    expect(relErr(res.body.capacity.value, 0.5 * Math.log2(1 + 10 ** 0.1))).toBeLessThan(1e-12);
    expect(res.body.rateMargin.value).toBeGreaterThan(0);
  });

  it("at the limit itself the capacity equals the rate: rate ½ at 0 dB gives C = ½ and margin 0", async () => {
    const res = await call({ channel: "awgn", ebN0Db: 0, rate: 0.5 });
    expect(Math.abs(res.body.capacity.value - 0.5)).toBeLessThan(1e-15);
    expect(Math.abs(res.body.rateMargin.value)).toBeLessThan(1e-15);
    expect(Math.abs(res.body.gapDb)).toBeLessThan(1e-12);
  });

  it.each([1 / 3, 1, 2, 8])("rate %d: the limit equals (2^(2R) − 1)/(2R) computed here (relative 1e-12)", async (r) => {
    const res = await call({ channel: "awgn", snrDb: 10, rate: r });
    const limit = (2 ** (2 * r) - 1) / (2 * r);
    expect(relErr(res.body.shannonLimit.ebN0, limit)).toBeLessThan(1e-12);
    expect(Math.abs(res.body.shannonLimit.ebN0Db - db(limit))).toBeLessThan(1e-11);
    // Operating Eb/N0 = S/N / (2R).
    expect(Math.abs(res.body.operatingEbN0Db - (10 - db(2 * r)))).toBeLessThan(1e-11);
  });

  it("rate → 0: the limit tends to the ultimate limit ln 2 = −1.59 dB (REFERENCES, Shannon 1948)", async () => {
    const res = await call({ channel: "awgn", snrDb: 0, rate: 1e-9 });
    expect(Math.abs(res.body.shannonLimit.ebN0Db - -1.59)).toBeLessThan(0.005);
    expect(Math.abs(res.body.shannonLimit.ebN0Db - db(Math.LN2))).toBeLessThan(1e-6);
  });
});

describe("POST /capacity: BPSK-input AWGN", () => {
  it("the independent reference is sound: C → 0 at low SNR, → 1 at high SNR, below the Gaussian-input capacity", () => {
    expect(bpskCapacityRef(1e-4)).toBeLessThan(1e-3);
    expect(bpskCapacityRef(100)).toBeGreaterThan(1 - 1e-12);
    for (const e of [0.1, 1, 3]) expect(bpskCapacityRef(e)).toBeLessThan(0.5 * Math.log2(1 + 2 * e));
  });

  it("rate ½: the BPSK-input limit is about 0.19 dB (REFERENCES, from memory; ±0.01 dB) and matches the independent root (±1e-4 dB)", async () => {
    const res = await call({ channel: "bpsk-awgn", ebN0Db: 2.5, rate: 0.5 });
    const ref = bpskLimitDbRef(0.5);
    // The independent computation confirms the remembered value first.
    expect(Math.abs(ref - 0.19)).toBeLessThan(0.01);
    expect(Math.abs(res.body.shannonLimit.ebN0Db - 0.19)).toBeLessThan(0.01);
    expect(Math.abs(res.body.shannonLimit.ebN0Db - ref)).toBeLessThan(1e-4);
    // The binary input costs Eb/N0: above the 0 dB real-AWGN limit for the same rate (REFERENCES).
    expect(res.body.shannonLimit.ebN0Db).toBeGreaterThan(0);
    expect(res.body.operatingEbN0Db).toBe(2.5);
    expect(Math.abs(res.body.gapDb - (2.5 - res.body.shannonLimit.ebN0Db))).toBeLessThan(1e-12);
    // Es/N0 = R·Eb/N0.
    expect(relErr(res.body.snr.linear, 0.5 * 10 ** 0.25)).toBeLessThan(1e-12);
    expect(Math.abs(res.body.capacity.value - bpskCapacityRef(0.5 * 10 ** 0.25))).toBeLessThan(1e-9);
    expect(res.body.rateMargin.value).toBeGreaterThan(0);
  });

  it("rate ⅓ and ¾: the limit matches the independent root (±1e-4 dB)", async () => {
    for (const r of [1 / 3, 0.75]) {
      const res = await call({ channel: "bpsk-awgn", ebN0Db: 5, rate: r });
      expect(Math.abs(res.body.shannonLimit.ebN0Db - bpskLimitDbRef(r))).toBeLessThan(1e-4);
    }
  });

  it.each([-10, -3, 0, 3, 6, 10])("capacity at Es/N0 = %d dB equals the independent integral (absolute 1e-9); absError below 1e-9", async (esN0Db) => {
    const res = await call({ channel: "bpsk-awgn", esN0Db });
    const ref = bpskCapacityRef(10 ** (esN0Db / 10));
    expect(Math.abs(res.body.capacity.value - ref)).toBeLessThan(1e-9);
    expect(res.body.capacity.absError).toBeGreaterThanOrEqual(0);
    expect(res.body.capacity.absError).toBeLessThan(1e-9);
    expect(res.body.shannonLimit).toBeUndefined();
  });

  it("extreme Es/N0: −100 dB gives nearly 0 bits, +100 dB gives 1 bit (edge cases)", async () => {
    const low = await call({ channel: "bpsk-awgn", esN0Db: -100 });
    // C ≤ Es/N0 / ln 2 (Gaussian-input bound at low SNR) = 1e-10 / ln 2.
    expect(low.body.capacity.value).toBeGreaterThanOrEqual(0);
    expect(low.body.capacity.value).toBeLessThan(1e-10 / Math.LN2 + 1e-15);
    const high = await call({ channel: "bpsk-awgn", esN0Db: 100 });
    expect(high.body.capacity.value).toBe(1);
  });

  it("cost follows the documented work rule: closed forms 1 unit, BPSK input 2, with a rate's Shannon limit 6", async () => {
    // The documented rule, written out: 256 work for BSC, BEC and AWGN; 2^23 for BPSK-input AWGN, plus 2^24 with a `rate`;
    // 1 compute unit per started 2^22 work units, at least 1.
    const units = (work: number) => String(Math.max(1, Math.ceil(work / 2 ** 22)));
    expect((await call({ channel: "awgn", snrDb: 10 })).headers["x-compute-units"]).toBe(units(256));
    expect((await call({ channel: "bpsk-awgn", esN0Db: 0 })).headers["x-compute-units"]).toBe(units(2 ** 23));
    expect((await call({ channel: "bpsk-awgn", ebN0Db: 2.5, rate: 0.5 })).headers["x-compute-units"]).toBe(units(2 ** 23 + 2 ** 24));
    expect([units(256), units(2 ** 23), units(2 ** 23 + 2 ** 24)]).toEqual(["1", "2", "6"]);
  });
});

describe("POST /capacity: a Shannon limit alone, and the rate's unit", () => {
  // Reference values: the limit (2^(2R) − 1)/(2R) for R per real dimension is 0 dB at R = ½ and tends to ln 2 = −1.59 dB
  // as R → 0 (REFERENCES, Shannon 1948); per complex symbol (2 real dimensions) it reads (2^R − 1)/R, evaluated here by hand.
  it("AWGN rate ½ with no operating point: the limit 0 dB, no capacity, no gap, unit per real dimension", async () => {
    const { body } = await call({ channel: "awgn", rate: 0.5 });
    expect(Math.abs(body.shannonLimit.ebN0Db)).toBeLessThan(1e-12);
    expect(body.rateUnit).toBe("bits per real dimension");
    expect(body.rate).toBe(0.5);
    for (const f of ["capacity", "snr", "rateMargin", "operatingEbN0Db", "gapDb"]) expect(body[f], f).toBeUndefined();
  });

  it("rate 0 asks for the R → 0 limit: ln 2 = −1.59 dB (REFERENCES, Shannon 1948)", async () => {
    const { body } = await call({ channel: "awgn", rate: 0 });
    expect(body.shannonLimit.ebN0).toBe(Math.LN2);
    expect(body.shannonLimit.ebN0Db).toBeCloseTo(-1.59, 2);
    expect(body.shannonLimit.formula).toMatch(/R → 0/);
  });

  it("rate 1 bit per complex symbol (QPSK at rate ½) has the same 0 dB limit as rate ½ per real dimension", async () => {
    const complex = (await call({ channel: "awgn", rate: 1, rateUnit: "bits per complex symbol" })).body;
    expect(complex.rateUnit).toBe("bits per complex symbol");
    expect(complex.rate).toBe(1);
    expect(Math.abs(complex.shannonLimit.ebN0Db)).toBeLessThan(1e-12);
  });

  it("per complex symbol the limit is (2^R − 1)/R: R = 2 gives 3/2 (1.76 dB), R = 4 gives 15/4 (5.74 dB)", async () => {
    for (const [r, limit] of [[2, 1.5], [4, 3.75]] as const) {
      const { body } = await call({ channel: "awgn", rate: r, rateUnit: "bits per complex symbol" });
      expect(relErr(body.shannonLimit.ebN0, limit)).toBeLessThan(1e-14);
    }
  });

  it("per complex symbol, capacity and margin are twice the per-dimension values at the same S/N (S/N = 3: C = 2 bits per complex symbol)", async () => {
    const { body } = await call({ channel: "awgn", snr: 3, rate: 1.5, rateUnit: "bits per complex symbol" });
    // log2(1 + 3) = 2 bits per complex symbol; the margin 2 − 1.5; Eb/N0 = S/N / R = 3/1.5 = 2 (3.01 dB); the limit (2^1.5 − 1)/1.5.
    expect(body.capacity).toEqual({ value: 2, unit: "bits per complex symbol" });
    expect(body.rateMargin).toEqual({ value: 0.5, unit: "bits per complex symbol" });
    expect(Math.abs(body.operatingEbN0Db - db(2))).toBeLessThan(1e-12);
    expect(Math.abs(body.gapDb - (db(2) - db((2 ** 1.5 - 1) / 1.5)))).toBeLessThan(1e-12);
  });

  it("every response names the rate's unit: per channel use on BSC, BEC and BPSK input, per real dimension on AWGN by default", async () => {
    expect((await call({ channel: "bsc", p: 0.11 })).body.rateUnit).toBe("bits per channel use");
    expect((await call({ channel: "bec", erasure: 0.2, rate: 0.75, rateUnit: "bits per channel use" })).body.rateMargin).toEqual({ value: 0.8 - 0.75, unit: "bits per channel use" });
    expect((await call({ channel: "bpsk-awgn", esN0Db: 0 })).body.rateUnit).toBe("bits per channel use");
    const awgn = (await call({ channel: "awgn", snr: 3 })).body;
    expect(awgn.rateUnit).toBe("bits per real dimension");
    expect(awgn.capacity).toEqual({ value: 1, unit: "bits per real dimension" });
  });

  it("BPSK input, rate ½ with no operating point: the limit alone, about 0.187 dB (REFERENCES), matching the independent root (±1e-4 dB)", async () => {
    const res = await call({ channel: "bpsk-awgn", rate: 0.5 });
    expect(Math.abs(res.body.shannonLimit.ebN0Db - 0.187)).toBeLessThan(0.005);
    expect(Math.abs(res.body.shannonLimit.ebN0Db - bpskLimitDbRef(0.5))).toBeLessThan(1e-4);
    expect(res.body.capacity).toBeUndefined();
    expect(res.body.gapDb).toBeUndefined();
    // Root finding only, no integration at an operating point: 2^24 work, 4 units.
    expect(res.headers["x-compute-units"]).toBe("4");
  });

  it("a subnormal rate works: S/N 3 dB at R = 5e-324 gives Eb/N0 = 3 − 10·log10(2R) dB and the limit ln 2", async () => {
    const { body } = await call({ channel: "awgn", snrDb: 3, rate: 5e-324 });
    expect(body.shannonLimit.ebN0).toBe(Math.LN2);
    // 10·log10(1e-323) = −3230 to four digits (log10 of 9.88e-324, the double nearest 1e-323, is −323.005).
    expect(Math.abs(body.operatingEbN0Db - (3 - 10 * Math.log10(2 * 5e-324)))).toBeLessThan(1e-9);
    expect(body.operatingEbN0Db).toBeCloseTo(3233.05, 1);
  });
});
