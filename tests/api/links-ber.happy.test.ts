import erfc from "@stdlib/math-base-special-erfc";
import { beforeAll, describe, expect, it } from "vitest";
import { expectFieldError, postJson, relErr } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

const call = async (body: unknown) => {
  const res = await postJson("/api/v1/links/ber", body, auth);
  expect(res.status, res.text).toBe(200);
  return res;
};

const lin = (db: number) => 10 ** (db / 10);
/** Q(x) = ½·erfc(x/√2), with erfc from @stdlib/math-base-special-erfc. */
const Q = (x: number) => 0.5 * erfc(x / Math.SQRT2);
/** Uncoded BPSK BER ½·erfc(√(Eb/N0)) (Proakis & Salehi), with @stdlib erfc. */
const bpskBer = (ebN0Db: number) => 0.5 * erfc(Math.sqrt(lin(ebN0Db)));

/** Square M-QAM rail error P = 2(1 − 1/√M)·Q(√(3·Es/N0/(M − 1))) (Proakis & Salehi, ch. 4), Es = log2 M·Eb. */
const qamRail = (M: number, ebN0Db: number) => 2 * (1 - 1 / Math.sqrt(M)) * Q(Math.sqrt((3 * Math.log2(M) * lin(ebN0Db)) / (M - 1)));
/** Square M-QAM symbol error 1 − (1 − P)², written 2P − P² to avoid cancellation (Proakis & Salehi, ch. 4). */
function qamSer(M: number, ebN0Db: number): number {
  const p = qamRail(M, ebN0Db);
  return 2 * p - p * p;
}
/** Square M-QAM bit error with Gray mapping, nearest-neighbour errors only: (4/k)(1 − 1/√M)·Q(√(3k·Eb/N0/(M − 1))) = 2P/k (Proakis & Salehi, ch. 4). */
const qamBer = (M: number, ebN0Db: number) => (2 * qamRail(M, ebN0Db)) / Math.log2(M);

/**
 * Exact Gray BER of square M-QAM as published by Cho & Yoon (IEEE Trans. Commun. 50(7), 2002), written out term by term
 * per bit position k with @stdlib erfc: (1/log2 √M)·Σ_k (1/√M)·Σ_{i=0}^{(1−2^{−k})√M − 1} (−1)^{⌊i·2^{k−1}/√M⌋}
 * ·(2^{k−1} − ⌊i·2^{k−1}/√M + ½⌋)·erfc((2i + 1)·√(3·log2 M·Eb/N0/(2(M − 1)))).
 */
function qamBerChoYoon(M: number, ebN0Db: number): number {
  const side = Math.sqrt(M);
  const bits = Math.log2(side);
  const x = Math.sqrt((3 * Math.log2(M) * lin(ebN0Db)) / (2 * (M - 1)));
  let total = 0;
  for (let k = 1; k <= bits; k++) {
    let pk = 0;
    for (let i = 0; i <= (1 - 2 ** -k) * side - 1; i++) {
      const f = (i * 2 ** (k - 1)) / side;
      pk += (-1) ** Math.floor(f) * (2 ** (k - 1) - Math.floor(f + 0.5)) * erfc((2 * i + 1) * x);
    }
    total += pk / side;
  }
  return total / bits;
}

/**
 * Exact Gray BER of M-PSK by enumeration: labels i ^ (i >> 1) at phases 2πi/M; each sector's probability is the phase
 * density (1/2π)·[e^{−γ} + √(4πγ)·cos φ·e^{−γ·sin²φ}·Φ(√(2γ)·cos φ)] (Proakis & Salehi, ch. 4; Φ by @stdlib erfc)
 * integrated by Simpson's rule with 20,000 panels, times the Hamming distance of the labels, over M points and log2 M bits.
 */
function pskBerByEnumeration(M: number, ebN0Db: number): number {
  const k = Math.log2(M);
  const g = k * lin(ebN0Db);
  const density = (f: number) => (Math.exp(-g) + Math.sqrt(4 * Math.PI * g) * Math.cos(f) * Math.exp(-g * Math.sin(f) ** 2) * 0.5 * erfc(-Math.sqrt(g) * Math.cos(f))) / (2 * Math.PI);
  const simpson = (a: number, b: number) => {
    const n = 20_000;
    const h = (b - a) / n;
    let s = density(a) + density(b);
    for (let i = 1; i < n; i++) s += (i % 2 ? 4 : 2) * density(a + i * h);
    return (s * h) / 3;
  };
  const sector = Array.from({ length: M }, (_, d) => simpson(((2 * d - 1) * Math.PI) / M, ((2 * d + 1) * Math.PI) / M));
  const gray = (i: number) => i ^ (i >> 1);
  let sum = 0;
  for (let i = 0; i < M; i++) for (let d = 1; d < M; d++) for (let x = gray(i) ^ gray((i + d) % M); x; x &= x - 1) sum += sector[d]!;
  return sum / (M * k);
}

/** M-PSK symbol error by Craig's integral (1/π)∫₀^{(M−1)π/M} exp(−Es/N0·sin²(π/M)/sin²θ) dθ, Simpson's rule with 20,000 panels, computed here. */
function pskSer(M: number, ebN0Db: number): number {
  const es = Math.log2(M) * lin(ebN0Db);
  const s = Math.sin(Math.PI / M) ** 2;
  const f = (th: number) => (th === 0 ? 0 : Math.exp((-es * s) / Math.sin(th) ** 2));
  const b = ((M - 1) * Math.PI) / M;
  const m = 20_000;
  const h = b / m;
  let sum = f(0) + f(b);
  for (let i = 1; i < m; i++) sum += (i % 2 ? 4 : 2) * f(i * h);
  return (sum * h) / 3 / Math.PI;
}

describe("POST /links/ber: BPSK and QPSK", () => {
  it("BPSK at 9.6 dB: BER = ½·erfc(√(10^0.96)) (@stdlib/math-base-special-erfc; relative 1e-12)", async () => {
    const res = await call({ modulation: "bpsk", ebN0Db: 9.6 });
    const ref = 0.5 * erfc(Math.sqrt(10 ** 0.96));
    expect(res.body.points).toHaveLength(1);
    expect(res.body.points[0].ebN0Db).toBe(9.6);
    expect(relErr(res.body.points[0].ber, ref)).toBeLessThan(1e-12);
    // BPSK: one bit per symbol, so SER = BER.
    expect(relErr(res.body.points[0].ser, ref)).toBeLessThan(1e-12);
    expect(res.body).toMatchObject({ modulation: "bpsk", order: 2, bitsPerSymbol: 1, berExact: true, serExact: true });
    expect(res.body.caution).toMatch(/safety-critical/);
  });

  it.each([
    [1e-3, 6.79],
    [1e-5, 9.59],
    [1e-6, 10.53],
  ])("BPSK needs Eb/N0 for BER %d at %d dB (Proakis, ±0.01 dB); the BER there is the target (@stdlib erfc, relative 1e-9)", async (target, dbRef) => {
    const res = await call({ modulation: "bpsk", targetBer: target });
    const got = res.body.required.ebN0Db;
    expect(Math.abs(got - dbRef)).toBeLessThan(0.01);
    expect(relErr(bpskBer(got), target)).toBeLessThan(1e-9);
    expect(res.body.required.targetBer).toBe(target);
    expect(relErr(res.body.required.ebN0, lin(got))).toBeLessThan(1e-12);
    expect(res.body.points).toBeUndefined();
  });

  it("QPSK with Gray mapping has the BPSK bit error rate; SER = 1 − (1 − q)² (Proakis & Salehi), @stdlib erfc", async () => {
    const dbs = [0, 4, 8, 12];
    const res = await call({ modulation: "qpsk", ebN0Db: dbs });
    expect(res.body).toMatchObject({ order: 4, bitsPerSymbol: 2, berExact: true });
    dbs.forEach((d, i) => {
      const q = bpskBer(d);
      expect(relErr(res.body.points[i].ber, q)).toBeLessThan(1e-12);
      // 1 − (1 − q)² written 2q − q² to avoid cancellation.
      expect(relErr(res.body.points[i].ser, 2 * q - q * q)).toBeLessThan(1e-12);
    });
  });

  it("4-PSK and 4-QAM give the QPSK numbers; 2-PSK gives the BPSK numbers (the same constellations)", async () => {
    const ebN0Db = [3, 7];
    const qpsk = await call({ modulation: "qpsk", ebN0Db });
    const psk4 = await call({ modulation: "psk", order: 4, ebN0Db });
    const qam4 = await call({ modulation: "qam", order: 4, ebN0Db });
    const bpsk = await call({ modulation: "bpsk", ebN0Db });
    const psk2 = await call({ modulation: "psk", order: 2, ebN0Db });
    for (let i = 0; i < ebN0Db.length; i++) {
      for (const other of [psk4, qam4]) {
        expect(relErr(other.body.points[i].ber, qpsk.body.points[i].ber)).toBeLessThan(1e-12);
        expect(relErr(other.body.points[i].ser, qpsk.body.points[i].ser)).toBeLessThan(1e-12);
      }
      expect(relErr(psk2.body.points[i].ber, bpsk.body.points[i].ber)).toBeLessThan(1e-12);
    }
  });

  it("the two ends of the Eb/N0 range: −50 dB gives BER ≈ ½, +100 dB gives BER 0 (as @stdlib erfc does)", async () => {
    const res = await call({ modulation: "bpsk", ebN0Db: [-50, 100] });
    expect(relErr(res.body.points[0].ber, bpskBer(-50))).toBeLessThan(1e-12);
    expect(res.body.points[0].ber).toBeLessThan(0.5);
    expect(res.body.points[1].ber).toBe(bpskBer(100));
    expect(res.body.points[1].ber).toBe(0);
  });
});

describe("POST /links/ber: M-QAM and M-PSK", () => {
  it("16-QAM sweep by default: the exact Gray BER of Cho & Yoon 2002 (written out here with @stdlib erfc; relative 1e-12) and the exact SER", async () => {
    const dbs = [4, 6, 8, 10, 12, 20];
    const res = await call({ modulation: "qam", order: 16, ebN0Db: dbs });
    expect(res.body).toMatchObject({ order: 16, bitsPerSymbol: 4, berExact: true, serExact: true });
    expect(res.body.berMethod).toMatch(/^exact: .*Cho & Yoon 2002/);
    dbs.forEach((d, i) => {
      expect(relErr(res.body.points[i].ber, qamBerChoYoon(16, d))).toBeLessThan(1e-12);
      expect(relErr(res.body.points[i].ser, qamSer(16, d))).toBeLessThan(1e-10);
    });
  });

  it("64-QAM at 6 dB: the nearest-neighbour formula, asked for by name, is 0.1 % to 1 % below the exact BER (about 0.4 %, issue report; common practice)", async () => {
    const exact = await call({ modulation: "qam", order: 64, ebN0Db: 6 });
    const nn = await call({ modulation: "qam", order: 64, berFormula: "nearest-neighbour", ebN0Db: 6 });
    expect(relErr(exact.body.points[0].ber, qamBerChoYoon(64, 6))).toBeLessThan(1e-12);
    expect(relErr(nn.body.points[0].ber, qamBer(64, 6))).toBeLessThan(1e-12);
    const diff = relErr(nn.body.points[0].ber, exact.body.points[0].ber);
    expect(diff).toBeGreaterThan(1e-3);
    expect(diff).toBeLessThan(1e-2);
    expect(nn.body.berExact).toBe(false);
    expect(nn.body.berMethod).toMatch(/^approximation/);
  });

  it("16-QAM sweep with berFormula nearest-neighbour: SER and the Gray nearest-neighbour BER match the square-QAM formulas (Proakis & Salehi) with @stdlib erfc", async () => {
    const dbs = [4, 6, 8, 10, 12];
    const res = await call({ modulation: "qam", order: 16, berFormula: "nearest-neighbour", ebN0Db: dbs });
    expect(res.body).toMatchObject({ order: 16, bitsPerSymbol: 4, berExact: false, serExact: true });
    dbs.forEach((d, i) => {
      const ser = qamSer(16, d);
      expect(relErr(res.body.points[i].ser, ser)).toBeLessThan(1e-10);
      expect(relErr(res.body.points[i].ber, qamBer(16, d))).toBeLessThan(1e-10);
    });
    // More Eb/N0, fewer errors.
    for (let i = 1; i < dbs.length; i++) expect(res.body.points[i].ber).toBeLessThan(res.body.points[i - 1].ber);
  });

  it("64-QAM and 1024-QAM SER match the square-QAM formula (Proakis & Salehi; relative 1e-10)", async () => {
    for (const M of [64, 1024]) {
      const res = await call({ modulation: "qam", order: M, ebN0Db: [10, 20] });
      expect(relErr(res.body.points[0].ser, qamSer(M, 10))).toBeLessThan(1e-10);
      expect(relErr(res.body.points[1].ser, qamSer(M, 20))).toBeLessThan(1e-10);
    }
  });

  it("8-PSK and 16-PSK by default: the exact Gray BER equals an enumeration over labels and sectors of the phase density (Proakis & Salehi; relative 1e-9)", async () => {
    for (const M of [8, 16]) {
      const dbs = [0, 6, 12];
      const res = await call({ modulation: "psk", order: M, ebN0Db: dbs });
      expect(res.body.berExact).toBe(true);
      expect(res.body.berMethod).toMatch(/^exact: .*Lee 1986/);
      dbs.forEach((d, i) => {
        expect(relErr(res.body.points[i].ber, pskBerByEnumeration(M, d))).toBeLessThan(1e-9);
        expect(relErr(res.body.points[i].ser, pskSer(M, d))).toBeLessThan(1e-8);
      });
    }
  });

  it("32-PSK: no exact BER is served; left out, berFormula is nearest-neighbour (BER = SER/5); asked for, exact is refused at /berFormula", async () => {
    const res = await call({ modulation: "psk", order: 32, ebN0Db: 10 });
    expect(res.body.berExact).toBe(false);
    expect(relErr(res.body.points[0].ber, pskSer(32, 10) / 5)).toBeLessThan(1e-8);
    expectFieldError(await postJson("/api/v1/links/ber", { modulation: "psk", order: 32, berFormula: "exact", ebN0Db: 10 }, auth), "/berFormula", /up to M = 16/);
  });

  it("8-PSK and 16-PSK SER match Craig's integral computed here (Craig 1991; relative 1e-8); with berFormula nearest-neighbour, BER = SER/log2 M", async () => {
    for (const M of [8, 16]) {
      const dbs = [0, 6, 12];
      const res = await call({ modulation: "psk", order: M, berFormula: "nearest-neighbour", ebN0Db: dbs });
      expect(res.body.bitsPerSymbol).toBe(Math.log2(M));
      expect(res.body.serExact).toBe(true);
      dbs.forEach((d, i) => {
        const ser = pskSer(M, d);
        expect(relErr(res.body.points[i].ser, ser)).toBeLessThan(1e-8);
        expect(relErr(res.body.points[i].ber, ser / Math.log2(M))).toBeLessThan(1e-8);
      });
    }
  });

  it("8-PSK at 60 dB: the SER is below the double range (Craig's integral here gives 0)", async () => {
    const res = await call({ modulation: "psk", order: 8, ebN0Db: 60 });
    expect(pskSer(8, 60)).toBe(0);
    expect(res.body.points[0].ser).toBe(0);
  });

  it("8-PSK Eb/N0 for BER 1e-6: there Craig's SER / 3 is 1e-6, and the high-SNR approximation 2Q(√(2Es/N0)·sin(π/8)) agrees within 5 % (Proakis & Salehi)", async () => {
    const res = await call({ modulation: "psk", order: 8, berFormula: "nearest-neighbour", targetBer: 1e-6 });
    const d = res.body.required.ebN0Db;
    expect(relErr(pskSer(8, d) / 3, 1e-6)).toBeLessThan(1e-6);
    const approx = (2 * Q(Math.sqrt(2 * 3 * lin(d)) * Math.sin(Math.PI / 8))) / 3;
    expect(relErr(approx, 1e-6)).toBeLessThan(0.05);
  });

  it("16-QAM Eb/N0 for BER 1e-5 with the nearest-neighbour formula: that BER is 1e-5 there (Proakis & Salehi; relative 1e-6)", async () => {
    const res = await call({ modulation: "qam", order: 16, berFormula: "nearest-neighbour", targetBer: 1e-5 });
    expect(relErr(qamBer(16, res.body.required.ebN0Db), 1e-5)).toBeLessThan(1e-6);
  });

  it.each([16, 64, 1024])("%d-QAM Eb/N0 for BER 1e-6 by default: Cho & Yoon's exact BER is 1e-6 there (relative 1e-8)", async (M) => {
    const res = await call({ modulation: "qam", order: M, targetBer: 1e-6 });
    expect(relErr(qamBerChoYoon(M, res.body.required.ebN0Db), 1e-6)).toBeLessThan(1e-8);
    // At 1e-6 the terms beyond the nearest neighbours (erfc(3x) against erfc(x)) no longer count: the answers agree.
    const nn = await call({ modulation: "qam", order: M, berFormula: "nearest-neighbour", targetBer: 1e-6 });
    expect(Math.abs(res.body.required.ebN0Db - nn.body.required.ebN0Db)).toBeLessThan(1e-3);
  });

  it("64-QAM Eb/N0 for BER 0.05: the exact answer is above the nearest-neighbour one, which undercounts errors at low SNR", async () => {
    const res = await call({ modulation: "qam", order: 64, targetBer: 0.05 });
    expect(relErr(qamBerChoYoon(64, res.body.required.ebN0Db), 0.05)).toBeLessThan(1e-8);
    const nn = await call({ modulation: "qam", order: 64, berFormula: "nearest-neighbour", targetBer: 0.05 });
    expect(relErr(qamBer(64, nn.body.required.ebN0Db), 0.05)).toBeLessThan(1e-8);
    // Measured 7e-4 dB, far beyond the 1e-10 dB bisection tolerance.
    expect(res.body.required.ebN0Db - nn.body.required.ebN0Db).toBeGreaterThan(1e-4);
  });

  it("exact M-QAM accepts targets up to ½ (its BER at Eb/N0 = 0); the nearest-neighbour formula stops at (2/log2 M)(1 − 1/√M) = 3/8 for 16-QAM", async () => {
    const res = await call({ modulation: "qam", order: 16, targetBer: 0.4 });
    expect(relErr(qamBerChoYoon(16, res.body.required.ebN0Db), 0.4)).toBeLessThan(1e-8);
    const refused = await postJson("/api/v1/links/ber", { modulation: "qam", order: 16, berFormula: "nearest-neighbour", targetBer: 0.4 }, auth);
    expectFieldError(refused, "/targetBer", /never exceeds 0\.375/);
  });
});

describe("POST /links/ber: coding gain and cost", () => {
  it("(23,12) with dmin 7: soft gain 10·log10(R·dmin) = 10·log10(84/23), hard 10·log10(R·(t+1)) = 10·log10(48/23), t = 3", async () => {
    const res = await call({ modulation: "bpsk", targetBer: 1e-5, code: { n: 23, k: 12, dmin: 7 } });
    // Asymptotic coding gain of soft-decision ML decoding (Proakis & Salehi): 10·log10(R·dmin), R = 12/23.
    expect(relErr(res.body.coding.asymptoticGainSoftDb, 10 * Math.log10(84 / 23))).toBeLessThan(1e-12);
    expect(relErr(res.body.coding.asymptoticGainHardDb, 10 * Math.log10(48 / 23))).toBeLessThan(1e-12);
    expect(res.body.coding.correctingRadius).toBe(3);
    expect(relErr(res.body.coding.rate, 12 / 23)).toBeLessThan(1e-15);
    expect(Math.abs(res.body.required.ebN0Db - 9.59)).toBeLessThan(0.01);
  });

  it("the (7,4) code with dmin 3: soft gain 10·log10(12/7), hard gain 10·log10(8/7) (t = 1)", async () => {
    const res = await call({ modulation: "bpsk", code: { n: 7, k: 4, dmin: 3 } });
    expect(relErr(res.body.coding.asymptoticGainSoftDb, 10 * Math.log10(12 / 7))).toBeLessThan(1e-12);
    expect(relErr(res.body.coding.asymptoticGainHardDb, 10 * Math.log10(8 / 7))).toBeLessThan(1e-12);
    expect(res.body.points).toBeUndefined();
    expect(res.body.required).toBeUndefined();
  });

  it("an uncoded (n, n, 1) code has no gain: 0 dB", async () => {
    const res = await call({ modulation: "bpsk", code: { n: 8, k: 8, dmin: 1 } });
    expect(res.body.coding.asymptoticGainSoftDb).toBe(0);
    expect(res.body.coding.correctingRadius).toBe(0);
  });

  // The documented rule: 256 + points × 2^12 work (2^16 per point for M-PSK, whose symbol error is an integral at each point;
  // 2^16·max(1, M/4) for its exact BER; 2^12 + 2^6·√M for M-QAM's exact BER); a targetBer adds 64 × the per-point figure;
  // 1 compute unit per started 2^22 work units, at least 1.
  const units = (work: number) => String(Math.max(1, Math.ceil(work / 2 ** 22)));
  const sweepOf = (count: number) => Array.from({ length: count }, (_, i) => -10 + (20 * i) / count);

  it.each([1, 100, 1000])("a BPSK sweep of %d points costs 1 unit (closed form: 256 + points × 2^12 ≤ 2^22)", async (count) => {
    const res = await call({ modulation: "bpsk", ebN0Db: sweepOf(count) });
    expect(res.body.points).toHaveLength(count);
    expect(res.headers["x-compute-units"]).toBe(units(256 + count * 2 ** 12));
    expect(res.headers["x-compute-units"]).toBe("1");
  });

  it.each([
    [1, "1"],
    [63, "1"],
    [64, "2"],
    [250, "4"],
    [1000, "16"],
  ])("an 8-PSK sweep of %d points with the nearest-neighbour BER costs %s units (256 + points × 2^16)", async (count, expected) => {
    const res = await call({ modulation: "psk", order: 8, berFormula: "nearest-neighbour", ebN0Db: sweepOf(count) });
    expect(res.body.points).toHaveLength(count);
    expect(res.headers["x-compute-units"]).toBe(units(256 + count * 2 ** 16));
    expect(res.headers["x-compute-units"]).toBe(expected);
  });

  it.each([
    [64, 900, "exact", 2 ** 12 + 2 ** 6 * 8, "1"],
    [64, 1000, "exact", 2 ** 12 + 2 ** 6 * 8, "2"],
    [4096, 1000, "exact", 2 ** 12 + 2 ** 6 * 64, "2"],
    [4096, 1000, "nearest-neighbour", 2 ** 12, "1"],
  ] as const)("a %d-QAM sweep of %d points with the %s BER costs 256 + points × %d work: %s units", async (M, count, berFormula, perPoint, expected) => {
    const res = await call({ modulation: "qam", order: M, berFormula, ebN0Db: sweepOf(count) });
    expect(res.body.points).toHaveLength(count);
    expect(res.headers["x-compute-units"]).toBe(units(256 + count * perPoint));
    expect(res.headers["x-compute-units"]).toBe(expected);
  });

  it.each([
    [8, 100, 2 ** 17, "4"],
    [16, 100, 2 ** 18, "7"],
    [32, 100, 2 ** 16, "2"],
  ])("a %d-PSK sweep of %d points by default costs 256 + points × %d (exact BER up to 16-PSK): %s units", async (M, count, perPoint, expected) => {
    const res = await call({ modulation: "psk", order: M, ebN0Db: sweepOf(count) });
    expect(res.headers["x-compute-units"]).toBe(units(256 + count * perPoint));
    expect(res.headers["x-compute-units"]).toBe(expected);
  });

  it("a targetBer adds 64 × the per-point figure: BPSK 256 + 64·2^12 → 1 unit, 8-PSK 256 + 64·2^16 → 2 units", async () => {
    const bpsk = await call({ modulation: "bpsk", targetBer: 1e-5 });
    expect(bpsk.headers["x-compute-units"]).toBe(units(256 + 64 * 2 ** 12));
    const psk = await call({ modulation: "psk", order: 8, berFormula: "nearest-neighbour", targetBer: 1e-5 });
    expect(psk.headers["x-compute-units"]).toBe(units(256 + 64 * 2 ** 16));
    expect([bpsk.headers["x-compute-units"], psk.headers["x-compute-units"]]).toEqual(["1", "2"]);
  });
});
