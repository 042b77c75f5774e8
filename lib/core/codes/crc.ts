import type { Bits } from "../bits";
import { InputError } from "../errors";
import { checkBinaryWord, rejectErasures } from "../gf2";
import type { BlockCode, DecodeResult, Word } from "./types";

/**
 * A CRC in the parameter model of Ross Williams (1993): `width` bits, generator `poly` without its top
 * term, register start value `init`, `refin` (each input byte enters least significant bit first),
 * `refout` (the register is reflected before the final XOR), `xorout`.
 */
export interface CrcParams {
  width: number;
  poly: bigint;
  init: bigint;
  refin: boolean;
  refout: boolean;
  xorout: bigint;
}

/** A catalogue entry: the parameters, the CRC of ASCII "123456789" (`check`) and other names in use. */
export interface CrcPreset extends CrcParams {
  name: string;
  check: bigint;
  aliases: readonly string[];
}

const preset = (name: string, width: number, poly: bigint, init: bigint, refin: boolean, refout: boolean, xorout: bigint, check: bigint, aliases: string[] = []): CrcPreset =>
  Object.freeze({ name, width, poly, init, refin, refout, xorout, check, aliases: Object.freeze(aliases) });

/**
 * Presets from the public catalogue of parametrised CRC algorithms that follows Williams's model,
 * written from memory; every check value is recomputed by the tests with three independent methods.
 */
export const CRC_CATALOGUE: readonly CrcPreset[] = Object.freeze([
  preset("CRC-3/GSM", 3, 0x3n, 0x0n, false, false, 0x7n, 0x4n),
  preset("CRC-4/G-704", 4, 0x3n, 0x0n, true, true, 0x0n, 0x7n, ["CRC-4/ITU"]),
  preset("CRC-5/USB", 5, 0x05n, 0x1fn, true, true, 0x1fn, 0x19n),
  preset("CRC-7/MMC", 7, 0x09n, 0x00n, false, false, 0x00n, 0x75n, ["CRC-7"]),
  preset("CRC-8/SMBUS", 8, 0x07n, 0x00n, false, false, 0x00n, 0xf4n, ["CRC-8"]),
  preset("CRC-8/MAXIM-DOW", 8, 0x31n, 0x00n, true, true, 0x00n, 0xa1n, ["CRC-8/MAXIM", "DOW-CRC"]),
  preset("CRC-8/AUTOSAR", 8, 0x2fn, 0xffn, false, false, 0xffn, 0xdfn),
  preset("CRC-8/BLUETOOTH", 8, 0xa7n, 0x00n, true, true, 0x00n, 0x26n),
  preset("CRC-10/ATM", 10, 0x233n, 0x000n, false, false, 0x000n, 0x199n, ["CRC-10", "CRC-10/I-610"]),
  preset("CRC-12/UMTS", 12, 0x80fn, 0x000n, false, true, 0x000n, 0xdafn, ["CRC-12/3GPP"]),
  preset("CRC-16/ARC", 16, 0x8005n, 0x0000n, true, true, 0x0000n, 0xbb3dn, ["ARC", "CRC-16", "CRC-16/LHA", "CRC-IBM"]),
  preset("CRC-16/IBM-3740", 16, 0x1021n, 0xffffn, false, false, 0x0000n, 0x29b1n, ["CRC-16/AUTOSAR", "CRC-16/CCITT-FALSE"]),
  preset("CRC-16/KERMIT", 16, 0x1021n, 0x0000n, true, true, 0x0000n, 0x2189n, ["CRC-16/BLUETOOTH", "CRC-16/CCITT", "CRC-16/CCITT-TRUE", "CRC-16/V-41-LSB", "CRC-CCITT", "KERMIT"]),
  preset("CRC-16/XMODEM", 16, 0x1021n, 0x0000n, false, false, 0x0000n, 0x31c3n, ["CRC-16/ACORN", "CRC-16/LTE", "CRC-16/V-41-MSB", "XMODEM", "ZMODEM"]),
  preset("CRC-16/MODBUS", 16, 0x8005n, 0xffffn, true, true, 0x0000n, 0x4b37n, ["MODBUS"]),
  preset("CRC-16/USB", 16, 0x8005n, 0xffffn, true, true, 0xffffn, 0xb4c8n),
  preset("CRC-16/GENIBUS", 16, 0x1021n, 0xffffn, false, false, 0xffffn, 0xd64en, ["CRC-16/DARC", "CRC-16/EPC", "CRC-16/EPC-C1G2", "CRC-16/I-CODE"]),
  preset("CRC-16/MAXIM-DOW", 16, 0x8005n, 0x0000n, true, true, 0xffffn, 0x44c2n, ["CRC-16/MAXIM"]),
  preset("CRC-24/OPENPGP", 24, 0x864cfbn, 0xb704cen, false, false, 0x000000n, 0x21cf02n, ["CRC-24"]),
  preset("CRC-31/PHILIPS", 31, 0x04c11db7n, 0x7fffffffn, false, false, 0x7fffffffn, 0x0ce9e46cn),
  preset("CRC-32/ISO-HDLC", 32, 0x04c11db7n, 0xffffffffn, true, true, 0xffffffffn, 0xcbf43926n, ["CRC-32", "CRC-32/ADCCP", "CRC-32/V-42", "CRC-32/XZ", "PKZIP"]),
  preset("CRC-32/ISCSI", 32, 0x1edc6f41n, 0xffffffffn, true, true, 0xffffffffn, 0xe3069283n, ["CRC-32/BASE91-C", "CRC-32/CASTAGNOLI", "CRC-32/INTERLAKEN", "CRC-32C", "CRC-32C/ISCSI"]),
  preset("CRC-32/BZIP2", 32, 0x04c11db7n, 0xffffffffn, false, false, 0xffffffffn, 0xfc891918n, ["CRC-32/AAL5", "CRC-32/DECT-B", "B-CRC-32"]),
  preset("CRC-32/MPEG-2", 32, 0x04c11db7n, 0xffffffffn, false, false, 0x00000000n, 0x0376e6e7n),
  preset("CRC-32/CKSUM", 32, 0x04c11db7n, 0x00000000n, false, false, 0xffffffffn, 0x765e7680n, ["CKSUM", "CRC-32/POSIX"]),
  preset("CRC-32/JAMCRC", 32, 0x04c11db7n, 0xffffffffn, true, true, 0x00000000n, 0x340bc6d9n, ["JAMCRC"]),
  preset("CRC-40/GSM", 40, 0x0004820009n, 0x0000000000n, false, false, 0xffffffffffn, 0xd4164fc646n),
  preset("CRC-64/ECMA-182", 64, 0x42f0e1eba9ea3693n, 0x0n, false, false, 0x0n, 0x6c40df5f0b497347n, ["CRC-64"]),
  preset("CRC-64/XZ", 64, 0x42f0e1eba9ea3693n, 0xffffffffffffffffn, true, true, 0xffffffffffffffffn, 0x995dc9bbdf1939fan, ["CRC-64/GO-ECMA"]),
  preset("CRC-64/WE", 64, 0x42f0e1eba9ea3693n, 0xffffffffffffffffn, false, false, 0xffffffffffffffffn, 0x62ec59e3f1a4f00an),
]);

const byName = new Map<string, CrcPreset>();
for (const p of CRC_CATALOGUE) for (const key of [p.name, ...p.aliases]) byName.set(key.toUpperCase(), p);

/** The catalogue preset with this name or alias, ignoring case. */
export function crcPreset(name: string): CrcPreset {
  const p = typeof name === "string" ? byName.get(name.trim().toUpperCase()) : undefined;
  if (!p) throw new InputError(`no CRC preset is called ${JSON.stringify(name)}; names follow the catalogue, e.g. "CRC-32/ISO-HDLC" or "CRC-16/KERMIT"`, ["name"]);
  return p;
}

function checkParams(p: CrcParams): void {
  if (!Number.isInteger(p.width) || p.width < 1 || p.width > 64) throw new InputError(`width must be an integer from 1 to 64; got ${p.width}`, ["width"]);
  const top = 1n << BigInt(p.width);
  for (const field of ["poly", "init", "xorout"] as const) {
    const v = p[field];
    if (typeof v !== "bigint" || v < 0n || v >= top) throw new InputError(`${field} must be an integer from 0 to 2^${p.width} − 1`, [field]);
  }
  if (p.poly === 0n) throw new InputError("poly must not be zero", ["poly"]);
  for (const field of ["refin", "refout"] as const) if (typeof p[field] !== "boolean") throw new InputError(`${field} must be true or false`, [field]);
}

function reflect(x: bigint, width: number): bigint {
  let y = 0n;
  for (let i = 0; i < width; i++, x >>= 1n) y = (y << 1n) | (x & 1n);
  return y;
}

/** A table-driven CRC register: feeds whole bytes through a 256-entry table and single bits one shift at a time. */
interface Engine {
  crcOfBytes(data: Uint8Array): bigint;
  crcOfBits(data: Bits): bigint;
}

/*
 * Every register is kept reflected when refin (so a byte enters least significant bit first, the
 * table indexed by the register's low byte), and otherwise left-aligned in at least 8 bits (the
 * table indexed by its high byte). A bit stream goes through the same register one bit at a time,
 * whole 8-bit groups through the table, in the register's bit order; the result is the same register.
 * Widths up to 32 use 32-bit integer arithmetic; wider ones two 32-bit halves for bytes, BigInt for the rest.
 *
 * Each of the four registers has its own byte loop and its own two entry points: one shared loop
 * (or one shared caller of the four loops) makes V8's call sites polymorphic, and the benchmark
 * showed the 32-bit non-reflected CRCs running at about half speed that way.
 */

/** The 256-entry table: entry i is the register after eight shifts starting from `seed(i)` (Williams 1993, §10). */
function fillTable<R>(table: { [i: number]: R }, seed: (i: number) => R, step: (c: R) => R): void {
  for (let i = 0; i < 256; i++) {
    let c = seed(i);
    for (let j = 0; j < 8; j++) c = step(c);
    table[i] = c;
  }
}

/** A bit stream through a register: whole groups of 8 bits as bytes in the register's bit order, the rest one by one. */
function bitsThrough<R>(data: Bits, lsbFirst: boolean, init: R, feedBytes: (reg: R, d: Uint8Array) => R, feedBit: (reg: R, bit: number) => R): R {
  const bytes = new Uint8Array(data.length >>> 3);
  for (let b = 0; b < bytes.length; b++) {
    let byte = 0;
    const i = b * 8;
    if (lsbFirst) for (let j = 0; j < 8; j++) byte |= data[i + j]! << j;
    else for (let j = 0; j < 8; j++) byte = (byte << 1) | data[i + j]!;
    bytes[b] = byte;
  }
  let reg = feedBytes(init, bytes);
  for (let i = bytes.length * 8; i < data.length; i++) reg = feedBit(reg, data[i]!);
  return reg;
}

/** Reflected register = reflected output; reflect when refin and refout differ, then apply xorout. */
const finish = (p: CrcParams, v: bigint) => (p.refin !== p.refout ? reflect(v, p.width) : v) ^ p.xorout;

function numberEngine(p: CrcParams): Engine {
  const w = p.width;
  const table = new Uint32Array(256);
  if (p.refin) {
    const rpoly = Number(reflect(p.poly, w));
    const step = (c: number) => (c & 1 ? (c >>> 1) ^ rpoly : c >>> 1);
    fillTable(table, (i) => i, step);
    const init = Number(reflect(p.init, w));
    const feedBytes = (reg: number, data: Uint8Array) => {
      for (let i = 0; i < data.length; i++) reg = (reg >>> 8) ^ table[(reg ^ data[i]!) & 0xff]!;
      return reg;
    };
    const feedBit = (reg: number, bit: number) => step(reg ^ bit);
    const result = (reg: number) => finish(p, BigInt(reg >>> 0));
    return {
      crcOfBytes: (data) => result(feedBytes(init, data)),
      crcOfBits: (data) => result(bitsThrough(data, true, init, feedBytes, feedBit)),
    };
  }
  const regWidth = Math.max(w, 8);
  const shift = regWidth - w;
  const topBit = 2 ** (regWidth - 1);
  const mask = 2 ** regWidth - 1;
  const poly = Number(p.poly) * 2 ** shift;
  // Multiplication and >>> 0 keep 32-bit registers unsigned.
  const step = (c: number) => ((c >= topBit ? ((c * 2) & mask) ^ poly : (c * 2) & mask) >>> 0);
  fillTable(table, (i) => i * 2 ** (regWidth - 8), step);
  const init = Number(p.init) * 2 ** shift;
  const feedBytes = (reg: number, data: Uint8Array) => {
    for (let i = 0; i < data.length; i++) reg = (((reg * 256) & mask) ^ table[((reg >>> (regWidth - 8)) ^ data[i]!) & 0xff]!) >>> 0;
    return reg;
  };
  const feedBit = (reg: number, bit: number) => step((reg ^ (bit * topBit)) >>> 0);
  const result = (reg: number) => finish(p, BigInt(reg >>> shift));
  return {
    crcOfBytes: (data) => result(feedBytes(init, data)),
    crcOfBits: (data) => result(bitsThrough(data, false, init, feedBytes, feedBit)),
  };
}

/** A 64-bit table as its high and low 32-bit halves, so the byte loop runs in integer arithmetic. */
function splitTable(table: BigUint64Array): { hi: Uint32Array; lo: Uint32Array } {
  const hi = new Uint32Array(256);
  const lo = new Uint32Array(256);
  for (let i = 0; i < 256; i++) {
    hi[i] = Number(table[i]! >> 32n);
    lo[i] = Number(table[i]! & 0xffffffffn);
  }
  return { hi, lo };
}

const join = (hi: number, lo: number) => (BigInt(hi >>> 0) << 32n) | BigInt(lo >>> 0);

/**
 * Widths 33 to 64: the table is built and single bits are shifted in BigInt, but whole bytes go
 * through the table as two 32-bit halves (BigInt shifts and lookups cost several times more).
 * Not reflected, the register is left-aligned in 64 bits, so its top byte is always hi >>> 24.
 */
function bigEngine(p: CrcParams): Engine {
  const table = new BigUint64Array(256);
  if (p.refin) {
    const rpoly = reflect(p.poly, p.width);
    const step = (c: bigint) => (c & 1n ? (c >> 1n) ^ rpoly : c >> 1n);
    fillTable(table, (i) => BigInt(i), step);
    const t = splitTable(table);
    const init = reflect(p.init, p.width);
    const feedBytes = (reg: bigint, data: Uint8Array) => {
      let hi = Number(reg >> 32n);
      let lo = Number(reg & 0xffffffffn);
      for (let i = 0; i < data.length; i++) {
        const k = (lo ^ data[i]!) & 0xff;
        lo = (((lo >>> 8) | (hi << 24)) ^ t.lo[k]!) >>> 0;
        hi = ((hi >>> 8) ^ t.hi[k]!) >>> 0;
      }
      return join(hi, lo);
    };
    const feedBit = (reg: bigint, bit: number) => step(reg ^ BigInt(bit));
    const result = (reg: bigint) => finish(p, reg);
    return {
      crcOfBytes: (data) => result(feedBytes(init, data)),
      crcOfBits: (data) => result(bitsThrough(data, true, init, feedBytes, feedBit)),
    };
  }
  const shift = BigInt(64 - p.width);
  const mask = (1n << 64n) - 1n;
  const top = 1n << 63n;
  const poly = p.poly << shift;
  const step = (c: bigint) => (c & top ? ((c << 1n) & mask) ^ poly : (c << 1n) & mask);
  fillTable(table, (i) => BigInt(i) << 56n, step);
  const t = splitTable(table);
  const init = p.init << shift;
  const feedBytes = (reg: bigint, data: Uint8Array) => {
    let hi = Number(reg >> 32n);
    let lo = Number(reg & 0xffffffffn);
    for (let i = 0; i < data.length; i++) {
      const k = ((hi >>> 24) ^ data[i]!) & 0xff;
      hi = (((hi << 8) | (lo >>> 24)) ^ t.hi[k]!) >>> 0;
      lo = ((lo << 8) ^ t.lo[k]!) >>> 0;
    }
    return join(hi, lo);
  };
  const feedBit = (reg: bigint, bit: number) => step(bit ? reg ^ top : reg);
  const result = (reg: bigint) => finish(p, reg >> shift);
  return {
    crcOfBytes: (data) => result(feedBytes(init, data)),
    crcOfBits: (data) => result(bitsThrough(data, false, init, feedBytes, feedBit)),
  };
}

// Tables are pure functions of the parameters; the most recently used few are kept.
const engines = new Map<string, Engine>();
const MAX_CACHED_ENGINES = 64;

function engine(p: CrcParams): Engine {
  checkParams(p);
  const key = `${p.width}:${p.poly}:${p.init}:${p.refin}:${p.refout}:${p.xorout}`;
  let e = engines.get(key);
  if (e) {
    engines.delete(key);
  } else {
    e = p.width <= 32 ? numberEngine(p) : bigEngine(p);
    if (engines.size >= MAX_CACHED_ENGINES) engines.delete(engines.keys().next().value!);
  }
  engines.set(key, e);
  return e;
}

/** CRC of bytes in the Williams model, table-driven (256 entries): each byte enters most significant bit first, or least significant first when refin (Williams 1993). */
export function crcCompute(params: CrcParams, data: Uint8Array): bigint {
  if (!(data instanceof Uint8Array)) throw new InputError("data must be bytes (a Uint8Array)", ["data"]);
  return engine(params).crcOfBytes(data);
}

/**
 * CRC of a bit stream: bit 0 enters the register first, then bit 1, and so on, whatever refin says
 * (refin only says how a byte becomes 8 stream bits), so crcComputeBits of the bytes' bits, each byte
 * least significant bit first when refin and most significant first otherwise, equals crcCompute
 * (Williams 1993).
 */
export function crcComputeBits(params: CrcParams, bits: Bits): bigint {
  for (let i = 0; i < bits.length; i++) if (bits[i] !== 0 && bits[i] !== 1) throw new InputError(`bit ${i} is ${bits[i]}; bits are 0 or 1`, ["data", i]);
  return engine(params).crcOfBits(bits);
}

/** The CRC value carried by the last `width` bits of a codeword of crcCode: most significant bit first, least significant first when refout. */
export function crcAppendedValue(params: CrcParams, tail: Bits): bigint {
  const w = params.width;
  if (tail.length !== w) throw new InputError(`the CRC part has ${tail.length} bits; the CRC is ${w} bits wide`, ["tail"]);
  let v = 0n;
  for (let j = 0; j < w; j++) v |= BigInt(tail[j]! & 1) << BigInt(params.refout ? j : w - 1 - j);
  return v;
}

/** Largest message length of the bit-aligned CRC code. */
export const MAX_CRC_MESSAGE_BITS = 1 << 20;

function hex(v: bigint, width: number): string {
  return "0x" + v.toString(16).padStart(Math.ceil(width / 4), "0");
}

/**
 * The CRC as a bit-aligned (k + width, k) block code for error detection: the codeword is the k message
 * bits as a stream (bit 0 enters the register first) followed by the width CRC bits, most significant bit
 * first, or least significant first when refout, so the register's highest-degree bit always comes first
 * after the message. Decoding recomputes the CRC: a mismatch is failure, nothing is corrected, and the
 * syndrome is received CRC ⊕ computed CRC in the appended bit order (Williams 1993; Lin & Costello 2004, ch. 5).
 * generatorRows() spans the linear code with init = xorout = 0, whose non-zero codewords are exactly the
 * error patterns the CRC misses.
 */
export function crcCode(params: CrcParams & { name?: string }, k: number): BlockCode {
  checkParams(params);
  if (!Number.isInteger(k) || k < 0 || k > MAX_CRC_MESSAGE_BITS) throw new InputError(`k must be an integer from 0 to ${MAX_CRC_MESSAGE_BITS}; got ${k}`, ["k"]);
  const w = params.width;
  const n = k + w;
  const name = `${params.name ?? `CRC-${w}`} (${n},${k})`;
  const valueBit = (v: bigint, j: number) => Number((v >> BigInt(params.refout ? j : w - 1 - j)) & 1n);
  const append = (p: CrcParams, m: Bits): Bits => {
    const c = new Uint8Array(n);
    c.set(m);
    const v = crcComputeBits(p, m);
    for (let j = 0; j < w; j++) c[k + j] = valueBit(v, j);
    return c;
  };
  const linearPart: CrcParams = { ...params, init: 0n, xorout: 0n };
  return {
    family: "crc",
    name,
    n,
    k,
    q: 2,
    messagePositions: Array.from({ length: k }, (_, i) => i),
    bitOrder:
      `Message bits in positions 0..${k - 1} as a stream (position 0 enters the CRC register first; refin does not reorder bits), ` +
      `then the ${w}-bit CRC value in positions ${k}..${n - 1}, ${params.refout ? "least" : "most"} significant bit first.`,
    supportsErasures: false,
    encode: (message: Word) => append(params, checkBinaryWord(message, k, "message", name)),
    decode(received: Word, erasures?: number[]): DecodeResult {
      const r = checkBinaryWord(received, n, "received", name);
      rejectErasures(erasures, name);
      const computed = crcComputeBits(params, r.subarray(0, k));
      const got = crcAppendedValue(params, r.subarray(k));
      const syndrome = Uint8Array.from({ length: w }, (_, j) => valueBit(got ^ computed, j));
      const base = { message: r.slice(0, k), codeword: r.slice(), correctedPositions: [], syndrome };
      if (got === computed) return { ...base, failure: false };
      return { ...base, failure: true, reason: `CRC mismatch: received ${hex(got, w)}, computed ${hex(computed, w)}; errors detected, not corrected` };
    },
    generatorRows: () =>
      Array.from({ length: k }, (_, i) => {
        const m = new Uint8Array(k);
        m[i] = 1;
        return append(linearPart, m);
      }),
  };
}
