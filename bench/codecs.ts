import { bch } from "@/lib/core/codes/bch";
import { crcCompute, crcPreset } from "@/lib/core/codes/crc";
import { golay } from "@/lib/core/codes/golay";
import { hamming } from "@/lib/core/codes/hamming";
import { rs } from "@/lib/core/codes/rs";
import type { BlockCode, Word } from "@/lib/core/codes/types";
import * as bch255 from "./baselines/bch255";
import { crcBitwise } from "./baselines/crc-bitwise";
import * as golay24 from "./baselines/golay24";
import * as hamming74 from "./baselines/hamming74";
import * as hamming84 from "./baselines/hamming84";
import * as rs255 from "./baselines/rs255";
import { rng } from "../tests/helpers/rng";

/**
 * Encode and decode throughput (Mbit/s of information) of the shipped codecs beside deliberately
 * straightforward ones (generator-matrix multiply, brute-force search, table-free field arithmetic),
 * measured in the same process on the same seeded words with t errors per word.
 */
interface Baseline {
  encode(m: Word): Word;
  decode(w: Word): Word;
}

interface Case {
  name: string;
  code: BlockCode;
  baseline: Baseline;
  errors: number;
}

function words(code: BlockCode, count: number, errors: number, seed: number) {
  const rand = rng(seed);
  const messages: Word[] = [];
  const received: Word[] = [];
  for (let i = 0; i < count; i++) {
    const m = code.q === 2 ? new Uint8Array(code.k) : new Uint16Array(code.k);
    for (let j = 0; j < code.k; j++) m[j] = Math.floor(rand() * code.q);
    const c = code.encode(m).slice();
    const hit = new Set<number>();
    while (hit.size < errors) hit.add(Math.floor(rand() * code.n));
    for (const p of hit) c[p] = code.q === 2 ? c[p]! ^ 1 : (c[p]! ^ (1 + Math.floor(rand() * (code.q - 1)))) & (code.q - 1);
    messages.push(m);
    received.push(c);
  }
  return { messages, received };
}

/** Mbit/s of information bits: `pass` handles `bitsPerPass` of them and is repeated for at least `ms`. */
function throughput(bitsPerPass: number, pass: () => void, ms: number): number {
  let passes = 0;
  const start = performance.now();
  let now = start;
  while (now - start < ms) {
    pass();
    passes++;
    now = performance.now();
  }
  return (passes * bitsPerPass) / ((now - start) / 1000) / 1e6;
}

/** One pass of `fn` over every input, one word per call. */
const eachWord = (inputs: Word[], fn: (w: Word) => unknown) => () => {
  for (const w of inputs) fn(w);
};

/** Words of `length` entries back to back in one buffer of the code's word type, as encodeBatch and decodeBatch take them. */
function concat(code: BlockCode, ws: Word[], length: number): Word {
  const out = code.q === 2 ? new Uint8Array(ws.length * length) : new Uint16Array(ws.length * length);
  ws.forEach((w, i) => out.set(w, i * length));
  return out;
}

const sameWord = (a: Word, b: Word) => a.length === b.length && a.every((v, j) => v === b[j]);

export function runCodecBench(ms = Number(process.env.PARITAS_BENCH_CODEC_MS ?? 1000)): void {
  const cases: Case[] = [
    { name: "Hamming (7,4), 1 error", code: hamming(3), baseline: hamming74 as Baseline, errors: 1 },
    { name: "extended Hamming (8,4), 1 error", code: hamming(3, true), baseline: hamming84 as Baseline, errors: 1 },
    { name: "Golay (24,12), 3 errors", code: golay(true), baseline: golay24 as Baseline, errors: 3 },
    { name: "BCH (255,239), 2 errors", code: bch({ m: 8, t: 2 }), baseline: bch255 as Baseline, errors: 2 },
    { name: "RS (255,223), 16 errors", code: rs({ m: 8, k: 223 }), baseline: rs255 as Baseline, errors: 16 },
  ];
  const rows: Record<string, Record<string, string>> = {};
  // Each case's code name and number of words, by the path its shipped encoder and decoder were timed on.
  const batched: string[] = [];
  const perWord: string[] = [];
  const batchedDecode: string[] = [];
  const perWordDecode: string[] = [];
  // Where decode was timed through decodeBatch: the per-word figure beside it.
  const oneByOne: string[] = [];
  for (const c of cases) {
    const count = Math.max(16, Math.ceil(20000 / c.code.n));
    const { messages, received } = words(c.code, count, c.errors, 7);
    // Both decoders must agree, on the path that is timed, before their speeds mean anything.
    const receivedBatch = concat(c.code, received, c.code.n);
    const decodeBatch = c.code.decodeBatch?.bind(c.code);
    const decoded = decodeBatch?.(receivedBatch, count);
    for (let i = 0; i < count; i++) {
      const a = decoded ? decoded.messages.subarray(i * c.code.k, (i + 1) * c.code.k) : c.code.decode(received[i]!).message;
      const b = c.baseline.decode(received[i]!);
      if (!sameWord(a, b) || !sameWord(a, messages[i]!)) throw new Error(`${c.name}: decoders disagree on word ${i}`);
    }
    // So must the encoders, on the path that is timed.
    const batch = concat(c.code, messages, c.code.k);
    const encodeBatch = c.code.encodeBatch?.bind(c.code);
    const shipped = encodeBatch?.(batch, count);
    messages.forEach((m, i) => {
      const codeword = shipped ? shipped.subarray(i * c.code.n, (i + 1) * c.code.n) : c.code.encode(m);
      if (!sameWord(codeword, c.baseline.encode(m))) throw new Error(`${c.name}: encoders disagree on word ${i}`);
    });
    const info = c.code.k * Math.log2(c.code.q);
    const bits = count * info;
    (encodeBatch ? batched : perWord).push(`${c.code.name} ${count}`);
    (decodeBatch ? batchedDecode : perWordDecode).push(`${c.code.name} ${count}`);
    const encFast = throughput(bits, encodeBatch ? () => encodeBatch(batch, count) : eachWord(messages, (m) => c.code.encode(m)), ms);
    const encBase = throughput(bits, eachWord(messages, (m) => c.baseline.encode(m)), ms);
    const decFast = throughput(bits, decodeBatch ? () => decodeBatch(receivedBatch, count) : eachWord(received, (w) => c.code.decode(w)), ms);
    const decBase = throughput(bits, eachWord(received, (w) => c.baseline.decode(w)), ms);
    if (decodeBatch) {
      const single = throughput(bits, eachWord(received, (w) => c.code.decode(w)), ms);
      oneByOne.push(`${c.code.name} ${single.toFixed(2)} Mbit/s (decodeBatch ${(decFast / single).toFixed(1)}× that)`);
    }
    rows[c.name] = {
      "encode Mbit/s": encFast.toFixed(2),
      "baseline": encBase.toFixed(2),
      "ratio": `${(encFast / encBase).toFixed(1)}×`,
      "decode Mbit/s": decFast.toFixed(2),
      "baseline ": decBase.toFixed(2),
      "ratio ": `${(decFast / decBase).toFixed(1)}×`,
    };
  }
  console.log(
    `\nBlock codecs in process, information bits, ${ms} ms per measurement; shipped encode and decode through encodeBatch and decodeBatch where the code has them ` +
      "(baseline: straightforward implementation, one word per call, same words)",
  );
  console.table(rows);
  console.log(
    `Measured paths: shipped encode = ${paths("encodeBatch", "encode", batched, perWord, "messages")}; ` +
      `shipped decode = ${paths("decodeBatch", "decode", batchedDecode, perWordDecode, "words")}; both baselines = one word per call.`,
  );
  if (oneByOne.length > 0) console.log(`Shipped decode one word per call instead, for comparison: ${oneByOne.join("; ")}.`);
}

/** How a shipped path was timed: one batch call over each case's words, or one word per call; each with the cases' code names and counts. */
function paths(batchCall: string, call: string, batched: string[], perWord: string[], noun: string): string {
  return [batched.length > 0 ? `one ${batchCall} call over all of a case's ${noun} (${batched.join(", ")} ${noun})` : "", perWord.length > 0 ? `${call} one word per call (${perWord.join(", ")} ${noun})` : ""]
    .filter(Boolean)
    .join("; ");
}

/** CRC throughput (MB/s of message) of the table-driven engine beside the bit-serial register, on the same 64 KiB. */
export function runCrcBench(ms = Number(process.env.PARITAS_BENCH_CODEC_MS ?? 1000)): void {
  const rand = rng(11);
  const data = Uint8Array.from({ length: 65536 }, () => Math.floor(rand() * 256));
  const check = new TextEncoder().encode("123456789");
  const rows: Record<string, Record<string, string>> = {};
  for (const name of ["CRC-16/KERMIT", "CRC-32/ISO-HDLC", "CRC-32/BZIP2", "CRC-64/XZ", "CRC-64/ECMA-182"]) {
    const p = crcPreset(name);
    // Both must give the catalogue's check value and agree on the timed data before their speeds mean anything.
    if (crcCompute(p, check) !== p.check || crcBitwise(p, check) !== p.check) throw new Error(`${name}: check value differs`);
    if (crcCompute(p, data) !== crcBitwise(p, data)) throw new Error(`${name}: the two disagree on the bench data`);
    const bits = data.length * 8;
    const fast = throughput(bits, () => crcCompute(p, data), ms) / 8;
    const base = throughput(bits, () => crcBitwise(p, data), ms) / 8;
    rows[name] = { "table MB/s": fast.toFixed(2), "bit-serial MB/s": base.toFixed(3), "ratio": `${(fast / base).toFixed(0)}×` };
  }
  console.log(`\nCRC in process, ${data.length} random bytes per pass, ${ms} ms per measurement (baseline: bit-serial register in BigInt, no table)`);
  console.table(rows);
}
