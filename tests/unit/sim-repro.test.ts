import { describe, expect, it } from "vitest";
import { bch } from "@/lib/core/codes/bch";
import { crcCode, crcPreset } from "@/lib/core/codes/crc";
import { golay } from "@/lib/core/codes/golay";
import { hamming } from "@/lib/core/codes/hamming";
import { linear } from "@/lib/core/codes/linear";
import { parity } from "@/lib/core/codes/parity";
import { repetition } from "@/lib/core/codes/repetition";
import { rs } from "@/lib/core/codes/rs";
import type { BlockCode } from "@/lib/core/codes/types";
import { createSimulator, zeroCounts, type SimChannel, type SimCounts } from "@/lib/core/sim/engine";
import { addCounts } from "@/lib/core/sim/run";
import { rng } from "../helpers/rng";

/** One code of every family the API serves. */
const families: [string, () => BlockCode][] = [
  ["repetition (5,1)", () => repetition(5)],
  ["parity (8,7) even", () => parity(8)],
  ["parity (6,5) odd", () => parity(6, "odd")],
  ["Hamming (7,4)", () => hamming(3)],
  ["extended Hamming (8,4)", () => hamming(3, true)],
  ["Hamming (15,11)", () => hamming(4)],
  ["Golay (23,12)", () => golay()],
  ["extended Golay (24,12)", () => golay(true)],
  ["linear (6,3) from G", () => linear({ generator: [Uint8Array.of(1, 0, 0, 1, 1, 0), Uint8Array.of(0, 1, 0, 1, 0, 1), Uint8Array.of(0, 0, 1, 0, 1, 1)] })],
  ["CRC-8/SMBUS over 16 bits", () => crcCode(crcPreset("CRC-8/SMBUS"), 16)],
  ["CRC-4/G-704 over 8 bits (n ≤ 16: table kernel)", () => crcCode(crcPreset("CRC-4/G-704"), 8)],
  ["BCH (31,21)", () => bch({ m: 5, t: 2 })],
  ["Reed–Solomon (15,11)", () => rs({ m: 4, k: 11 })],
];

describe("a frame received without errors decodes to itself (the premise of gap skipping)", () => {
  for (const [name, make] of families) {
    it(name, () => {
      const code = make();
      const rand = rng(3);
      for (let t = 0; t < 50; t++) {
        const m = code.q === 2 ? new Uint8Array(code.k) : new Uint16Array(code.k);
        for (let j = 0; j < code.k; j++) m[j] = Math.floor(rand() * code.q);
        const d = code.decode(code.encode(m));
        expect(d.failure).toBe(false);
        expect(d.correctedPositions).toEqual([]);
        expect(Array.from(d.message)).toEqual(Array.from(m));
      }
    });
  }
});

/**
 * Two-proportion z statistic for x1/n1 against x2/n2 with the pooled proportion (Agresti 2013, §3.1.3);
 * |z| > 3.29 rejects equal proportions at the 0.1 % level.
 */
function twoProportionZ(x1: number, n1: number, x2: number, n2: number): number {
  const p = (x1 + x2) / (n1 + n2);
  if (p === 0 || p === 1) return 0;
  return (x1 / n1 - x2 / n2) / Math.sqrt(p * (1 - p) * (1 / n1 + 1 / n2));
}

function total(code: BlockCode | null, channel: SimChannel, point: number, gapSkipping: boolean, frames: number, seeds: number[]): SimCounts {
  const sum = zeroCounts();
  for (const seed of seeds) {
    const sim = createSimulator({ code, channel, points: [point], seed, gapSkipping });
    for (let c = 0, left = frames; left > 0; c++, left -= sim.framesPerChunk) addCounts(sum, sim.runChunk(0, c, Math.min(left, sim.framesPerChunk)));
  }
  return sum;
}

describe("gap skipping and drawing every bit agree in distribution (two-proportion z test, 0.1 % level, seeds 1..4)", () => {
  const cases: [string, BlockCode | null, SimChannel, number, number][] = [
    ...families.map(([name, make]): [string, BlockCode | null, SimChannel, number, number] => {
      const code = make();
      const bits = code.n * Math.log2(code.q);
      // p chosen so that a frame sees about a quarter of an error on average: FER well inside (0, 1).
      return [name, code, { kind: "bsc" }, Math.min(0.1, 0.25 / bits), bits > 100 ? 2_000 : 10_000];
    }),
    ["uncoded, frames of 16 bits", null, { kind: "bsc" }, 0.01, 20_000],
    ["parity (8,7) on the BEC", parity(8), { kind: "bec" }, 0.05, 20_000],
    ["Golay (23,12) on the BEC (erasures as coins)", golay(), { kind: "bec" }, 0.05, 5_000],
  ];
  for (const [name, code, channel, p, frames] of cases) {
    it(`${name}, ${channel.kind.toUpperCase()} at ${p.toPrecision(3)}: frame errors and frames with a bit error`, () => {
      const seeds = [1, 2, 3, 4];
      const a = total(code, channel, p, true, frames, seeds);
      const b = total(code, channel, p, false, frames, seeds);
      expect(a.frames).toBe(b.frames);
      expect(a.frameErrors).toBeGreaterThan(0);
      expect(Math.abs(twoProportionZ(a.frameErrors, a.frames, b.frameErrors, b.frames))).toBeLessThan(3.29);
      expect(Math.abs(twoProportionZ(a.failures, a.frames, b.failures, b.frames))).toBeLessThan(3.29);
      expect(a.frameErrors).toBe(a.failures + a.undetected);
      expect(b.frameErrors).toBe(b.failures + b.undetected);
    });
  }
});

describe("reproducibility: counts depend on (seed, point, chunk) only", () => {
  const specs: [string, BlockCode | null, SimChannel, number[], boolean][] = [
    ["Hamming (7,4), BSC, every bit drawn", hamming(3), { kind: "bsc" }, [0.02, 0.005], false],
    ["Golay (23,12), BSC, gap skipping", golay(), { kind: "bsc" }, [0.03, 0.01], true],
    ["Hamming (7,4), QPSK soft", hamming(3), { kind: "awgn", modulation: "qpsk", decisions: "soft" }, [2, 4], true],
    ["Reed–Solomon (15,11), BEC", rs({ m: 4, k: 11 }), { kind: "bec" }, [0.02, 0.05], true],
  ];
  for (const [name, code, channel, points, gapSkipping] of specs) {
    it(`${name}: chunks run in order, or shuffled as on several workers, sum to the same bytes`, () => {
      const chunks = 6;
      const make = () => createSimulator({ code, channel, points, seed: 0xdeadbeef, gapSkipping });
      const frames = (sim: ReturnType<typeof make>) => Math.min(sim.framesPerChunk, 3000);
      const inOrder = make();
      const expected = points.map((_, pt) => {
        const sum = zeroCounts();
        for (let c = 0; c < chunks; c++) addCounts(sum, inOrder.runChunk(pt, c, frames(inOrder)));
        return sum;
      });
      // Another simulator (another worker) runs the (point, chunk) pairs in a shuffled order; results are then summed in chunk order.
      const other = make();
      const pairs = points.flatMap((_, pt) => Array.from({ length: chunks }, (_, c) => [pt, c] as const));
      const rand = rng(9);
      for (let i = pairs.length - 1; i > 0; i--) {
        const j = Math.floor(rand() * (i + 1));
        [pairs[i], pairs[j]] = [pairs[j]!, pairs[i]!];
      }
      const results = new Map(pairs.map(([pt, c]) => [`${pt}/${c}`, other.runChunk(pt, c, frames(other))]));
      const shuffled = points.map((_, pt) => {
        const sum = zeroCounts();
        for (let c = 0; c < chunks; c++) addCounts(sum, results.get(`${pt}/${c}`)!);
        return sum;
      });
      expect(JSON.stringify(shuffled)).toBe(JSON.stringify(expected));
      expect(expected.some((s) => s.frameErrors > 0)).toBe(true);
    });
  }

  it("another seed, point or chunk gives other counts", () => {
    const sim = (seed: number) => createSimulator({ code: hamming(3), channel: { kind: "bsc" }, points: [0.05, 0.05], seed, gapSkipping: false });
    const a = sim(1).runChunk(0, 0, 20_000);
    expect(sim(1).runChunk(0, 0, 20_000)).toEqual(a);
    expect(sim(2).runChunk(0, 0, 20_000)).not.toEqual(a);
    expect(sim(1).runChunk(1, 0, 20_000)).not.toEqual(a);
    expect(sim(1).runChunk(0, 1, 20_000)).not.toEqual(a);
  });

  it("the first f frames of a chunk are a prefix of the whole chunk (a cut last chunk is consistent)", () => {
    const sim = createSimulator({ code: hamming(3), channel: { kind: "bsc" }, points: [0.05], seed: 4, gapSkipping: false });
    const whole = sim.runChunk(0, 0, 10_000);
    const part = sim.runChunk(0, 0, 4_000);
    expect(part.frames).toBe(4_000);
    expect(part.frameErrors).toBeLessThanOrEqual(whole.frameErrors);
    expect(part.frameErrors).toBeGreaterThan(0);
  });
});
