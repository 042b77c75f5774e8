import { describe, expect, it } from "vitest";
import { hamming } from "@/lib/core/codes/hamming";
import { InputError } from "@/lib/core/errors";
import { createSimulator, zeroCounts } from "@/lib/core/sim/engine";
import { chunkFrames, runPoint, stopReason } from "@/lib/core/sim/run";

const sim = createSimulator({ code: hamming(3), channel: { kind: "bsc" }, points: [0.05, 0], seed: 8 });

describe("stopping rules: whichever comes first, and the result says which", () => {
  it("minimum bit errors: stops at the first chunk boundary with at least that many", () => {
    const r = runPoint(sim, 0, { minBitErrors: 500, maxFrames: 1e9 });
    expect(r.stoppedBy).toBe("minBitErrors");
    expect(r.counts.bitErrors).toBeGreaterThanOrEqual(500);
    expect(r.chunks).toBe(1);
  });

  it("minimum frame errors", () => {
    const r = runPoint(sim, 0, { minBitErrors: 1e12, minFrameErrors: 20_000, maxFrames: 1e9 });
    expect(r.stoppedBy).toBe("minFrameErrors");
    expect(r.counts.frameErrors).toBeGreaterThanOrEqual(20_000);
    // FER ≈ 0.044 at p = 0.05, so the count is reached in the 4th chunk of 149,796 frames.
    expect(r.chunks).toBeGreaterThan(1);
  });

  it("maximum information bits: exact to within one frame (⌈bits / k⌉ frames), the last chunk cut", () => {
    const r = runPoint(sim, 1, { minFrameErrors: 1, maxBits: 1_000_001 });
    expect(r.stoppedBy).toBe("maxBits");
    expect(r.counts.frames).toBe(250_001);
    expect(r.counts.infoBits).toBe(1_000_004);
    expect(r.chunks).toBe(2);
  });

  it("maximum frames: exact", () => {
    const r = runPoint(sim, 1, { maxBits: 1e12, maxFrames: 300_000 });
    expect(r.stoppedBy).toBe("maxFrames");
    expect(r.counts.frames).toBe(300_000);
    expect(r.counts.frameErrors).toBe(0);
  });

  it("wall-time budget: read from the caller's clock between chunks", () => {
    let now = 0;
    const clock = () => (now += 40); // every reading 40 ms later
    const r = runPoint(sim, 1, { maxFrames: 1e12, maxMillis: 100 }, clock);
    expect(r.stoppedBy).toBe("maxMillis");
    // Readings: start 40; after chunk 1 → 80 (40 elapsed), 2 → 120 (80), 3 → 160 (120 ≥ 100).
    expect(r.chunks).toBe(3);
    expect(r.counts.frames).toBe(3 * sim.framesPerChunk);
  });

  it("rules are checked in the order errors, bits, frames, time when several hold", () => {
    const c = { ...zeroCounts(), frames: 10, infoBits: 40, bitErrors: 5, frameErrors: 3 };
    expect(stopReason(c, { minBitErrors: 5, minFrameErrors: 3, maxBits: 40, maxFrames: 10, maxMillis: 1 }, 2)).toBe("minBitErrors");
    expect(stopReason(c, { minFrameErrors: 3, maxBits: 40, maxFrames: 10 })).toBe("minFrameErrors");
    expect(stopReason(c, { maxBits: 40, maxFrames: 10 })).toBe("maxBits");
    expect(stopReason(c, { maxBits: 41, maxFrames: 10 })).toBe("maxFrames");
    expect(stopReason(c, { maxBits: 41, maxMillis: 1 }, 1)).toBe("maxMillis");
    expect(stopReason(c, { minBitErrors: 6, maxBits: 41, maxFrames: 11, maxMillis: 3 }, 2)).toBeNull();
  });

  it("chunkFrames cuts the last chunk and gives 0 past the end", () => {
    const rules = { maxFrames: sim.framesPerChunk + 5 };
    expect(chunkFrames(sim, rules, 0)).toBe(sim.framesPerChunk);
    expect(chunkFrames(sim, rules, 1)).toBe(5);
    expect(chunkFrames(sim, rules, 2)).toBe(0);
  });

  it("refuses rules that may never end or are not positive, and a time budget without a clock", () => {
    expect(() => runPoint(sim, 0, { minBitErrors: 10 })).toThrow(/maxBits or maxFrames/);
    expect(() => runPoint(sim, 0, { maxBits: 0 })).toThrow(InputError);
    expect(() => runPoint(sim, 0, { maxFrames: 1.5 })).toThrow(/positive integer/);
    expect(() => runPoint(sim, 0, { maxFrames: 10, maxMillis: 5 })).toThrow(/clock/);
  });
});
