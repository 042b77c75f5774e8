import { hamming } from "@/lib/core/codes/hamming";
import { createSimulator, zeroCounts, type SimSpec } from "@/lib/core/sim/engine";
import { addCounts, runPoint } from "@/lib/core/sim/run";
import { simulateHamming74Bsc } from "./baselines/bsc-hamming74-loop";

/**
 * The Monte Carlo engine in process (lib/core/sim), one thread: Hamming (7,4) hard decisions on a BSC at
 * p = 1e-3 with every channel bit drawn, beside a straightforward per-bit loop (bench/baselines/
 * bsc-hamming74-loop.ts) in the same run, and with gap skipping; the time for 3·10^9 bits of uncoded BSC
 * at p = 1e-10; soft-decision BPSK-AWGN samples per second. PARITAS_BENCH_SIM_MS sets each measurement's
 * duration (default 2000).
 */
function rate(spec: SimSpec, ms: number) {
  const sim = createSimulator(spec);
  const counts = zeroCounts();
  sim.runChunk(0, 0); // warm the kernel before timing
  const start = performance.now();
  let chunk = 1;
  while (performance.now() - start < ms) addCounts(counts, sim.runChunk(0, chunk++));
  const seconds = (performance.now() - start) / 1000;
  return { counts, seconds, infoBitsPerSecond: counts.infoBits / seconds, samplesPerSecond: (counts.frames * sim.channelBitsPerFrame) / seconds };
}

export function runSimBench(ms = Number(process.env.PARITAS_BENCH_SIM_MS ?? 2000)): void {
  const p = 1e-3;
  const code = hamming(3);
  simulateHamming74Bsc(p, 100_000);
  let frames = 0;
  let base = { bitErrors: 0, frameErrors: 0 };
  const t0 = performance.now();
  while (performance.now() - t0 < ms) {
    const r = simulateHamming74Bsc(p, 100_000);
    base = { bitErrors: base.bitErrors + r.bitErrors, frameErrors: base.frameErrors + r.frameErrors };
    frames += 100_000;
  }
  const baseRate = (frames * 4) / ((performance.now() - t0) / 1000);
  const perBit = rate({ code, channel: { kind: "bsc" }, points: [p], seed: 1, gapSkipping: false }, ms);
  const gap = rate({ code, channel: { kind: "bsc" }, points: [p], seed: 1 }, ms);
  const mbit = (x: number) => (x / 1e6).toFixed(1);
  const ber = (errors: number, bits: number) => (errors / bits).toExponential(2);
  console.log("\nMonte Carlo engine, Hamming (7,4) hard decisions on BSC(1e-3), one thread");
  console.table({
    "per-bit JS loop (Math.random)": { "Mbit/s (information)": mbit(baseRate), "ratio": "1×", "BER seen": ber(base.bitErrors, frames * 4) },
    "engine, every bit drawn": { "Mbit/s (information)": mbit(perBit.infoBitsPerSecond), "ratio": `${(perBit.infoBitsPerSecond / baseRate).toFixed(1)}×`, "BER seen": ber(perBit.counts.bitErrors, perBit.counts.infoBits) },
    "engine, gap skipping": { "Mbit/s (information)": mbit(gap.infoBitsPerSecond), "ratio": `${(gap.infoBitsPerSecond / baseRate).toFixed(1)}×`, "BER seen": ber(gap.counts.bitErrors, gap.counts.infoBits) },
  });

  const uncoded = createSimulator({ code: null, channel: { kind: "bsc" }, points: [1e-10], seed: 2 });
  const t1 = performance.now();
  const far = runPoint(uncoded, 0, { maxBits: 3e9 });
  console.log(`uncoded BSC(1e-10), 3e9 bits with gap skipping: ${(performance.now() - t1).toFixed(0)} ms, ${far.chunks} chunks, ${far.counts.bitErrors} bit errors`);

  const soft = rate({ code, channel: { kind: "awgn", modulation: "bpsk", decisions: "soft" }, points: [4], seed: 3 }, ms);
  const softUncoded = rate({ code: null, channel: { kind: "awgn", modulation: "bpsk", decisions: "soft" }, points: [4], seed: 3 }, ms);
  console.log(
    `BPSK-AWGN soft decisions at Eb/N0 = 4 dB: Hamming (7,4) ML ${mbit(soft.samplesPerSecond)} M channel samples/s (${mbit(soft.infoBitsPerSecond)} Mbit/s information), ` +
      `uncoded ${mbit(softUncoded.samplesPerSecond)} M samples/s`,
  );
}
