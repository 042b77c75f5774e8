import { crc32 } from "node:zlib";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { CRC_CATALOGUE, type CrcParams, crcCode, crcCompute, crcComputeBits, crcPreset } from "@/lib/core/codes/crc";
import { InputError } from "@/lib/core/errors";

const ascii = (s: string) => new TextEncoder().encode(s);
const CHECK_INPUT = ascii("123456789");

function expectInputError(f: () => unknown, message: RegExp, path: (string | number)[]) {
  expect(f).toThrow(InputError);
  expect(f).toThrow(message);
  try {
    f();
  } catch (e) {
    expect((e as InputError).path).toEqual(path);
  }
}

function reflect(x: bigint, w: number): bigint {
  let y = 0n;
  for (let i = 0; i < w; i++) if ((x >> BigInt(i)) & 1n) y |= 1n << BigInt(w - 1 - i);
  return y;
}

/** The bytes as the stream the register sees: least significant bit of each byte first when refin (Williams 1993). */
const streamOf = (bytes: Uint8Array, refin: boolean) => Uint8Array.from({ length: bytes.length * 8 }, (_, i) => (bytes[i >> 3]! >> (refin ? i & 7 : 7 - (i & 7))) & 1);

/** Independent reference 1: Williams's bit-at-a-time register with no table (Williams 1993, the "simple" algorithm). */
function bitwiseReference(p: CrcParams, stream: Uint8Array): bigint {
  const top = 1n << BigInt(p.width - 1);
  const mask = (1n << BigInt(p.width)) - 1n;
  let reg = p.init;
  for (const b of stream) {
    const feedback = ((reg & top) !== 0n) !== (b === 1);
    reg = (reg << 1n) & mask;
    if (feedback) reg ^= p.poly;
  }
  return (p.refout ? reflect(reg, p.width) : reg) ^ p.xorout;
}

/** Independent reference 2: the definition as a polynomial remainder, (init·x^L + M(x)·x^w) mod (x^w + poly) (Williams 1993, §§ 6–10). */
function divisionReference(p: CrcParams, stream: Uint8Array): bigint {
  const w = BigInt(p.width);
  const L = BigInt(stream.length);
  let m = 0n;
  for (const b of stream) m = (m << 1n) | BigInt(b);
  let v = (p.init << L) ^ (m << w);
  const P = (1n << w) | p.poly;
  for (let deg = BigInt(v.toString(2).length) - 1n; deg >= w; deg--) if ((v >> deg) & 1n) v ^= P << (deg - w);
  return (p.refout ? reflect(v, p.width) : v) ^ p.xorout;
}

describe("CRC check values", () => {
  it.each([
    ["CRC-32/ISO-HDLC", 0xcbf43926n],
    ["CRC-32C", 0xe3069283n],
    ["CRC-16/IBM-3740", 0x29b1n],
    ["CRC-16/KERMIT", 0x2189n],
    ["CRC-16/ARC", 0xbb3dn],
    ["CRC-16/XMODEM", 0x31c3n],
    ["CRC-8/SMBUS", 0xf4n],
  ])('%s of "123456789" is the value in REFERENCES.md (CRC catalogue, from memory)', (name, value) => {
    expect(crcCompute(crcPreset(name), CHECK_INPUT)).toBe(value);
  });

  it.each(CRC_CATALOGUE.map((p) => [p.name, p] as const))('%s: the catalogue check value (from memory) equals the table-driven, bit-by-bit and polynomial-division CRCs of "123456789"', (_name, p) => {
    const stream = streamOf(CHECK_INPUT, p.refin);
    expect(crcCompute(p, CHECK_INPUT)).toBe(p.check);
    expect(bitwiseReference(p, stream)).toBe(p.check);
    expect(divisionReference(p, stream)).toBe(p.check);
    expect(crcComputeBits(p, stream)).toBe(p.check);
  });

  it("the presets required by the product are all present under their catalogue names", () => {
    const required = ["CRC-8/SMBUS", "CRC-8/MAXIM-DOW", "CRC-16/ARC", "CRC-16/IBM-3740", "CRC-16/KERMIT", "CRC-16/XMODEM", "CRC-16/MODBUS", "CRC-16/USB", "CRC-32/ISO-HDLC", "CRC-32/ISCSI", "CRC-32/BZIP2", "CRC-32/MPEG-2", "CRC-64/XZ", "CRC-64/ECMA-182", "CRC-5/USB", "CRC-3/GSM"];
    for (const name of required) expect(crcPreset(name).name).toBe(name);
    const all = CRC_CATALOGUE.flatMap((p) => [p.name, ...p.aliases].map((x) => x.toUpperCase()));
    expect(new Set(all).size).toBe(all.length);
    expect(crcPreset(" crc-32c ").name).toBe("CRC-32/ISCSI");
    expect(crcPreset("CRC-16/CCITT-FALSE").name).toBe("CRC-16/IBM-3740");
  });
});

describe("CRC on random data", () => {
  it("property: CRC-32/ISO-HDLC equals node:zlib's crc32 (an independent implementation)", () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 300 }), (data) => {
        expect(crcCompute(crcPreset("CRC-32/ISO-HDLC"), data)).toBe(BigInt(crc32(data)));
      }),
    );
  });

  it("property: every preset's table-driven CRC equals the bit-by-bit reference on random bytes", () => {
    fc.assert(
      fc.property(fc.constantFrom(...CRC_CATALOGUE), fc.uint8Array({ maxLength: 40 }), (p, data) => {
        const stream = streamOf(data, p.refin);
        expect(crcCompute(p, data)).toBe(bitwiseReference(p, stream));
        expect(crcComputeBits(p, stream)).toBe(bitwiseReference(p, stream));
      }),
    );
  });

  it("property: random parameters (any width 1..64, refin ≠ refout too) and bit streams of any length match both references", () => {
    const params = fc.integer({ min: 1, max: 64 }).chain((width) => {
      const v = fc.bigInt({ min: 0n, max: (1n << BigInt(width)) - 1n });
      return fc.record({ width: fc.constant(width), poly: v.filter((x) => x > 0n), init: v, refin: fc.boolean(), refout: fc.boolean(), xorout: v });
    });
    fc.assert(
      fc.property(params, fc.uint8Array({ maxLength: 90, min: 0, max: 1 }), fc.uint8Array({ maxLength: 12 }), (p, stream, bytes) => {
        expect(crcComputeBits(p, stream)).toBe(bitwiseReference(p, stream));
        expect(crcComputeBits(p, stream)).toBe(divisionReference(p, stream));
        expect(crcCompute(p, bytes)).toBe(bitwiseReference(p, streamOf(bytes, p.refin)));
      }),
    );
  });

  it("empty input: the CRC is (refout ? reflect(init) : init) ⊕ xorout, by the table path, the bit path and the formula (Williams 1993)", () => {
    for (const p of CRC_CATALOGUE) {
      const formula = (p.refout ? reflect(p.init, p.width) : p.init) ^ p.xorout;
      expect(crcCompute(p, new Uint8Array(0))).toBe(formula);
      expect(crcComputeBits(p, new Uint8Array(0))).toBe(formula);
    }
    // By hand: CRC-32/ISO-HDLC of nothing is 0xFFFFFFFF ⊕ 0xFFFFFFFF = 0; CRC-16/IBM-3740 is 0xFFFF.
    expect(crcCompute(crcPreset("CRC-32/ISO-HDLC"), new Uint8Array(0))).toBe(0n);
    expect(crcCompute(crcPreset("CRC-16/IBM-3740"), new Uint8Array(0))).toBe(0xffffn);
    expect(crc32(new Uint8Array(0))).toBe(0);
  });
});

describe("CRC as a bit-aligned block code", () => {
  it('CRC-32/ISO-HDLC: "123456789" as its LSB-first stream gets 0xCBF43926 appended least significant bit first (refout)', () => {
    const p = crcPreset("CRC-32/ISO-HDLC");
    const code = crcCode(p, 72);
    const cw = code.encode(streamOf(CHECK_INPUT, true)) as Uint8Array;
    expect(Array.from(cw.slice(72))).toEqual(Array.from({ length: 32 }, (_, j) => Number((0xcbf43926n >> BigInt(j)) & 1n)));
    expect(code.decode(cw)).toMatchObject({ failure: false, syndrome: new Uint8Array(32) });
  });

  it("CRC-16/XMODEM (refout false): the CRC is appended most significant bit first, and the whole codeword's CRC is then 0 (by the reference)", () => {
    const p = crcPreset("CRC-16/XMODEM");
    const code = crcCode(p, 72);
    const cw = code.encode(streamOf(CHECK_INPUT, false)) as Uint8Array;
    expect(Array.from(cw.slice(72))).toEqual(Array.from({ length: 16 }, (_, j) => Number((0x31c3n >> BigInt(15 - j)) & 1n)));
    expect(bitwiseReference(p, cw)).toBe(0n);
  });

  it("property: every single-bit error and every burst up to the width is detected (poly has a +1 term; Lin & Costello, ch. 5)", () => {
    fc.assert(
      fc.property(fc.constantFrom(...CRC_CATALOGUE), fc.uint8Array({ minLength: 0, maxLength: 60, min: 0, max: 1 }), fc.nat(), fc.integer({ min: 1, max: 64 }), (p, msg, start, len) => {
        const code = crcCode(p, msg.length);
        const cw = code.encode(msg) as Uint8Array;
        expect(code.decode(cw).failure).toBe(false);
        const burst = Math.min(len, p.width, code.n);
        const s = start % (code.n - burst + 1);
        const r = cw.slice();
        // A burst: first and last bits flipped, anything in between.
        r[s]! ^= 1;
        if (burst > 1) r[s + burst - 1]! ^= 1;
        for (let i = s + 1; i < s + burst - 1; i++) r[i]! ^= (start >> (i & 15)) & 1;
        const d = code.decode(r);
        expect(d.failure).toBe(true);
        expect(d.reason).toMatch(/CRC mismatch/);
        expect(d.syndrome.some((b) => b === 1)).toBe(true);
        expect(d.correctedPositions).toEqual([]);
      }),
    );
  });

  it("property: generatorRows span the init = xorout = 0 code: encode(m) ⊕ encode(0) = m·G", () => {
    fc.assert(
      fc.property(fc.constantFrom(...CRC_CATALOGUE), fc.uint8Array({ minLength: 1, maxLength: 24, min: 0, max: 1 }), (p, msg) => {
        const code = crcCode(p, msg.length);
        const g = code.generatorRows!();
        const lin = new Uint8Array(code.n);
        g.forEach((row, i) => msg[i] && row.forEach((b, j) => (lin[j]! ^= b)));
        const a = code.encode(msg) as Uint8Array;
        const z = code.encode(new Uint8Array(msg.length)) as Uint8Array;
        expect(a.map((x, j) => x ^ z[j]!)).toEqual(lin);
      }),
    );
  });

  it("edge case k = 0: the codeword is the CRC of nothing", () => {
    const p = crcPreset("CRC-8/SMBUS");
    const code = crcCode({ ...p, name: p.name }, 0);
    expect(code).toMatchObject({ n: 8, k: 0, name: "CRC-8/SMBUS (8,0)" });
    expect(code.encode(new Uint8Array(0))).toEqual(new Uint8Array(8));
    // Custom parameters without a name are named by width.
    expect(crcCode({ width: 4, poly: 0x3n, init: 0n, refin: false, refout: false, xorout: 0n }, 4).name).toBe("CRC-4 (8,4)");
  });

  it("input errors name the field", () => {
    const p = crcPreset("CRC-16/ARC");
    expectInputError(() => crcPreset("CRC-99/NOPE"), /no CRC preset is called "CRC-99\/NOPE"/, ["name"]);
    expectInputError(() => crcCompute({ ...p, width: 0 }, CHECK_INPUT), /width must be an integer from 1 to 64; got 0/, ["width"]);
    expectInputError(() => crcCompute({ ...p, width: 65 }, CHECK_INPUT), /width must be an integer from 1 to 64/, ["width"]);
    expectInputError(() => crcCompute({ ...p, poly: 0x18005n }, CHECK_INPUT), /poly must be an integer from 0 to 2\^16 − 1/, ["poly"]);
    expectInputError(() => crcCompute({ ...p, poly: 0n }, CHECK_INPUT), /poly must not be zero/, ["poly"]);
    expectInputError(() => crcCompute({ ...p, init: -1n }, CHECK_INPUT), /init must be/, ["init"]);
    expectInputError(() => crcCompute({ ...p, xorout: 5 as unknown as bigint }, CHECK_INPUT), /xorout must be/, ["xorout"]);
    expectInputError(() => crcCompute({ ...p, refin: 1 as unknown as boolean }, CHECK_INPUT), /refin must be true or false/, ["refin"]);
    expectInputError(() => crcComputeBits(p, Uint8Array.of(1, 0, 2)), /bit 2 is 2/, ["data", 2]);
    expectInputError(() => crcCode(p, -1), /k must be an integer from 0/, ["k"]);
    expectInputError(() => crcCode(p, 8).encode(Uint8Array.of(1)), /message has 1 bits; CRC-16\/ARC \(24,8\) takes 8/, ["message"]);
    expectInputError(() => crcCode(p, 8).decode(new Uint8Array(24), [0]), /does not take erasures/, ["erasures"]);
  });
});
