/**
 * The Claims page's words for a claim, read off the API's own presentation: the claims are decided by the real
 * decision functions, and the code's (n, k) must be the textbook one (Hamming r = 3 is (7,4); Golay is (23,12)).
 */
import { describe, expect, it } from "vitest";
import { decideAnalytic, decideMeasured, resolveTarget, type AnalyticEvidence } from "@/lib/api/claim-evidence";
import { evidenceWords, formatRate, intervalWords, targetWords } from "@/lib/console-client/claim-words";

const ber9 = resolveTarget({ metric: "ber", atMost: 1e-9 });

function analytic(e: Omit<AnalyticEvidence, "mode">, target = resolveTarget({ metric: "fer", atMost: 1e-4 })) {
  const evidence = { mode: "analytic" as const, ...e };
  const d = decideAnalytic(target, evidence);
  return { mode: "analytic" as const, evidence, details: d.details, target, interval: d.interval, exact: d.exact, rate: d.rate };
}

describe("claim words", () => {
  it("measured counts in bits, with thousands separators", () => {
    const target = ber9;
    const d = decideMeasured(target, 0.95, { mode: "measured", trials: 5e9, errors: 2 });
    expect(evidenceWords({ mode: "measured", evidence: { mode: "measured", trials: 5e9, errors: 2 }, details: d.details, target })).toBe("measured: 2 errors in 5,000,000,000 bits");
    expect(evidenceWords({ mode: "measured", evidence: { mode: "measured", trials: 1000, errors: 1 }, details: d.details, target: resolveTarget({ metric: "fer", atMost: 0.01 }) })).toBe("measured: 1 error in 1,000 frames");
  });

  it("analytic evidence names the code by its (n, k) and the channel by its parameter", () => {
    expect(evidenceWords(analytic({ code: { family: "hamming", r: 3, extended: false }, channel: { type: "bsc", p: 1e-3 } }))).toBe("analytic: Hamming (7,4) on BSC p = 0.001");
    expect(evidenceWords(analytic({ code: { family: "golay", extended: false }, channel: { type: "bsc", p: 1e-2 } }))).toBe("analytic: Golay (23,12) on BSC p = 0.01");
    expect(evidenceWords(analytic({ channel: { type: "awgn", modulation: "qpsk", ebN0Db: 10.6 } }, ber9))).toBe("analytic: uncoded QPSK on AWGN at Eb/N0 = 10.6 dB");
    expect(evidenceWords(analytic({ channel: { type: "awgn", modulation: "qam", order: 16, ebN0Db: 12 } }, ber9))).toBe("analytic: uncoded 16-QAM on AWGN at Eb/N0 = 12 dB");
    expect(evidenceWords(analytic({ channel: { type: "bsc", p: 1e-6 }, frameBits: 1024 }))).toBe("analytic: uncoded BSC p = 1e-6, 1,024-bit frames");
  });

  it("simulated evidence reads its operating point from `at`", () => {
    const details = { n: 7, k: 4 };
    const target = resolveTarget({ metric: "fer", atMost: 1e-2 });
    expect(evidenceWords({ mode: "simulated", evidence: { mode: "simulated", code: { family: "hamming", r: 3 }, channel: { type: "bsc" }, at: 0.01 }, details, target })).toBe("simulated: Hamming (7,4) on BSC p = 0.01");
    expect(evidenceWords({ mode: "simulated", evidence: { mode: "simulated", channel: { type: "awgn", modulation: "bpsk", decisions: "soft" }, at: 4 }, details: {}, target })).toBe("simulated: uncoded BPSK on AWGN at Eb/N0 = 4 dB, soft decisions");
    expect(evidenceWords({ mode: "simulated", evidence: { mode: "simulated", channel: { type: "bec" }, at: 0.2 }, details: {}, target })).toBe("simulated: uncoded BEC ε = 0.2");
    // A pending claim has no details yet: the code is named without its (n, k).
    expect(evidenceWords({ mode: "simulated", evidence: { mode: "simulated", code: { family: "golay", extended: true }, channel: { type: "bsc" }, at: 0.02 }, details: {}, target })).toBe("simulated: extended Golay on BSC p = 0.02");
  });

  it("targets, rates and intervals as the API's reasoning writes numbers", () => {
    expect(targetWords({ metric: "ber", atMost: 1e-9, preset: "fibre" })).toBe("BER ≤ 1e-9 (fibre preset)");
    expect(targetWords({ metric: "fer", atMost: 1e-4 })).toBe("FER ≤ 1e-4");
    expect(formatRate(2.0916e-5)).toBe("2.092e-5");
    expect(formatRate(0.001)).toBe("0.001");
    expect(formatRate(0)).toBe("0");
    // Hamming (7,4), BSC p = 1e-3: FER = 1 − (1−p)^7 − 7p(1−p)^6, written out here.
    const p = 1e-3;
    const fer = 1 - (1 - p) ** 7 - 7 * p * (1 - p) ** 6;
    const c = analytic({ code: { family: "hamming", r: 3, extended: false }, channel: { type: "bsc", p } });
    expect(Math.abs(c.rate - fer) / fer).toBeLessThan(1e-9);
    expect(intervalWords(c)).toBe(`exactly ${formatRate(fer)}`);
    const m = decideMeasured(ber9, 0.95, { mode: "measured", trials: 5e9, errors: 2 });
    expect(intervalWords(m)).toBe(`${formatRate(m.interval.lower)} to ${formatRate(m.interval.upper)}`);
  });
});
