import { crc32 } from "node:zlib";
import { beforeAll, describe, expect, it } from "vitest";
import { postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";
import { rng } from "../helpers/rng";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

const call = (body: unknown) => postJson("/api/v1/encode", body, auth);

interface EncodeBody {
  code: { family: string; name: string; n: number; k: number; q: number; bitOrder: string; systematic: boolean; generatorPolynomial?: { octal?: string; exponents?: number[] } };
  codewords: { codeword: string | number[]; crc?: string }[];
}

async function encodeOk(body: unknown): Promise<EncodeBody> {
  const res = await call(body);
  expect(res.status, res.text).toBe(200);
  expect(res.headers["content-type"]).toMatch(/^application\/json/);
  return res.body as EncodeBody;
}

// ---- Plain helpers written here, independent of lib/core ----

const bitsOf = (s: string) => [...s].map(Number);
const str = (b: number[]) => b.join("");
const weight = (s: string) => [...s].filter((c) => c === "1").length;
/** All 2^k messages of k bits, message i = binary expansion of i, most significant bit first. */
const allMessages = (k: number) => Array.from({ length: 2 ** k }, (_, i) => i.toString(2).padStart(k, "0"));
const randomBits = (next: () => number, len: number) => Array.from({ length: len }, () => (next() < 0.5 ? 0 : 1)).join("");

/** Row vector times matrix over GF(2). */
function vecMat(v: number[], rows: number[][]): number[] {
  const out = new Array<number>(rows[0]!.length).fill(0);
  v.forEach((b, i) => {
    if (b) rows[i]!.forEach((x, j) => (out[j]! ^= x));
  });
  return out;
}

/** Binary polynomial from a 0/1 string, first character = highest power; as a BigInt. */
const polyOf = (s: string) => BigInt(`0b${s}`);
/** Remainder of a(x) divided by g(x) over GF(2) (long division by XOR). */
function polyMod(a: bigint, g: bigint): bigint {
  const dg = g.toString(2).length - 1;
  for (let d = a.toString(2).length - 1; d >= dg && a !== 0n; d = a.toString(2).length - 1) a ^= g << BigInt(d - dg);
  return a;
}

/**
 * Bit-by-bit CRC in Ross Williams's parameter model (1993): each byte enters most significant bit first
 * (least significant first when refin), the register shifts left and XORs poly when the bit falling off
 * differs from the input bit; refout reflects the final register, then xorout.
 */
function williamsCrc(p: { width: number; poly: bigint; init: bigint; refin: boolean; refout: boolean; xorout: bigint }, data: Uint8Array): bigint {
  const top = 1n << BigInt(p.width - 1);
  const mask = (1n << BigInt(p.width)) - 1n;
  let reg = p.init;
  for (const byte of data) {
    for (let b = 0; b < 8; b++) {
      const bit = (byte >> (p.refin ? b : 7 - b)) & 1;
      const fall = (reg & top) !== 0n ? 1 : 0;
      reg = (reg << 1n) & mask;
      if (fall ^ bit) reg ^= p.poly;
    }
  }
  if (p.refout) {
    let r = 0n;
    for (let i = 0; i < p.width; i++) r |= ((reg >> BigInt(i)) & 1n) << BigInt(p.width - 1 - i);
    reg = r;
  }
  return reg ^ p.xorout;
}

describe("POST /encode: Hamming", () => {
  /**
   * The generator [I_k | P] implied by the documented bit order (code.bitOrder): message bit i's "column number"
   * is the i-th integer ≥ 3 that is not a power of two; parity bit j is bit r−1−j of the XOR of the column numbers
   * of the message bits that are 1. So row i of P is that column number written in r bits, most significant first.
   * H = [Pᵀ | I_r] then annihilates every codeword (MacWilliams & Sloane 1977, ch. 1: systematic G and H).
   */
  function documentedMatrices(r: number) {
    const n = 2 ** r - 1;
    const k = n - r;
    const columns: number[] = [];
    for (let c = 3; columns.length < k; c++) if ((c & (c - 1)) !== 0) columns.push(c);
    const P = columns.map((c) => Array.from({ length: r }, (_, j) => (c >> (r - 1 - j)) & 1));
    const G = P.map((row, i) => [...Array.from({ length: k }, (_, j) => (j === i ? 1 : 0)), ...row]);
    const H = Array.from({ length: r }, (_, j) => [...P.map((row) => row[j]!), ...Array.from({ length: r }, (_, l) => (l === j ? 1 : 0))]);
    return { n, k, G, H };
  }

  it("(7,4): all 16 codewords equal m·[I|P] from the documented bit order, have zero syndrome under H = [Pᵀ|I], carry the message in positions 0..3", async () => {
    const { G, H } = documentedMatrices(3);
    const messages = allMessages(4);
    const body = await encodeOk({ code: { family: "hamming", r: 3 }, messages });
    expect(body.code).toMatchObject({ family: "hamming", n: 7, k: 4, q: 2, systematic: true });
    // The matrices above were built from this description; the response must still say it.
    expect(body.code.bitOrder).toMatch(/Message bits in positions 0\.\.3, parity bits in positions 4\.\.6/);
    expect(body.code.bitOrder).toMatch(/i-th integer ≥ 3 that is not a power of two/);
    expect(body.codewords).toHaveLength(16);
    body.codewords.forEach(({ codeword }, i) => {
      const c = codeword as string;
      expect(c).toMatch(/^[01]{7}$/);
      expect(c).toBe(str(vecMat(bitsOf(messages[i]!), G)));
      expect(c.slice(0, 4)).toBe(messages[i]);
      for (const row of H) expect(row.reduce((s, h, j) => s ^ (h & Number(c[j])), 0)).toBe(0);
    });
    // Weight distribution of the (7,4) code, A0=1, A3=7, A4=7, A7=1 (MacWilliams & Sloane; REFERENCES.md).
    const counts = new Map<number, number>();
    for (const { codeword } of body.codewords) counts.set(weight(codeword as string), (counts.get(weight(codeword as string)) ?? 0) + 1);
    expect(Object.fromEntries(counts)).toEqual({ 0: 1, 3: 7, 4: 7, 7: 1 });
  });

  it("(15,11): 200 seeded random messages agree with the documented [I|P] and have zero syndrome", async () => {
    const { k, G, H } = documentedMatrices(4);
    const next = rng(0x15_11);
    const messages = Array.from({ length: 200 }, () => randomBits(next, k));
    const body = await encodeOk({ code: { family: "hamming", r: 4 }, messages });
    expect(body.code).toMatchObject({ n: 15, k: 11 });
    body.codewords.forEach(({ codeword }, i) => {
      const c = codeword as string;
      expect(c).toBe(str(vecMat(bitsOf(messages[i]!), G)));
      for (const row of H) expect(row.reduce((s, h, j) => s ^ (h & Number(c[j])), 0)).toBe(0);
    });
  });

  it("extended (8,4): the (7,4) codeword followed by an overall parity bit; every weight even, A0=1, A4=14, A8=1 (MacWilliams & Sloane)", async () => {
    const messages = allMessages(4);
    const plain = await encodeOk({ code: { family: "hamming", r: 3 }, messages });
    const ext = await encodeOk({ code: { family: "hamming", r: 3, extended: true }, messages });
    expect(ext.code).toMatchObject({ n: 8, k: 4 });
    const counts: Record<number, number> = {};
    ext.codewords.forEach(({ codeword }, i) => {
      const c = codeword as string;
      const base = plain.codewords[i]!.codeword as string;
      expect(c.slice(0, 7)).toBe(base);
      expect(c[7]).toBe(String(weight(base) % 2));
      counts[weight(c)] = (counts[weight(c)] ?? 0) + 1;
    });
    expect(counts).toEqual({ 0: 1, 4: 14, 8: 1 });
  });
});

describe("POST /encode: Golay", () => {
  it("(24,12): all 4,096 codewords (four batches of 1,024) have weights in {0, 8, 12, 16, 24}, counted 1, 759, 2576, 759, 1 (MacWilliams & Sloane)", async () => {
    const messages = allMessages(12);
    const counts: Record<number, number> = {};
    const seen = new Set<string>();
    for (let b = 0; b < 4; b++) {
      const batch = messages.slice(b * 1024, (b + 1) * 1024);
      const body = await encodeOk({ code: { family: "golay", extended: true }, messages: batch });
      expect(body.code).toMatchObject({ n: 24, k: 12 });
      body.codewords.forEach(({ codeword }, i) => {
        const c = codeword as string;
        expect(c.slice(0, 12)).toBe(batch[i]);
        expect([0, 8, 12, 16, 24]).toContain(weight(c));
        counts[weight(c)] = (counts[weight(c)] ?? 0) + 1;
        seen.add(c);
      });
    }
    expect(seen.size).toBe(4096);
    expect(counts).toEqual({ 0: 1, 8: 759, 12: 2576, 16: 759, 24: 1 });
  });

  it("(23,12): weights A0=1, A7=253, A8=506, A11=1288, A12=1288, A15=506, A16=253, A23=1 (MacWilliams & Sloane); (24,12) = (23,12) plus a parity bit", async () => {
    const messages = allMessages(12);
    const counts: Record<number, number> = {};
    for (let b = 0; b < 4; b++) {
      const batch = messages.slice(b * 1024, (b + 1) * 1024);
      const body = await encodeOk({ code: { family: "golay" }, messages: batch });
      const ext = await encodeOk({ code: { family: "golay", extended: true }, messages: batch });
      body.codewords.forEach(({ codeword }, i) => {
        const c = codeword as string;
        counts[weight(c)] = (counts[weight(c)] ?? 0) + 1;
        expect(ext.codewords[i]!.codeword).toBe(c + String(weight(c) % 2));
      });
    }
    expect(counts).toEqual({ 0: 1, 7: 253, 8: 506, 11: 1288, 12: 1288, 15: 506, 16: 253, 23: 1 });
  });
});

describe("POST /encode: CRC", () => {
  // Check values of ASCII "123456789" (CRC catalogue in Williams's model, REFERENCES.md), each confirmed
  // by the bit-by-bit Williams register above with the catalogue parameters written out here.
  const presets = [
    { name: "CRC-32/ISO-HDLC", width: 32, poly: 0x04c11db7n, init: 0xffffffffn, refin: true, refout: true, xorout: 0xffffffffn, check: 0xcbf43926n },
    { name: "CRC-32/ISCSI", width: 32, poly: 0x1edc6f41n, init: 0xffffffffn, refin: true, refout: true, xorout: 0xffffffffn, check: 0xe3069283n },
    { name: "CRC-16/IBM-3740", width: 16, poly: 0x1021n, init: 0xffffn, refin: false, refout: false, xorout: 0n, check: 0x29b1n },
    { name: "CRC-16/KERMIT", width: 16, poly: 0x1021n, init: 0n, refin: true, refout: true, xorout: 0n, check: 0x2189n },
    { name: "CRC-16/ARC", width: 16, poly: 0x8005n, init: 0n, refin: true, refout: true, xorout: 0n, check: 0xbb3dn },
    { name: "CRC-16/XMODEM", width: 16, poly: 0x1021n, init: 0n, refin: false, refout: false, xorout: 0n, check: 0x31c3n },
    { name: "CRC-8/SMBUS", width: 8, poly: 0x07n, init: 0n, refin: false, refout: false, xorout: 0n, check: 0xf4n },
  ];
  const digits = new TextEncoder().encode("123456789");

  it("the seven check values above are reproduced by the independent bit-by-bit register (confirms the values written from memory)", () => {
    for (const p of presets) expect(williamsCrc(p, digits), p.name).toBe(p.check);
    // And CRC-32/ISO-HDLC once more against zlib.
    expect(BigInt(crc32(Buffer.from("123456789")))).toBe(0xcbf43926n);
  });

  it.each(presets)("$name of {text: '123456789'}: crc equals the catalogue check value; codeword = the frame's bytes as written, most significant bit first", async (p) => {
    const body = await encodeOk({ code: { family: "crc", preset: p.name }, messages: [{ text: "123456789" }] });
    const { crc, codeword } = body.codewords[0]!;
    expect(crc).toBe("0x" + p.check.toString(16).padStart(p.width / 4, "0"));
    expect(body.code).toMatchObject({ family: "crc", n: 72 + p.width, k: 72, q: 2 });
    // The frame as sent: the bytes, then the CRC low byte first when reflected (as zlib's users append CRC-32), high byte first otherwise.
    const crcBytes = Array.from({ length: p.width / 8 }, (_, i) => Number((p.check >> BigInt(8 * i)) & 0xffn));
    const frame = [...digits, ...(p.refout ? crcBytes : crcBytes.reverse())];
    expect(body.code.bitOrder).toMatch(p.refout ? /least significant bit first/ : /most significant bit first/);
    expect(codeword).toBe(frame.map((b) => b.toString(2).padStart(8, "0")).join(""));
  });

  it("CRC-32/ISO-HDLC of seeded random bytes (lengths 0 to 300, as {hex}) equals node:zlib crc32", async () => {
    const next = rng(0xc0ffee);
    const lengths = [0, 1, 2, 3, 4, 7, 8, 15, 16, 31, 64, 100, 255, 300];
    const blobs = lengths.map((len) => Buffer.from(Array.from({ length: len }, () => Math.floor(next() * 256))));
    const body = await encodeOk({ code: { family: "crc", preset: "CRC-32/ISO-HDLC" }, messages: blobs.map((b) => ({ hex: b.toString("hex") })) });
    body.codewords.forEach(({ crc, codeword }, i) => {
      expect(crc).toBe("0x" + crc32(blobs[i]!).toString(16).padStart(8, "0"));
      expect((codeword as string).length).toBe(8 * lengths[i]! + 32);
    });
  });

  it("CRC-32/ISO-HDLC of UTF-8 text with non-ASCII characters equals zlib crc32 of the UTF-8 bytes", async () => {
    const texts = ["Grüße", "π ≈ 3.14159", "日本語テキスト", ""];
    const body = await encodeOk({ code: { family: "crc", preset: "CRC-32" }, messages: texts.map((text) => ({ text })) });
    body.codewords.forEach(({ crc }, i) => expect(crc).toBe("0x" + crc32(Buffer.from(texts[i]!, "utf8")).toString(16).padStart(8, "0")));
  });

  it("explicit parameters without a preset: CRC-16/XMODEM written out as width/poly gives 0x31c3 (catalogue)", async () => {
    const body = await encodeOk({ code: { family: "crc", width: 16, poly: "0x1021" }, messages: [{ text: "123456789" }] });
    expect(body.codewords[0]!.crc).toBe("0x31c3");
  });

  it("CRC of a bit-aligned message given as bits equals the polynomial remainder: CRC-3/GSM (poly x^3+x+1, xorout 7) of 4-bit messages", async () => {
    // With init 0 and no reflection, the CRC is (m(x)·x^3 mod g(x)) ⊕ xorout (Williams 1993, §7).
    const messages = allMessages(4);
    const body = await encodeOk({ code: { family: "crc", preset: "CRC-3/GSM" }, messages });
    body.codewords.forEach(({ codeword, crc }, i) => {
      const rem = polyMod(polyOf(messages[i]!) << 3n, 0b1011n) ^ 0b111n;
      expect(crc).toBe("0x" + rem.toString(16));
      expect(codeword).toBe(messages[i] + rem.toString(2).padStart(3, "0"));
    });
  });
});

describe("POST /encode: Reed–Solomon", () => {
  it("QR worked example: m 8, n 26, k 16, firstRoot 0 → EC codewords 196 35 39 119 235 215 231 226 93 23 (ISO/IEC 18004)", async () => {
    const data = [32, 91, 11, 120, 209, 114, 220, 77, 67, 64, 236, 17, 236, 17, 236, 17];
    const body = await encodeOk({ code: { family: "rs", m: 8, n: 26, k: 16, firstRoot: 0 }, messages: [data] });
    expect(body.code).toMatchObject({ family: "rs", n: 26, k: 16, q: 256, systematic: true });
    expect(body.codewords[0]!.codeword).toEqual([...data, 196, 35, 39, 119, 235, 215, 231, 226, 93, 23]);
  });

  it("a message given as bits (8 per symbol, most significant first) gives the same codeword as the symbol array", async () => {
    const data = [32, 91, 11, 120, 209, 114, 220, 77, 67, 64, 236, 17, 236, 17, 236, 17];
    const bits = data.map((s) => s.toString(2).padStart(8, "0")).join(" ");
    const a = await encodeOk({ code: { family: "rs", m: 8, n: 26, k: 16, firstRoot: 0 }, messages: [data] });
    const b = await encodeOk({ code: { family: "rs", m: 8, n: 26, k: 16, firstRoot: 0 }, messages: [bits] });
    expect(b.codewords).toEqual(a.codewords);
  });
});

describe("POST /encode: BCH", () => {
  it("(15,7), t = 2: generator 721 octal; all 128 codeword polynomials are divisible by g(x) = x^8+x^7+x^6+x^4+1 (Lin & Costello BCH table)", async () => {
    const messages = allMessages(7);
    const body = await encodeOk({ code: { family: "bch", m: 4, t: 2 }, messages });
    expect(body.code).toMatchObject({ n: 15, k: 7 });
    expect(body.code.generatorPolynomial?.octal).toBe("721");
    expect(body.code.generatorPolynomial?.exponents).toEqual([8, 7, 6, 4, 0]);
    const g = 0o721n;
    expect(g).toBe((1n << 8n) | (1n << 7n) | (1n << 6n) | (1n << 4n) | 1n);
    const distinct = new Set<string>();
    let minWeight = Infinity;
    body.codewords.forEach(({ codeword }, i) => {
      const c = codeword as string;
      expect(c).toMatch(/^[01]{15}$/);
      // Bit 0 is the coefficient of x^14 (code.bitOrder).
      expect(polyMod(polyOf(c), g)).toBe(0n);
      expect(c.slice(0, 7)).toBe(messages[i]);
      distinct.add(c);
      if (i > 0) minWeight = Math.min(minWeight, weight(c));
    });
    expect(distinct.size).toBe(128);
    // Designed distance 2t + 1 = 5 is met (BCH bound, Lin & Costello ch. 6).
    expect(minWeight).toBe(5);
  });

  it("shortened (31,21) by 5 → (26,16): every codeword, with the 5 dropped leading zeros put back, is divisible by 3551 octal (Lin & Costello BCH table)", async () => {
    const next = rng(3551);
    const messages = Array.from({ length: 100 }, () => randomBits(next, 16));
    const body = await encodeOk({ code: { family: "bch", m: 5, t: 2, shorten: 5 }, messages });
    expect(body.code).toMatchObject({ n: 26, k: 16 });
    expect(body.code.generatorPolynomial?.octal).toBe("3551");
    for (const { codeword } of body.codewords) expect(polyMod(polyOf("00000" + (codeword as string)), 0o3551n)).toBe(0n);
  });
});

describe("POST /encode: repetition, parity, linear", () => {
  it("repetition (5,1): 0 → 00000, 1 → 11111 (definition)", async () => {
    const body = await encodeOk({ code: { family: "repetition", n: 5 }, messages: ["0", "1", [1]] });
    expect(body.codewords.map((c) => c.codeword)).toEqual(["00000", "11111", "11111"]);
  });

  it("parity (6,5) even and odd: the appended bit makes the weight even / odd (definition)", async () => {
    const messages = allMessages(5);
    const even = await encodeOk({ code: { family: "parity", n: 6 }, messages });
    const odd = await encodeOk({ code: { family: "parity", n: 6, parity: "odd" }, messages });
    messages.forEach((m, i) => {
      expect(even.codewords[i]!.codeword).toBe(m + String(weight(m) % 2));
      expect(odd.codewords[i]!.codeword).toBe(m + String(1 - (weight(m) % 2)));
    });
  });

  it("linear code from a generator matrix: codeword = m·G computed here over GF(2)", async () => {
    const G = ["1001101", "0101011", "0010111"];
    const rows = G.map(bitsOf);
    const messages = allMessages(3);
    const body = await encodeOk({ code: { family: "linear", generator: G }, messages });
    expect(body.code).toMatchObject({ family: "linear", n: 7, k: 3 });
    body.codewords.forEach(({ codeword }, i) => expect(codeword).toBe(str(vecMat(bitsOf(messages[i]!), rows))));
  });
});

describe("POST /encode: word formats and batches", () => {
  it("the same message as a 0/1 string with separators, an array and {hex, length} gives one codeword", async () => {
    const body = await encodeOk({ code: { family: "hamming", r: 3 }, messages: ["10_11", [1, 0, 1, 1], { hex: "b" }, { hex: "0xB", length: 4 }, "1 0 1 1"] });
    const words = body.codewords.map((c) => c.codeword);
    expect(new Set(words).size).toBe(1);
  });

  it("a batch of 1,024 seeded random messages keeps their order: each codeword equals the single-message call's", async () => {
    const next = rng(1024);
    const messages = Array.from({ length: 1024 }, () => randomBits(next, 11));
    const batch = await encodeOk({ code: { family: "hamming", r: 4 }, messages });
    expect(batch.codewords).toHaveLength(1024);
    for (const i of [0, 1, 511, 777, 1023]) {
      const one = await encodeOk({ code: { family: "hamming", r: 4 }, messages: [messages[i]] });
      expect(batch.codewords[i]!.codeword).toBe(one.codewords[0]!.codeword);
    }
    batch.codewords.forEach(({ codeword }, i) => expect((codeword as string).slice(0, 11)).toBe(messages[i]));
  });
});

describe("POST /encode: metering", () => {
  // The documented rule: the code's construction (Reed–Solomon 6·(n − k)²) + per message 8·n for repetition and Hamming,
  // 8·k·(n − k) + 16·n for Reed–Solomon; 1 compute unit per started 2^22 work units, at least 1.
  const units = (work: number) => Math.max(1, Math.ceil(work / 2 ** 22));

  it("a small batch costs 1 unit", async () => {
    const res = await call({ code: { family: "hamming", r: 3 }, messages: ["1011", "0110"] });
    expect(res.status, res.text).toBe(200);
    expect(Number(res.headers["x-compute-units"])).toBe(1);
  });

  it("1,024 Hamming (7,4) words: 1,024 · 8 · 7 = 57,344 work → 1 unit", async () => {
    const res = await call({ code: { family: "hamming", r: 3 }, messages: new Array(1024).fill("1011") });
    expect(res.status, res.text).toBe(200);
    expect(Number(res.headers["x-compute-units"])).toBe(units(1024 * 8 * 7));
    expect(units(1024 * 8 * 7)).toBe(1);
  });

  it("the charge grows with the batch: 1, 9 and 17 repetition (65,535,1) codewords (8 · 65,535 work each) cost 1, 2 and 3 units", async () => {
    const got: number[] = [];
    for (const count of [1, 9, 17]) {
      const res = await call({ code: { family: "repetition", n: 65535 }, messages: new Array(count).fill("1") });
      expect(res.status, res.text).toBe(200);
      expect(res.body.codewords).toHaveLength(count);
      got.push(Number(res.headers["x-compute-units"]));
      expect(got.at(-1)).toBe(units(count * 8 * 65535));
    }
    expect(got).toEqual([1, 2, 3]);
  });

  it("Reed–Solomon: 300 RS(255,223) codewords = 6·32² + 300·(8·223·32 + 16·255) = 18,356,544 work → 5 units", async () => {
    const message = Array.from({ length: 223 }, (_, i) => i);
    const res = await call({ code: { family: "rs", m: 8, k: 223 }, messages: new Array(300).fill(message) });
    expect(res.status, res.text).toBe(200);
    const work = 6 * 32 ** 2 + 300 * (8 * 223 * 32 + 16 * 255);
    expect(Number(res.headers["x-compute-units"])).toBe(units(work));
    expect(units(work)).toBe(5);
  });
});
