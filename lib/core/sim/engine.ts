import type { BlockCode, Word } from "../codes/types";
import { InputError } from "../errors";
import { BernoulliBits, chunkStream, CoinBits, geometricGap, Normals, type Stream } from "./stream";

/**
 * The Monte Carlo engine: random messages through a block code (or none), a memoryless channel and the
 * code's decoder, counted per frame. Pure and deterministic: a chunk's counts depend only on the spec,
 * the point index and the chunk index (streams: ./stream.ts), so chunks may run anywhere in any order and
 * their counts, summed in chunk order, are the same bytes on every machine.
 *
 * Channels (a point is p for the BSC, ε for the BEC, Eb/N0 in dB for AWGN):
 * - BSC(p): each channel bit flipped independently with probability p.
 * - BEC(ε): each channel bit erased with probability ε. Codes with erasure decoding (supportsErasures:
 *   single parity check, Reed–Solomon, where a symbol is erased when any of its bits is) get the erased
 *   positions; for every other code, and uncoded, an erased bit is replaced by a fair random bit — flipped
 *   with probability 1/2 — and the word is hard-decoded.
 * - AWGN with BPSK or Gray-mapped QPSK: bit 0 ↦ +1, bit 1 ↦ −1 on each real dimension, with noise variance
 *   σ² = 1 / (2·R·Eb/N0) per dimension, R = information bits per channel bit. For BPSK Es = R·Eb per bit;
 *   Gray QPSK carries two bits on the in-phase and quadrature dimensions with Es = 2·R·Eb, so each bit
 *   sees the same per-dimension SNR and the same channel LLR 2y/σ² as BPSK (Proakis & Salehi 2008, §4.3).
 *   Consecutive channel bits pair into QPSK symbols, and the polar method's normals come in pairs, one per
 *   dimension — so for one seed BPSK and Gray QPSK give the same counts, as they must in distribution.
 *   Hard decisions: bit = [y < 0], then the code's hard decoder. Soft decisions: maximum
 *   likelihood by correlation, the codeword maximising Σ_j LLR_j·(1 − 2c_j) over all 2^k codewords
 *   (binary codes with k ≤ 12; uncoded: the sign of each LLR).
 *
 * Gap skipping (BSC and BEC, on unless `gapSkipping: false`): a chunk's frames are laid end to end as one
 * Bernoulli sequence of channel bits, and the gap to the next flip or erasure is drawn from the geometric
 * distribution (./stream.ts geometricGap). Frames without an event are never built: a word received
 * without error is a codeword, and every decoder here — syndrome decoders (Hamming, Golay, BCH, linear,
 * repetition, parity), the CRC check, and Reed–Solomon errors-and-erasures decoding — returns a codeword
 * unchanged with no failure (tests/unit/sim-repro.test.ts checks this for every family), so such a
 * frame adds one frame and k information bits and nothing else. Cost then grows with the number of
 * events, not bits. With gap skipping off, every channel bit is drawn (BernoulliBits, bit-sliced).
 *
 * Layout of the hot paths:
 * - table kernel (binary codes with n ≤ 16, hard decisions): a frame is one integer, bit j = position j.
 *   Encoding is enc[m] over all 2^k messages and decoding dec[r] over all 2^n received words, built once
 *   with the code's own encodeBatch/decodeBatch (or encode/decode); dec[r] holds the message in bits
 *   0..15 and the failure flag in bit 16. Messages, flips and coins come 32 bits per PRNG output.
 * - ML kernel: the codebook as ±1 in one Float64Array (2^k·n), the received frame in a reused Float64Array.
 * - batch kernel (everything else): a batch of frames back to back in reused typed arrays — messages
 *   (bits or GF(2^m) symbols), channel events one byte per channel bit — encoded with encodeBatch and
 *   decoded with decodeBatch where the code offers them (decodeBatch never takes erasures), else one
 *   frame at a time through encode/decode, whose results the code allocates.
 *
 * Counts: a frame error is a frame whose decoded message differs from the sent one or whose decoder
 * declared failure; undetected errors are wrong messages without a declared failure; bit errors are over
 * information bits, taken from the decoder's best estimate even when it declares failure.
 */

export type SimChannel =
  | { kind: "bsc" }
  | { kind: "bec" }
  | { kind: "awgn"; modulation: "bpsk" | "qpsk"; decisions: "hard" | "soft" };

export interface SimSpec {
  /** The code, or null for uncoded transmission in frames of `uncodedFrameBits` bits. */
  code: BlockCode | null;
  /** Frame length when uncoded (default 1, so that frames are bits). */
  uncodedFrameBits?: number;
  channel: SimChannel;
  /** The sweep: p (BSC), ε (BEC) or Eb/N0 in dB (AWGN). */
  points: readonly number[];
  /** 32-bit unsigned seed. */
  seed: number;
  /** Skip event-free frames on the BSC and BEC (default true). */
  gapSkipping?: boolean;
}

export interface SimCounts {
  frames: number;
  infoBits: number;
  bitErrors: number;
  frameErrors: number;
  /** Frames whose decoder declared failure. */
  failures: number;
  /** Frames decoded to a wrong message without a declared failure. */
  undetected: number;
}

export const zeroCounts = (): SimCounts => ({ frames: 0, infoBits: 0, bitErrors: 0, frameErrors: 0, failures: 0, undetected: 0 });

/** Channel bits per chunk: a chunk holds ⌊2^20 / channel bits per frame⌋ frames (at least 1). */
export const CHUNK_CHANNEL_BITS = 1 << 20;
/** With ML decoding a chunk also holds at most ⌊2^24 / (2^k·n)⌋ frames, so that every chunk is a similar amount of work. */
export const CHUNK_CORRELATIONS = 1 << 24;
/** Largest k for soft-decision ML decoding by correlation. */
export const MAX_ML_K = 12;
/** Largest n for the table kernel (2^n decoded words built once). */
export const MAX_TABLE_N = 16;
export const MAX_UNCODED_FRAME_BITS = 1 << 16;

export type Kernel = "uncoded" | "table" | "ml" | "batch";

export interface Simulator {
  readonly spec: SimSpec;
  readonly kernel: Kernel;
  /** BEC erasures handed to the decoder (else erased bits are replaced by fair random bits). */
  readonly erasureDecoding: boolean;
  readonly infoBitsPerFrame: number;
  readonly channelBitsPerFrame: number;
  readonly framesPerChunk: number;
  /** Counts of the first `frames` frames (default all) of chunk `chunk` at point `point`. */
  runChunk(point: number, chunk: number, frames?: number): SimCounts;
}

/** Counts of chunk `chunk` at point `point`: `sim.runChunk`, as a function. */
export function runChunk(sim: Simulator, point: number, chunk: number, frames?: number): SimCounts {
  return sim.runChunk(point, chunk, frames);
}

interface PointParams {
  /** Event probability (BSC, BEC). */
  p: number;
  /** log1p(−p), for the gaps. */
  logQ: number;
  /** Noise standard deviation per dimension (AWGN). */
  sigma: number;
}

type Run = (g: Stream, pt: PointParams, frames: number, c: SimCounts) => void;

const popcount = (x: number) => {
  x -= (x >>> 1) & 0x55555555;
  x = (x & 0x33333333) + ((x >>> 2) & 0x33333333);
  return (Math.imul((x + (x >>> 4)) & 0x0f0f0f0f, 0x01010101) >>> 24) as number;
};

const FAILURE_FLAG = 1 << 16;

function isU32(v: number) {
  return Number.isInteger(v) && v >= 0 && v <= 0xffffffff;
}

/**
 * Check a spec once and return its simulator (the kernels themselves check nothing). Building one costs
 * up to 2^16 decodes (table kernel) or 2^12 encodes (ML kernel): build it once per request and reuse it
 * for every chunk.
 */
export function createSimulator(spec: SimSpec): Simulator {
  const { code, channel, points } = spec;
  if (!isU32(spec.seed)) throw new InputError(`seed must be an integer from 0 to 2^32 − 1; got ${spec.seed}`, ["seed"]);
  if (points.length === 0) throw new InputError("the sweep needs at least one point", ["points"]);
  points.forEach((x, i) => {
    if (!Number.isFinite(x)) throw new InputError(`point ${i} is ${x}; points must be finite`, ["points", i]);
    if (channel.kind !== "awgn" && (x < 0 || x > 1)) throw new InputError(`point ${i} is ${x}; a ${channel.kind === "bsc" ? "crossover" : "erasure"} probability lies in [0, 1]`, ["points", i]);
  });
  const soft = channel.kind === "awgn" && channel.decisions === "soft";
  const gap = spec.gapSkipping !== false && channel.kind !== "awgn";

  let kernel: Kernel;
  let k: number, n: number, symbolBits: number;
  let erasureDecoding = false;
  if (code === null) {
    const L = spec.uncodedFrameBits ?? 1;
    if (!Number.isInteger(L) || L < 1 || L > MAX_UNCODED_FRAME_BITS) throw new InputError(`uncodedFrameBits must be an integer from 1 to ${MAX_UNCODED_FRAME_BITS}; got ${L}`, ["uncodedFrameBits"]);
    kernel = "uncoded";
    k = n = L;
    symbolBits = 1;
  } else {
    k = code.k;
    n = code.n;
    symbolBits = Math.log2(code.q);
    erasureDecoding = channel.kind === "bec" && code.supportsErasures;
    if (soft) {
      if (code.q !== 2 || k > MAX_ML_K) throw new InputError(`soft-decision ML decoding takes binary codes with k ≤ ${MAX_ML_K}; ${code.name} has q = ${code.q}, k = ${k}`, ["code"]);
      if (2 ** k * n > CHUNK_CORRELATIONS) throw new InputError(`soft-decision ML decoding of ${code.name} needs 2^k·n = ${2 ** k * n} correlations per frame; at most ${CHUNK_CORRELATIONS}`, ["code"]);
      kernel = "ml";
    } else kernel = code.q === 2 && n <= MAX_TABLE_N && !erasureDecoding ? "table" : "batch";
  }
  if (k === 0) throw new InputError("the code carries no information bits (k = 0)", ["code"]);
  const infoBits = k * symbolBits;
  const channelBits = n * symbolBits;
  const rate = infoBits / channelBits;
  let framesPerChunk = Math.max(1, Math.floor(CHUNK_CHANNEL_BITS / channelBits));
  if (kernel === "ml") framesPerChunk = Math.min(framesPerChunk, Math.max(1, Math.floor(CHUNK_CORRELATIONS / (2 ** k * n))));

  const params: PointParams[] = points.map((x) => {
    if (channel.kind === "awgn") return { p: 0, logQ: 0, sigma: Math.sqrt(1 / (2 * rate * 10 ** (x / 10))) };
    return { p: x, logQ: Math.log1p(-x), sigma: 0 };
  });

  const run: Run =
    kernel === "uncoded"
      ? uncodedRun(n, channel, gap)
      : kernel === "table"
        ? tableRun(code!, channel, gap)
        : kernel === "ml"
          ? mlRun(code!)
          : batchRun(code!, channel, gap, erasureDecoding);

  return {
    spec,
    kernel,
    erasureDecoding,
    infoBitsPerFrame: infoBits,
    channelBitsPerFrame: channelBits,
    framesPerChunk,
    runChunk(point, chunk, frames = framesPerChunk) {
      if (!Number.isInteger(point) || point < 0 || point >= params.length) throw new InputError(`point must be an index from 0 to ${params.length - 1}; got ${point}`, ["point"]);
      if (!isU32(chunk)) throw new InputError(`chunk must be an integer from 0 to 2^32 − 1; got ${chunk}`, ["chunk"]);
      if (!Number.isInteger(frames) || frames < 0 || frames > framesPerChunk) throw new InputError(`frames must be an integer from 0 to ${framesPerChunk}; got ${frames}`, ["frames"]);
      const c = zeroCounts();
      run(chunkStream(spec.seed, point, chunk), params[point]!, frames, c);
      c.frames = frames;
      c.infoBits = frames * infoBits;
      return c;
    },
  };
}

/** Uncoded frames of L bits: a bit error per flipped bit, a frame error per frame with one. */
function uncodedRun(L: number, channel: SimChannel, gap: boolean): Run {
  const bec = channel.kind === "bec";
  if (channel.kind === "awgn") {
    return (g, pt, frames, c) => {
      const coins = new CoinBits(g);
      const z = new Normals(g);
      const sigma = pt.sigma;
      for (let f = 0; f < frames; f++) {
        let errors = 0;
        for (let j = 0; j < L; j++) {
          const bit = coins.take(1);
          const y = 1 - 2 * bit + sigma * z.next();
          // Hard and soft decisions agree bit by bit: the sign of the LLR 2y/σ².
          if ((y < 0 ? 1 : 0) !== bit) errors++;
        }
        if (errors > 0) {
          c.bitErrors += errors;
          c.frameErrors++;
          c.undetected++;
        }
      }
    };
  }
  if (gap) {
    return (g, pt, frames, c) => {
      if (pt.p === 0) return;
      const coins = new CoinBits(g);
      const total = frames * L;
      let lastFrame = -1;
      for (let pos = geometricGap(g, pt.logQ); pos < total; pos += 1 + geometricGap(g, pt.logQ)) {
        if (bec && coins.take(1) === 0) continue;
        c.bitErrors++;
        const f = Math.floor(pos / L);
        if (f !== lastFrame) {
          c.frameErrors++;
          c.undetected++;
          lastFrame = f;
        }
      }
    };
  }
  return (g, pt, frames, c) => {
    const events = new BernoulliBits(g, pt.p);
    const coins = new CoinBits(g);
    for (let f = 0; f < frames; f++) {
      let errors = 0;
      for (let j = 0; j < L; j += 16) {
        const len = Math.min(16, L - j);
        let e = events.take(len);
        if (bec) e &= coins.take(len);
        errors += popcount(e);
      }
      if (errors > 0) {
        c.bitErrors += errors;
        c.frameErrors++;
        c.undetected++;
      }
    }
  };
}

function packBits(w: Word, at: number, len: number): number {
  let v = 0;
  for (let j = 0; j < len; j++) v |= w[at + j]! << j;
  return v;
}

/** enc over all 2^k messages and dec over all 2^n words, from the code's batch calls where it has them. */
function buildTables(code: BlockCode): { enc: Int32Array; dec: Int32Array } {
  const { n, k } = code;
  const msgs = new Uint8Array(2 ** k * k);
  for (let m = 0; m < 2 ** k; m++) for (let j = 0; j < k; j++) msgs[m * k + j] = (m >>> j) & 1;
  const enc = new Int32Array(2 ** k);
  const cws = code.encodeBatch ? code.encodeBatch(msgs, 2 ** k) : null;
  for (let m = 0; m < 2 ** k; m++) enc[m] = cws ? packBits(cws, m * n, n) : packBits(code.encode(msgs.subarray(m * k, m * k + k)), 0, n);
  const words = new Uint8Array(2 ** n * n);
  for (let r = 0; r < 2 ** n; r++) for (let j = 0; j < n; j++) words[r * n + j] = (r >>> j) & 1;
  const dec = new Int32Array(2 ** n);
  if (code.decodeBatch) {
    const out = code.decodeBatch(words, 2 ** n);
    for (let r = 0; r < 2 ** n; r++) dec[r] = packBits(out.messages, r * k, k) | (out.failures[r] ? FAILURE_FLAG : 0);
  } else {
    for (let r = 0; r < 2 ** n; r++) {
      const d = code.decode(words.subarray(r * n, r * n + n));
      dec[r] = packBits(d.message, 0, k) | (d.failure ? FAILURE_FLAG : 0);
    }
  }
  return { enc, dec };
}

function tally(c: SimCounts, d: number, m: number, kMask: number) {
  const diff = (d ^ m) & kMask;
  const fail = d & FAILURE_FLAG;
  if ((diff | fail) === 0) return;
  c.bitErrors += popcount(diff);
  c.frameErrors++;
  if (fail) c.failures++;
  else c.undetected++;
}

/** Binary codes with n ≤ 16, hard decisions: one integer per frame, two table lookups. */
function tableRun(code: BlockCode, channel: SimChannel, gap: boolean): Run {
  const { n, k } = code;
  const { enc, dec } = buildTables(code);
  const kMask = (1 << k) - 1;
  const bec = channel.kind === "bec";
  if (channel.kind === "awgn") {
    return (g, pt, frames, c) => {
      const coins = new CoinBits(g);
      const z = new Normals(g);
      const sigma = pt.sigma;
      for (let f = 0; f < frames; f++) {
        const m = coins.take(k);
        const cw = enc[m]!;
        let r = 0;
        for (let j = 0; j < n; j++) if (1 - 2 * ((cw >>> j) & 1) + sigma * z.next() < 0) r |= 1 << j;
        tally(c, dec[r]!, m, kMask);
      }
    };
  }
  if (gap) {
    return (g, pt, frames, c) => {
      if (pt.p === 0) return;
      const coins = new CoinBits(g);
      const total = frames * n;
      let pos = geometricGap(g, pt.logQ);
      while (pos < total) {
        const f = Math.floor(pos / n);
        const start = f * n;
        let e = 0;
        while (pos < start + n) {
          e |= 1 << (pos - start);
          pos += 1 + geometricGap(g, pt.logQ);
        }
        if (bec) e &= coins.take(n);
        const m = coins.take(k);
        tally(c, dec[enc[m]! ^ e]!, m, kMask);
      }
    };
  }
  const nMask = (1 << n) - 1;
  return (g, pt, frames, c) => {
    const events = new BernoulliBits(g, pt.p);
    // Unused bits of the last event, message and coin words, in locals: this is the hottest loop.
    let ew = 0,
      eAvail = 0,
      mw = 0,
      mAvail = 0,
      cw = 0,
      cAvail = 0;
    for (let f = 0; f < frames; f++) {
      if (mAvail < k) {
        mw = g.next();
        mAvail = 32;
      }
      const m = mw & kMask;
      mw >>>= k;
      mAvail -= k;
      let e: number;
      if (eAvail >= n) {
        e = ew & nMask;
        ew >>>= n;
        eAvail -= n;
      } else {
        const w = events.nextWord();
        e = (ew | (w << eAvail)) & nMask;
        ew = w >>> (n - eAvail);
        eAvail += 32 - n;
      }
      if (bec) {
        if (cAvail < n) {
          cw = g.next();
          cAvail = 32;
        }
        e &= cw;
        cw >>>= n;
        cAvail -= n;
      }
      const d = dec[enc[m]! ^ e]!;
      if (((d ^ m) & kMask) | (d & FAILURE_FLAG)) tally(c, d, m, kMask);
    }
  };
}

/** Soft-decision ML by correlation over the whole codebook (binary, k ≤ 12). */
function mlRun(code: BlockCode): Run {
  const { n, k } = code;
  const size = 2 ** k;
  const book = new Float64Array(size * n);
  const msgs = new Uint8Array(size * k);
  for (let m = 0; m < size; m++) for (let j = 0; j < k; j++) msgs[m * k + j] = (m >>> j) & 1;
  const cws = code.encodeBatch ? code.encodeBatch(msgs, size) : null;
  for (let m = 0; m < size; m++) {
    const cw = cws ? cws.subarray(m * n, m * n + n) : code.encode(msgs.subarray(m * k, m * k + k));
    for (let j = 0; j < n; j++) book[m * n + j] = 1 - 2 * cw[j]!;
  }
  const y = new Float64Array(n);
  const kMask = size - 1;
  return (g, pt, frames, c) => {
    const coins = new CoinBits(g);
    const z = new Normals(g);
    const sigma = pt.sigma;
    for (let f = 0; f < frames; f++) {
      const m = coins.take(k);
      const at = m * n;
      // Correlating with y rather than the LLRs 2y/σ² picks the same codeword: a positive scale.
      for (let j = 0; j < n; j++) y[j] = book[at + j]! + sigma * z.next();
      let best = -Infinity;
      let arg = 0;
      for (let w = 0, o = 0; w < size; w++, o += n) {
        let s = 0;
        for (let j = 0; j < n; j++) s += y[j]! * book[o + j]!;
        if (s > best) {
          best = s;
          arg = w;
        }
      }
      tally(c, arg, m, kMask);
    }
  };
}

/** Any code, frames in batches of reused typed arrays. */
function batchRun(code: BlockCode, channel: SimChannel, gap: boolean, erasureDecoding: boolean): Run {
  const { n, k, q } = code;
  const mb = Math.log2(q);
  const N = n * mb;
  const B = Math.max(1, Math.floor(16384 / N));
  const binary = q === 2;
  const msgs: Word = binary ? new Uint8Array(B * k) : new Uint16Array(B * k);
  const rx: Word = binary ? new Uint8Array(B * n) : new Uint16Array(B * n);
  const events = new Uint8Array(B * N);
  const bec = channel.kind === "bec";
  const awgn = channel.kind === "awgn";
  const erasedSymbol = new Uint8Array(n);

  /** Frames 0..count−1 of the batch: messages, encoding, channel (events or noise), decoding, counts. */
  const finish = (coins: CoinBits, z: Normals | null, sigma: number, count: number, c: SimCounts) => {
    for (let i = 0; i < count * k; i++) msgs[i] = coins.take(mb);
    const m = msgs.subarray(0, count * k);
    const cws = code.encodeBatch ? code.encodeBatch(m, count) : null;
    for (let i = 0; i < count; i++) rx.set(cws ? cws.subarray(i * n, i * n + n) : code.encode(m.subarray(i * k, i * k + k)), i * n);
    if (z) {
      // Each symbol's bits, most significant first, go through the channel and come back as hard decisions.
      for (let i = 0; i < count * n; i++) {
        let s = 0;
        for (let b = mb - 1; b >= 0; b--) if (1 - 2 * ((rx[i]! >>> b) & 1) + sigma * z.next() < 0) s |= 1 << b;
        rx[i] = s;
      }
    } else if (!erasureDecoding) {
      if (bec) for (let i = 0; i < count * N; i++) if (events[i]) events[i] = coins.take(1);
      for (let i = 0; i < count * N; i++) {
        if (!events[i]) continue;
        const at = Math.floor(i / mb);
        rx[at] = rx[at]! ^ (1 << (mb - 1 - (i % mb)));
      }
    }
    const r = rx.subarray(0, count * n);
    if (!erasureDecoding && code.decodeBatch) {
      const out = code.decodeBatch(r, count);
      for (let i = 0; i < count; i++) compare(c, out.messages, i * k, i, out.failures[i] === 1);
    } else {
      for (let i = 0; i < count; i++) {
        let erasures: number[] | undefined;
        if (erasureDecoding) {
          erasedSymbol.fill(0);
          for (let j = 0; j < N; j++) if (events[i * N + j]) erasedSymbol[Math.floor(j / mb)] = 1;
          erasures = [];
          for (let s = 0; s < n; s++)
            if (erasedSymbol[s]) {
              erasures.push(s);
              // The decoder ignores the value at an erased position; zero stands for "unknown".
              rx[i * n + s] = 0;
            }
        }
        const d = code.decode(r.subarray(i * n, i * n + n), erasures);
        compare(c, d.message, 0, i, d.failure);
      }
    }
  };

  const compare = (c: SimCounts, decoded: Word, at: number, i: number, failure: boolean) => {
    let errors = 0;
    for (let j = 0; j < k; j++) errors += popcount(decoded[at + j]! ^ msgs[i * k + j]!);
    if (errors === 0 && !failure) return;
    c.bitErrors += errors;
    c.frameErrors++;
    if (failure) c.failures++;
    else c.undetected++;
  };

  if (awgn) {
    return (g, pt, frames, c) => {
      const coins = new CoinBits(g);
      const z = new Normals(g);
      for (let f = 0; f < frames; f += B) finish(coins, z, pt.sigma, Math.min(B, frames - f), c);
    };
  }
  if (gap) {
    return (g, pt, frames, c) => {
      if (pt.p === 0) return;
      const coins = new CoinBits(g);
      const total = frames * N;
      let pos = geometricGap(g, pt.logQ);
      let count = 0;
      events.fill(0);
      while (pos < total) {
        const start = Math.floor(pos / N) * N;
        while (pos < start + N) {
          events[count * N + (pos - start)] = 1;
          pos += 1 + geometricGap(g, pt.logQ);
        }
        if (++count === B) {
          finish(coins, null, 0, count, c);
          count = 0;
          events.fill(0);
        }
      }
      if (count > 0) finish(coins, null, 0, count, c);
    };
  }
  return (g, pt, frames, c) => {
    const bits = new BernoulliBits(g, pt.p);
    const coins = new CoinBits(g);
    for (let f = 0; f < frames; f += B) {
      const count = Math.min(B, frames - f);
      for (let i = 0; i < count * N; i += 16) {
        const len = Math.min(16, count * N - i);
        const e = bits.take(len);
        for (let j = 0; j < len; j++) events[i + j] = (e >>> j) & 1;
      }
      finish(coins, null, 0, count, c);
    }
  };
}
