import type { Bits } from "../bits";

/** A word: bits as 0/1 in a Uint8Array for binary codes, GF(2^m) symbols in a Uint16Array for Reed–Solomon. */
export type Word = Uint8Array | Uint16Array;

/** What a decoder says about one received word. */
export interface DecodeResult {
  /** The decoded message (k bits, or k symbols for a symbol code). On failure, the best estimate the decoder has. */
  message: Word;
  /** The corrected codeword (n bits or symbols). */
  codeword: Word;
  /** 0-based positions the decoder changed (bits, or symbols for a symbol code), erasures included. */
  correctedPositions: number[];
  /** Syndrome of the received word before correction (bits; symbols for Reed–Solomon). All zero = a codeword. */
  syndrome: Word;
  /** The decoder detected that it could not decode (never a silently wrong word where failure is detectable). */
  failure: boolean;
  /** Why it failed, or what it could not resolve (e.g. a tie in majority voting). */
  reason?: string;
}

/**
 * What a batch decoder says about `count` received words (BlockCode.decodeBatch), word i being the i-th
 * word of the batch: the same as `decode` one word at a time, in flat arrays (views that may share one buffer).
 * DecodeResult.codeword is not repeated: it is received word i with position corrected[i] flipped, if any.
 */
export interface DecodeBatchResult {
  /** count·k entries: word i's DecodeResult.message at i·k. */
  messages: Word;
  /** Per word, the one position in DecodeResult.correctedPositions, or −1 when it is empty: only codes that change at most one position per word offer decodeBatch. */
  corrected: Int32Array;
  /** Per word, the syndrome as an integer: entry j of DecodeResult.syndrome (n − k bits) is bit n − k − 1 − j, so only binary codes with n − k ≤ 31 offer decodeBatch. */
  syndromes: Int32Array;
  /** Per word, 1 where DecodeResult.failure is true, else 0. */
  failures: Uint8Array;
  /** Word i's DecodeResult.reason. */
  reason(i: number): string | undefined;
}

/**
 * A block code: n, k and encode / decode over bits (q = 2) or over GF(2^m) symbols (q = 2^m).
 * Messages and codewords are Words: 0/1 bits (binary) or symbols 0..q−1.
 */
export interface BlockCode {
  family: string;
  /** Human-readable name, e.g. "Hamming (7,4)". */
  name: string;
  n: number;
  k: number;
  /** Alphabet size: 2 for binary codes, 2^m for Reed–Solomon. */
  q: number;
  /** Minimum distance when known exactly (proven or by construction), else the designed distance with `dminIsDesigned`. */
  dmin?: number;
  dminIsDesigned?: boolean;
  /** Message positions inside the codeword when the encoder is systematic. */
  messagePositions?: number[];
  /** Bit-order note shown in the API docs. */
  bitOrder: string;
  encode(message: Word): Word;
  /**
   * Optional fast path: `count` messages stored back to back (count·k entries) → their count·n codeword
   * entries, the same as `encode` one message at a time, with the buffer validated once.
   */
  encodeBatch?(messages: Word, count: number): Word;
  /**
   * Optional fast path: `count` received words stored back to back (count·n entries) → a DecodeBatchResult,
   * exactly what `decode` gives one word at a time without erasures. The buffer is validated once: its type
   * and length, and a non-bit is reported by word and bit (path ["received", word, bit]).
   */
  decodeBatch?(received: Word, count: number): DecodeBatchResult;
  /** `erasures`: 0-based positions whose value is unknown, for families that support them. */
  decode(received: Word, erasures?: number[]): DecodeResult;
  /** Families that accept erasures. */
  supportsErasures: boolean;
  /** Binary linear codes: a k × n generator matrix (rows), systematic where the family is. */
  generatorRows?(): Bits[];
  /**
   * Families with a closed form: A_0..A_n, the number of codewords of each weight, exact. Analysis uses it
   * instead of enumerating codewords, so no generator matrix is built for it.
   */
  weightDistribution?(): bigint[];
}
