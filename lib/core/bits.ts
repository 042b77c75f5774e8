import { InputError } from "./errors";

/** A binary word: one entry per bit, 0 or 1; index 0 is the first bit as written. */
export type Bits = Uint8Array;

/**
 * A word as a caller writes it: a string of 0/1 (spaces and underscores separate groups),
 * an array of 0/1 numbers, or hex digits (first digit's most significant bit = first bit)
 * with an optional bit length.
 */
export type BitsInput = string | number[] | { hex: string; length?: number };

function describeChar(s: string, i: number): string {
  return JSON.stringify(String.fromCodePoint(s.codePointAt(i)!));
}

function tooLong(count: number | string, maxBits: number): InputError {
  return new InputError(`the word has ${count} bits; at most ${maxBits} are allowed`);
}

function parseBitString(s: string, maxBits: number): Bits {
  const out = new Uint8Array(Math.min(s.length, maxBits));
  let n = 0;
  for (let i = 0; i < s.length; i++) {
    const c = s.charCodeAt(i);
    if (c === 48 || c === 49) {
      if (n === maxBits) throw tooLong(`more than ${maxBits}`, maxBits);
      out[n++] = c - 48;
    } else if (c !== 32 && c !== 95) {
      throw new InputError(`character ${i} (counting from 0) is ${describeChar(s, i)}; only 0, 1, space and _ are allowed`);
    }
  }
  return out.slice(0, n);
}

function parseBitArray(a: unknown[], maxBits: number): Bits {
  if (a.length > maxBits) throw tooLong(a.length, maxBits);
  const out = new Uint8Array(a.length);
  for (let i = 0; i < a.length; i++) {
    const v = a[i];
    if (v !== 0 && v !== 1) {
      throw new InputError(`entry ${i} (counting from 0) is ${JSON.stringify(v) ?? String(v)}; only the numbers 0 and 1 are allowed`, [i]);
    }
    out[i] = v;
  }
  return out;
}

function hexValue(c: number): number {
  if (c >= 48 && c <= 57) return c - 48;
  if (c >= 97 && c <= 102) return c - 87;
  if (c >= 65 && c <= 70) return c - 55;
  return -1;
}

function parseHex(hex: unknown, length: unknown, maxBits: number): Bits {
  if (typeof hex !== "string") throw new InputError("hex must be a string of hex digits", ["hex"]);
  const start = hex.startsWith("0x") || hex.startsWith("0X") ? 2 : 0;
  const digits: number[] = [];
  for (let i = start; i < hex.length; i++) {
    const c = hex.charCodeAt(i);
    if (c === 32 || c === 95) continue;
    const v = hexValue(c);
    if (v < 0) {
      throw new InputError(`character ${i} (counting from 0) is ${describeChar(hex, i)}; only hex digits 0-9, a-f, A-F, space and _ are allowed`, ["hex"]);
    }
    // One digit more than ceil(maxBits / 4) exceeds the limit whatever the length says.
    if (digits.length === Math.ceil(maxBits / 4)) throw tooLong(`more than ${maxBits}`, maxBits);
    digits.push(v);
  }
  const full = digits.length * 4;
  let n = full;
  if (length !== undefined) {
    // The length may drop unused low bits of the last digit only, so that no whole digit is ignored.
    if (typeof length !== "number" || !Number.isInteger(length) || length < 0 || length > full || length <= full - 4) {
      const fits = typeof length === "number" && Number.isInteger(length) && length >= 0 ? ` (${length} bits take ${Math.ceil(length / 4)} hex digits)` : "";
      throw new InputError(
        `length must be an integer from ${Math.max(full - 3, 0)} to ${full} for ${digits.length} hex digits; got ${String(length)}: ` +
          `it may only drop unused low bits of the last digit, so write as many digits as the bits need${fits}`,
        ["length"],
      );
    }
    n = length;
  }
  if (n > maxBits) throw tooLong(n, maxBits);
  const out = new Uint8Array(n);
  for (let i = 0; i < n; i++) out[i] = (digits[i >>> 2]! >>> (3 - (i & 3))) & 1;
  return out;
}

/** Parses a 0/1 string, 0/1 array or `{ hex, length? }` (hex: optional 0x, any case; length in (4·digits − 4, 4·digits] keeps the first bits) into at most maxBits bits, else InputError naming the position or limit. */
export function parseBits(input: BitsInput, maxBits: number): Bits {
  // In hex, space and _ separate groups as in bit strings; low bits of the last digit beyond `length` are ignored.
  const value: unknown = input;
  if (typeof value === "string") return parseBitString(value, maxBits);
  if (Array.isArray(value)) return parseBitArray(value, maxBits);
  if (typeof value === "object" && value !== null && "hex" in value) {
    const { hex, length } = value as { hex: unknown; length?: unknown };
    return parseHex(hex, length, maxBits);
  }
  throw new InputError("a word must be a string of 0 and 1, an array of 0 and 1, or { hex, length }");
}

/** The word as a plain string of 0 and 1. */
export function formatBits(bits: Bits): string {
  const chunk = 8192;
  let s = "";
  for (let i = 0; i < bits.length; i += chunk) {
    const part = bits.subarray(i, i + chunk);
    s += String.fromCharCode(...Array.from(part, (b) => 48 + b));
  }
  return s;
}

/** The word as lowercase hex, first bit = most significant bit of the first digit; the last digit is padded with zero bits. */
export function bitsToHex(bits: Bits): string {
  const digits: string[] = [];
  for (let i = 0; i < bits.length; i += 4) {
    let v = 0;
    for (let j = 0; j < 4; j++) v = (v << 1) | (i + j < bits.length ? bits[i + j]! : 0);
    digits.push(v.toString(16));
  }
  return digits.join("");
}

/** Packs a word into 32-bit words: bit i goes to word i >>> 5 at bit position i & 31. */
export function packBits(bits: Bits): Uint32Array {
  const words = new Uint32Array((bits.length + 31) >>> 5);
  for (let i = 0; i < bits.length; i++) words[i >>> 5]! |= bits[i]! << (i & 31);
  return words;
}

/** Number of set bits in a 32-bit integer by SWAR bit counting (Warren, Hacker's Delight, 2nd ed., 2012, §5-1). */
export function popcount32(x: number): number {
  x = x - ((x >>> 1) & 0x55555555);
  x = (x & 0x33333333) + ((x >>> 2) & 0x33333333);
  x = (x + (x >>> 4)) & 0x0f0f0f0f;
  return Math.imul(x, 0x01010101) >>> 24;
}

/** Number of set bits in packed words (sum of popcount32). */
export function popcountPacked(words: Uint32Array): number {
  let n = 0;
  for (let i = 0; i < words.length; i++) n += popcount32(words[i]!);
  return n;
}
