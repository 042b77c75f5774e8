import { parseBits } from "@/lib/core/bits";

/**
 * A POST /decode run laid out for reading: per word, the received word (from the request), the
 * corrected codeword and the decoded message (from the response) as rows of symbols, one column per
 * position counted from 0, with the positions the decoder changed.
 */

export interface DecodedWord {
  /** Index of the word in the request's `words`. */
  index: number;
  /** Symbols as written: "0"/"1" for binary codes, numbers for Reed–Solomon. Absent when the request's word could not be read back. */
  received?: string[];
  codeword: string[];
  message: string[];
  corrected: number[];
  erased: number[];
  failure: boolean;
  reason?: string;
  /** CRC: the carried and the computed value. */
  crc?: { received: string; computed: string };
}

export interface DecodeLayout {
  name?: string;
  words: DecodedWord[];
}

type Obj = Record<string, unknown>;
const isObj = (v: unknown): v is Obj => typeof v === "object" && v !== null && !Array.isArray(v);

/** A response word (0/1 string or symbol array) as symbols. */
function symbolsOf(w: unknown): string[] | undefined {
  if (typeof w === "string" && /^[01]*$/.test(w)) return [...w];
  if (Array.isArray(w) && w.every((x) => Number.isInteger(x))) return w.map(String);
  return undefined;
}

/**
 * A request word as the decoder read it, before any correction: bits as written (0/1 string, array,
 * { hex, length }, and for CRC { text } as UTF-8 bytes), or, for an alphabet of q = 2^m symbols, an
 * array of symbols or bits taken m at a time, most significant first. Undefined when it cannot be read.
 */
export function receivedSymbols(word: unknown, q: number): string[] | undefined {
  try {
    if (q > 2) {
      if (Array.isArray(word) && word.every((x) => Number.isInteger(x))) return word.map(String);
      const m = Math.log2(q);
      if (!Number.isInteger(m)) return undefined;
      const bits = parseBits(word as Parameters<typeof parseBits>[0], Number.MAX_SAFE_INTEGER);
      if (bits.length % m) return undefined;
      return Array.from({ length: bits.length / m }, (_, i) => String(bits.subarray(i * m, (i + 1) * m).reduce((v, b) => v * 2 + b, 0)));
    }
    if (isObj(word) && typeof word.text === "string") {
      return [...new TextEncoder().encode(word.text)].flatMap((byte) => [...byte.toString(2).padStart(8, "0")]);
    }
    return [...parseBits(word as Parameters<typeof parseBits>[0], Number.MAX_SAFE_INTEGER)].map(String);
  } catch {
    return undefined;
  }
}

/** The layout of a /decode request and its 200 response; null when the body is not a decode result. */
export function decodeLayout(input: unknown, body: unknown): DecodeLayout | null {
  if (!isObj(body) || !Array.isArray(body.results) || !isObj(body.code)) return null;
  const q = typeof body.code.q === "number" ? body.code.q : 2;
  const words = isObj(input) && Array.isArray(input.words) ? input.words : [];
  const erasures = isObj(input) && Array.isArray(input.erasures) ? input.erasures : [];
  const out: DecodedWord[] = [];
  for (const [index, r] of body.results.entries()) {
    if (!isObj(r)) return null;
    const codeword = symbolsOf(r.codeword);
    const message = symbolsOf(r.message);
    if (!codeword || !message) return null;
    const received = receivedSymbols(words[index], q);
    const erased = erasures[index];
    out.push({
      index,
      // A received word of another length (a CRC word read through refin, say) would not line up: left out.
      ...(received && received.length === codeword.length ? { received } : {}),
      codeword,
      message,
      corrected: Array.isArray(r.correctedPositions) ? r.correctedPositions.filter((p): p is number => Number.isInteger(p)) : [],
      erased: Array.isArray(erased) ? erased.filter((p): p is number => Number.isInteger(p)) : [],
      failure: r.failure === true,
      ...(typeof r.reason === "string" ? { reason: r.reason } : {}),
      ...(isObj(r.crc) && typeof r.crc.received === "string" && typeof r.crc.computed === "string" ? { crc: { received: r.crc.received, computed: r.crc.computed } } : {}),
    });
  }
  return { name: typeof body.code.name === "string" ? body.code.name : undefined, words: out };
}

/** Column groups for wrapping: positions [from, to) of at most `size` columns, so that every row breaks at the same place. */
export function columnGroups(length: number, size: number): { from: number; to: number }[] {
  const out: { from: number; to: number }[] = [];
  for (let from = 0; from < length; from += size) out.push({ from, to: Math.min(length, from + size) });
  return out;
}

/** "corrected positions: 2, 5" — the text legend beside the marks. */
export function positionsLegend(what: string, positions: readonly number[]): string {
  return `${what} positions: ${positions.length ? [...positions].sort((a, b) => a - b).join(", ") : "none"}`;
}
