/** The result page's reference curves and CSV (lib/console-client/sim-plot.ts), each number from a source named beside it. */
import { describe, expect, it } from "vitest";
import { decadeTicks, pointsCsv, shannonLimitDb, uncodedBer, uncodedCurve } from "@/lib/console-client/sim-plot";

describe("reference curves", () => {
  it("uncoded BPSK/QPSK BER on AWGN is Q(√(2Eb/N0))", () => {
    // Python 3 math.erfc: 0.5*erfc(sqrt(2*10**(db/10))/sqrt(2)) at 0, 4 and 9.6 dB; 9.6 dB is the textbook ≈1e-5 point (Sklar 2001, fig. 4.25).
    for (const [db, ref] of [
      [0, 0.07864960352514257],
      [4, 0.012500818040737563],
      [9.6, 9.736176018578632e-6],
    ] as const) {
      expect(uncodedBer({ type: "awgn", modulation: "bpsk" }, db)).toBeCloseTo(ref, 15);
      expect(uncodedBer({ type: "awgn", modulation: "qpsk" }, db)! / ref).toBeCloseTo(1, 12);
    }
  });

  it("uncoded on the BSC is p, and there is no uncoded BER for the BEC", () => {
    expect(uncodedBer({ type: "bsc" }, 0.013)).toBe(0.013);
    expect(uncodedBer({ type: "bec" }, 0.1)).toBeNull();
    const c = uncodedCurve({ type: "bsc" }, 1e-4, 1e-1, 3);
    // Geometric steps: one a decade (1e-4, 1e-3, 1e-2, 1e-1).
    expect(c.map((q) => q.x / 10 ** Math.round(Math.log10(q.x)))).toEqual(c.map(() => expect.closeTo(1, 12)));
    expect(c).toHaveLength(4);
  });

  it("the Shannon limit: −1.59 dB as R → 0, 0 dB at R = 1/2 and 1.76 dB at R = 1 per real dimension", () => {
    // (2^{2R} − 1)/(2R) (Shannon 1948): ln 2 → 10·log10(ln 2) = −1.5917 dB; R = 1/2 → 1 → 0 dB; R = 1 → 3/2 → 1.7609 dB.
    expect(shannonLimitDb(1e-9)).toBeCloseTo(10 * Math.log10(Math.LN2), 6);
    expect(shannonLimitDb(0.5)).toBeCloseTo(0, 12);
    expect(shannonLimitDb(1)).toBeCloseTo(1.7609125905568124, 12);
    expect(shannonLimitDb(4 / 7)).toBeCloseTo(10 * Math.log10((2 ** (8 / 7) - 1) / (8 / 7)), 12);
  });

  it("decade ticks cover the range", () => {
    expect(decadeTicks(3e-6, 0.02)).toEqual([1e-6, 1e-5, 1e-4, 1e-3, 1e-2, 1e-1]);
  });
});

describe("CSV of the points", () => {
  it("one header row and one row per point, RFC 4180 line ends, empty cells for a point with no trials", () => {
    const counts = { frames: 1000, infoBits: 4000, bitErrors: 12, frameErrors: 5, failures: 0, undetected: 5 };
    const none = { frames: 0, infoBits: 0, bitErrors: 0, frameErrors: 0, failures: 0, undetected: 0 };
    const csv = pointsCsv({
      points: [
        {
          x: 0.01,
          status: "done",
          stoppedBy: "maxBits",
          fraction: 1,
          chunks: 1,
          counts,
          ber: { estimate: 0.003, clopperPearson: { lower: 0.00155, upper: 0.00523 }, wilson: { lower: 0.0017, upper: 0.0052 } },
          fer: { estimate: 0.005, clopperPearson: { lower: 0.0016, upper: 0.0116 }, wilson: { lower: 0.002, upper: 0.011 } },
        },
        { x: 0.001, status: "waiting", stoppedBy: null, fraction: 0, chunks: 0, counts: none, ber: null, fer: null },
      ],
    });
    const lines = csv.split("\r\n");
    expect(lines).toHaveLength(4);
    expect(lines[3]).toBe("");
    expect(lines[0]!.split(",")).toHaveLength(14);
    expect(lines[1]).toBe("0.01,1000,4000,12,5,0,5,0.003,0.00155,0.00523,0.005,0.0016,0.0116,maxBits");
    expect(lines[2]).toBe("0.001,0,0,0,0,0,0,,,,,,,");
  });
});
