import { computeEndpoints } from "@/lib/api/compute-endpoints";
import { closePools, poolLimits, runTask } from "@/lib/jobs/pool";

/**
 * The heaviest requests each math endpoint allows (each within the per-call work limit, by its own estimate),
 * used to load the server while a cheap call is timed. A linear-search decode, a Reed–Solomon encode of
 * 60,000 symbols, BCH t = 1,000 decoding, a 1,024-word codebook, a 1,000-point M-PSK sweep, BPSK-input
 * capacity with its Shannon limit, and an analysis through the dual.
 */
export const heavyRequests: { path: string; body: unknown }[] = [
  { path: "/api/v1/codes/analyze", body: { code: { family: "hamming", r: 10 }, matrices: false } },
  { path: "/api/v1/encode", body: { code: { family: "rs", m: 16, k: 60000 }, messages: [Array.from({ length: 60000 }, (_, i) => i % 65536)] } },
  { path: "/api/v1/decode", body: { code: { family: "bch", m: 16, t: 1000 }, words: Array.from({ length: 8 }, () => "0".repeat(65535)) } },
  { path: "/api/v1/distance", body: { codebook: Array.from({ length: 1024 }, (_, i) => ((i * 2654435761) >>> 0).toString(2).padStart(32, "0").repeat(32)) } },
  { path: "/api/v1/links/ber", body: { modulation: "psk", order: 1024, ebN0Db: Array.from({ length: 1000 }, (_, i) => i / 20) } },
  { path: "/api/v1/capacity", body: { channel: "bpsk-awgn", ebN0Db: 1, rate: 0.5 } },
];

/** A medium request: RS(255,223) decoding of 256 words with 16 symbol errors each. */
function mediumDecode() {
  const e = computeEndpoints.find((x) => x.id === "decode")!;
  const words = Array.from({ length: 256 }, (_, w) => Array.from({ length: 255 }, (_, i) => (i < 16 ? (w + i * 37) % 256 || 1 : 0)));
  return e.input.parse({ code: { family: "rs", m: 8, k: 223 }, words });
}

/** Pool throughput: the same batch of medium tasks through the request lane with 1 and with 2 threads. */
export async function runPoolBench(tasks = 48): Promise<void> {
  const input = mediumDecode();
  const rows: Record<string, { threads: number; "tasks/s": number; "ms per task": number }> = {};
  for (const threads of [1, 2]) {
    await closePools();
    poolLimits.requestThreads = threads;
    poolLimits.queuePerThread = tasks;
    // Start the threads and warm them before timing.
    await Promise.all(Array.from({ length: threads * 2 }, () => runTask("request", { kind: "endpoint", id: "decode", input })));
    const t0 = performance.now();
    await Promise.all(Array.from({ length: tasks }, () => runTask("request", { kind: "endpoint", id: "decode", input })));
    const s = (performance.now() - t0) / 1000;
    rows[`${threads} worker${threads > 1 ? "s" : ""}`] = { threads, "tasks/s": Math.round((tasks / s) * 10) / 10, "ms per task": Math.round((s * 1000) / tasks) };
  }
  await closePools();
  console.log(`\nWorker pool, ${tasks} tasks of RS(255,223) decoding (256 words, 16 errors each), in process`);
  console.table(rows);
  const [one, two] = Object.values(rows);
  console.log(`ratio 2 workers / 1 worker: throughput ${(two!["tasks/s"] / one!["tasks/s"]).toFixed(2)}×`);
}
