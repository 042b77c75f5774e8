import { createHash } from "node:crypto";
import { z } from "zod";
import { formatBits, parseBits, type Bits } from "@/lib/core/bits";
import { bch, type BchCode } from "@/lib/core/codes/bch";
import { crcCode, crcPreset, type CrcParams } from "@/lib/core/codes/crc";
import { golay } from "@/lib/core/codes/golay";
import { hamming } from "@/lib/core/codes/hamming";
import { linear } from "@/lib/core/codes/linear";
import { parity } from "@/lib/core/codes/parity";
import { repetition } from "@/lib/core/codes/repetition";
import { bitsToSymbols, rs, type RsCode } from "@/lib/core/codes/rs";
import type { BlockCode, Word } from "@/lib/core/codes/types";
import { InputError } from "@/lib/core/errors";
import { at } from "./endpoint";
import { MAX_MATRIX_N, type CodeSpec } from "./code-spec";
import { bitsInput, MAX_WORD_BITS } from "./schemas";

/** A word in a request: bits (any Bits form), symbols for Reed–Solomon, or bytes as text / hex for CRC. */
export const wordInput = z
  .union([bitsInput, z.array(z.number().int().min(0).max(65535)).max(MAX_WORD_BITS), z.strictObject({ text: z.string().max(MAX_WORD_BITS / 8) })])
  .meta({
    id: "Word",
    description:
      "Binary codes: a Bits value (0/1 string, 0/1 array or { hex, length }). Reed–Solomon: an array of symbols, or bits (m per symbol, most significant first). " +
      "CRC: bytes as { text } (UTF-8) or { hex } (whole bytes), or bits as written (0/1 string or array, { hex, length } for the first `length` bits). " +
      "By default (code.bitsAs \"bytes\") bits are read as bytes written most significant bit first, so with refin each whole byte is reversed as it enters the register " +
      "and a message must be a whole number of bytes; code.bitsAs \"stream\" feeds the bits in the order written. " +
      "Example: CRC-32/ISO-HDLC of \"00110001 00110010 00110011 00110100 00110101 00110110 00110111 00111000 00111001\" (ASCII 123456789) is 0xcbf43926, as of { text: \"123456789\" }.",
  });
export type WordInput = z.input<typeof wordInput>;

// Building a code can take milliseconds (syndrome tables, generator polynomials): keep recent ones.
const cache = new Map<string, BlockCode>();
const CACHE_SIZE = 64;

function cached(key: string, build: () => BlockCode): BlockCode {
  const hit = cache.get(key);
  if (hit) {
    cache.delete(key);
    cache.set(key, hit);
    return hit;
  }
  const code = build();
  if (cache.size >= CACHE_SIZE) cache.delete(cache.keys().next().value!);
  cache.set(key, code);
  return code;
}

const big = (v: string | number) => (typeof v === "number" ? BigInt(v) : BigInt(v.startsWith("0x") || v.startsWith("0X") ? v : `0x${v}`));
const num = (v: string | number | undefined) => (v === undefined ? undefined : Number(big(v)));

/** The catalogue preset of a spec; an unknown name is an error at `preset` itself (the core names its argument `name`). */
function presetAt(name: string) {
  try {
    return crcPreset(name);
  } catch (e) {
    if (e instanceof InputError) throw new InputError(e.message, ["preset"]);
    throw e;
  }
}

/**
 * Run a core encode or decode call on word `i` of the request field `field`. The core names its arguments:
 * "message" / "received" errors point at `field/i/…`, "erasures" errors at `erasures/i/…`, and any other
 * named part (e.g. a linear code's `generator` that cannot be decoded) is the code's, at `code/…`.
 */
export function atWord<T>(field: "messages" | "words", i: number, fn: () => T): T {
  try {
    return fn();
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    const [head, ...rest] = e.path;
    if (head === undefined) throw new InputError(e.message, [field, i]);
    if (head === "erasures") throw new InputError(e.message, ["erasures", i, ...rest]);
    if (head === "message" || head === "received") throw new InputError(e.message, [field, i, ...rest]);
    throw new InputError(e.message, ["code", ...e.path]);
  }
}

/** The CRC parameters a spec names: a catalogue preset with explicit fields overriding it. */
export function crcParams(spec: Extract<CodeSpec, { family: "crc" }>): CrcParams & { name?: string } {
  const base = spec.preset !== undefined ? presetAt(spec.preset) : undefined;
  const changed = ["width", "poly", "init", "refin", "refout", "xorout"].some((f) => spec[f as keyof typeof spec] !== undefined);
  return {
    name: base && !changed ? base.name : base ? `${base.name} (modified)` : undefined,
    width: spec.width ?? base!.width,
    poly: spec.poly !== undefined ? big(spec.poly) : base!.poly,
    init: spec.init !== undefined ? big(spec.init) : (base?.init ?? 0n),
    refin: spec.refin ?? base?.refin ?? false,
    refout: spec.refout ?? base?.refout ?? false,
    xorout: spec.xorout !== undefined ? big(spec.xorout) : (base?.xorout ?? 0n),
  };
}

/** A spec with its defaults filled in, so that every way of writing the same code finds the same cache entry. */
function canonical(spec: CodeSpec): unknown {
  const hex = (v: string | number | undefined) => (v === undefined ? undefined : big(v).toString(16));
  if (spec.family === "rs") return { ...spec, n: spec.n ?? 2 ** spec.m - 1, primitivePoly: hex(spec.primitivePoly), primitiveElement: spec.primitiveElement ?? 2 };
  if (spec.family === "bch") return { ...spec, primitivePoly: hex(spec.primitivePoly) };
  return spec;
}

/**
 * The code a spec describes. CRC codes are bit-aligned: their message length `crcMessageBits` comes from
 * the word at hand. Errors point into the spec (prefix `path`).
 */
export function resolveCode(spec: CodeSpec, path: (string | number)[], crcMessageBits?: number): BlockCode {
  const key = createHash("sha256").update(JSON.stringify(canonical(spec))).update(`|${crcMessageBits ?? ""}`).digest("hex");
  return at(path, () =>
    cached(key, () => {
      switch (spec.family) {
        case "repetition":
          return repetition(spec.n);
        case "parity":
          return parity(spec.n, spec.parity);
        case "hamming":
          return hamming(spec.r, spec.extended);
        case "golay":
          return golay(spec.extended);
        case "linear": {
          const field = spec.generator ? "generator" : "parityCheck";
          const rows = (spec.generator ?? spec.parityCheck)!.map((r, i) => at([field, i], () => parseBits(r, MAX_MATRIX_N)));
          return linear(spec.generator ? { generator: rows } : { parityCheck: rows });
        }
        case "crc":
          return crcCode(crcParams(spec), crcMessageBits ?? 0);
        case "bch":
          return bch({ m: spec.m, t: spec.t, shorten: spec.shorten, primitivePoly: num(spec.primitivePoly) });
        case "rs":
          return rs({ m: spec.m, n: spec.n, k: spec.k, firstRoot: spec.firstRoot, primitivePoly: num(spec.primitivePoly), primitiveElement: spec.primitiveElement });
      }
    }),
  );
}

/** UTF-8 or hex bytes → their bits as written, each byte most significant bit first. */
function bytesToBits(bytes: Uint8Array): Bits {
  const out = new Uint8Array(bytes.length * 8);
  for (let i = 0; i < bytes.length; i++) for (let b = 0; b < 8; b++) out[i * 8 + b] = (bytes[i]! >>> (7 - b)) & 1;
  return out;
}

/** Each whole byte (8 bits from position 0, 8, …) reversed; bits after the last whole byte kept. Its own inverse. */
function reverseEachByte(bits: Bits): Bits {
  const out = bits.slice();
  for (let i = 0; i + 8 <= bits.length; i += 8) for (let b = 0; b < 8; b++) out[i + b] = bits[i + 7 - b]!;
  return out;
}

type CrcSpec = Extract<CodeSpec, { family: "crc" }>;

/** Words of this spec are bytes whose bits are reversed between the page and the register: refin with bitsAs "bytes" (the default). */
const crcReversesBytes = (spec: CrcSpec) => crcParams(spec).refin && (spec.bitsAs ?? "bytes") === "bytes";

/** A CRC word's bits as the caller wrote them: { text } and { hex } without length are bytes, most significant bit first. */
function crcBitsAsWritten(input: WordInput): Bits {
  if (typeof input === "object" && !Array.isArray(input)) {
    if ("text" in input) return bytesToBits(new TextEncoder().encode(input.text));
    if (input.length === undefined) return bytesToBits(hexBytes(input.hex));
  }
  return parseBits(input as Parameters<typeof parseBits>[0], MAX_WORD_BITS);
}

/**
 * A CRC word → the bits in the order they enter the register. `tail` is the number of CRC bits that end the
 * word (decode: the width); the message before them must be whole bytes when bytes are reversed, since a
 * partial byte has no agreed bit order.
 */
function readCrcWord(spec: CrcSpec, input: WordInput, tail: number): Bits {
  const bits = crcBitsAsWritten(input);
  if (!crcReversesBytes(spec)) return bits;
  const messageBits = bits.length - tail;
  if (messageBits > 0 && messageBits % 8) {
    throw new InputError(
      `the message has ${messageBits} bits, not a whole number of bytes, and refin reverses each byte as it enters the register: ` +
        'write whole bytes (most significant bit first), or set code.bitsAs to "stream" to feed the bits in the order written',
    );
  }
  return reverseEachByte(bits);
}

/** A CRC word for a response, written as its request was: the register's bits with each whole byte reversed back when refin reversed them. */
export const formatCrcWord = (spec: CrcSpec, bits: Bits): string => formatBits(crcReversesBytes(spec) ? reverseEachByte(bits) : bits);

/** A CRC value as hex, one digit per 4 bits of the width. */
export const crcHex = (v: bigint, width: number) => "0x" + v.toString(16).padStart(Math.ceil(width / 4), "0");

function hexBytes(hex: string): Uint8Array {
  const digits = hex.replace(/^0x/i, "").replace(/[\s_]/g, "");
  if (!/^[0-9a-fA-F]*$/.test(digits) || digits.length % 2) throw new InputError("CRC bytes in hex need an even number of hex digits", ["hex"]);
  return Uint8Array.from(digits.match(/../g) ?? [], (h) => parseInt(h, 16));
}

/** Read one word of a request for a code family (before the code is resolved, for CRC's length); a CRC word ends with `crcTail` CRC bits. */
export function readWord(spec: CodeSpec, input: WordInput, crcTail = 0): Word {
  if (spec.family === "crc") return readCrcWord(spec, input, crcTail);
  if (typeof input === "object" && !Array.isArray(input) && "text" in input) throw new InputError("{ text } words are for CRC codes only");
  if (spec.family === "rs") {
    if (Array.isArray(input)) return Uint16Array.from(input);
    return bitsToSymbols(parseBits(input, MAX_WORD_BITS), spec.m);
  }
  return parseBits(input as Parameters<typeof parseBits>[0], MAX_WORD_BITS);
}

/** A word for a response: 0/1 string for binary codes, a symbol array for Reed–Solomon. */
export const formatWord = (code: BlockCode, w: Word): string | number[] => (code.q === 2 ? formatBits(w as Bits) : Array.from(w));

export const wordOutput = z.union([z.string(), z.array(z.number().int())]).meta({ description: "0/1 string for binary codes; symbols for Reed–Solomon." });

export const codeSummary = z
  .object({
    family: z.string(),
    name: z.string(),
    n: z.number().int(),
    k: z.number().int(),
    q: z.number().int().meta({ description: "Alphabet size: 2, or 2^m symbols for Reed–Solomon." }),
    rate: z.number(),
    minimumDistance: z.number().int().optional(),
    minimumDistanceIsDesigned: z.boolean().optional().meta({ description: "true when only the designed distance is known (a lower bound)." }),
    systematic: z.boolean(),
    bitOrder: z.string(),
    supportsErasures: z.boolean(),
    generatorPolynomial: z
      .object({ octal: z.string().optional(), exponents: z.array(z.number().int()).optional(), coefficients: z.array(z.number().int()).optional() })
      .optional()
      .meta({ description: "BCH: g(x) in octal and its exponents; Reed–Solomon: coefficients, highest power first." }),
    crc: z
      .object({ width: z.number().int(), poly: z.string(), init: z.string(), refin: z.boolean(), refout: z.boolean(), xorout: z.string() })
      .optional(),
    conventions: z
      .object({
        firstRoot: z.number().int().optional().meta({ description: "Reed–Solomon: b, the generator's first root α^b (default 1; QR codes use 0)." }),
        primitivePoly: z.string().optional().meta({ description: "BCH and Reed–Solomon: the field polynomial in hex, with its top bit (default: the built-in primitive polynomial of degree m)." }),
        primitiveElement: z.number().int().optional().meta({ description: "Reed–Solomon: α as a field element (default 2, i.e. x)." }),
        n: z.number().int().optional().meta({ description: "Reed–Solomon: the length in symbols (default 2^m − 1, the full length)." }),
      })
      .optional()
      .meta({
        description:
          "BCH and Reed–Solomon: the conventions in force, whether the request stated them or left them to the defaults named on each field. " +
          "Standards set these differently; compare them with the standard you mean.",
      }),
  })
  .meta({ id: "CodeSummary" });

export function summarize(code: BlockCode, spec: CodeSpec): z.output<typeof codeSummary> {
  const gp =
    code.family === "bch"
      ? { octal: (code as BchCode).generatorOctal, exponents: (code as BchCode).generatorExponents }
      : code.family === "reed-solomon"
        ? { coefficients: (code as RsCode).generator }
        : undefined;
  const crc = spec.family === "crc" ? crcParams(spec) : undefined;
  const fieldHex = (poly: number) => "0x" + poly.toString(16);
  const conventions =
    code.family === "reed-solomon"
      ? { firstRoot: (code as RsCode).firstRoot, primitivePoly: fieldHex((code as RsCode).primitivePoly), primitiveElement: (code as RsCode).primitiveElement, n: code.n }
      : code.family === "bch"
        ? { primitivePoly: fieldHex((code as BchCode).primitivePoly) }
        : undefined;
  return {
    family: spec.family,
    name: code.name,
    n: code.n,
    k: code.k,
    q: code.q,
    rate: code.n ? code.k / code.n : 0,
    ...(code.dmin !== undefined ? { minimumDistance: code.dmin, minimumDistanceIsDesigned: code.dminIsDesigned ?? false } : {}),
    systematic: code.messagePositions !== undefined,
    bitOrder:
      spec.family === "crc" && crcReversesBytes(spec)
        ? `${code.bitOrder} Words are written as bytes, most significant bit first: each whole byte of a word (from position 0) enters the register reversed (refin), in requests and responses alike.`
        : code.bitOrder,
    supportsErasures: code.supportsErasures,
    ...(gp ? { generatorPolynomial: gp } : {}),
    ...(crc ? { crc: { width: crc.width, poly: crcHex(crc.poly, crc.width), init: crcHex(crc.init, crc.width), refin: crc.refin, refout: crc.refout, xorout: crcHex(crc.xorout, crc.width) } } : {}),
    ...(conventions ? { conventions } : {}),
  };
}

