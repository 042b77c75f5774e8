import { beforeAll, describe, expect, it } from "vitest";
import { expectFieldError, postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

const encode = (body: unknown) => postJson("/api/v1/encode", body, auth);
const decode = (body: unknown) => postJson("/api/v1/decode", body, auth);

interface Encoded {
  code: { bitOrder: string };
  codewords: { codeword: string; crc: string }[];
}
interface Decoded {
  results: { message: string; codeword: string; failure: boolean; crc: { received: string; computed: string } }[];
  failures: number;
}

async function ok<T>(res: Awaited<ReturnType<typeof encode>>): Promise<T> {
  expect(res.status, res.text).toBe(200);
  return res.body as T;
}

const byteBits = (b: number) => b.toString(2).padStart(8, "0");
/** ASCII "123456789" as bits, each byte most significant bit first, as a firmware engineer writes it. */
const DIGITS_MSB_FIRST = [..."123456789"].map((c) => byteBits(c.charCodeAt(0))).join(" ");
/** The same bytes, each written least significant bit first: the order a reflected register takes them in. */
const DIGITS_LSB_FIRST = [..."123456789"].map((c) => [...byteBits(c.charCodeAt(0))].reverse().join("")).join(" ");

interface Params {
  width: number;
  poly: bigint;
  init: bigint;
  refout: boolean;
  xorout: bigint;
}

/**
 * Bit-serial CRC register of Williams's model (1993) fed with bits in the given order (no byte reflection):
 * the register shifts left and XORs poly when the bit falling off differs from the input bit; refout
 * reflects the final register, then xorout.
 */
function serialCrc(p: Params, bits: string): bigint {
  const top = 1n << BigInt(p.width - 1);
  const mask = (1n << BigInt(p.width)) - 1n;
  let reg = p.init;
  for (const c of bits.replace(/ /g, "")) {
    const fall = (reg & top) !== 0n ? 1 : 0;
    reg = (reg << 1n) & mask;
    if (fall ^ Number(c)) reg ^= p.poly;
  }
  if (p.refout) {
    let r = 0n;
    for (let i = 0; i < p.width; i++) r |= ((reg >> BigInt(i)) & 1n) << BigInt(p.width - 1 - i);
    reg = r;
  }
  return reg ^ p.xorout;
}

// CRC catalogue check values of ASCII "123456789", as listed in /work/shared/REFERENCES.md.
const CATALOGUE = [
  { preset: "CRC-32/ISO-HDLC", check: "0xcbf43926", refin: true },
  { preset: "CRC-32/ISCSI", check: "0xe3069283", refin: true },
  { preset: "CRC-16/IBM-3740", check: "0x29b1", refin: false },
  { preset: "CRC-16/KERMIT", check: "0x2189", refin: true },
  { preset: "CRC-16/ARC", check: "0xbb3d", refin: true },
  { preset: "CRC-16/XMODEM", check: "0x31c3", refin: false },
  { preset: "CRC-8/SMBUS", check: "0xf4", refin: false },
];

const KERMIT: Params = { width: 16, poly: 0x1021n, init: 0n, refout: true, xorout: 0n };

describe("CRC over bit strings: bits are bytes written most significant bit first", () => {
  it("the serial register above reproduces CRC-16/KERMIT's catalogue check 0x2189 from the bytes taken least significant bit first (REFERENCES.md)", () => {
    expect(serialCrc(KERMIT, DIGITS_LSB_FIRST)).toBe(0x2189n);
  });

  it.each(CATALOGUE)("$preset: the bits of 123456789 most significant bit first give the catalogue check $check, the same as { text }", async ({ preset, check }) => {
    const body = await ok<Encoded>(await encode({ code: { family: "crc", preset }, messages: [DIGITS_MSB_FIRST, { text: "123456789" }, { hex: "313233343536373839" }] }));
    expect(body.codewords.map((c) => c.crc)).toEqual([check, check, check]);
    // Every form writes the codeword the same way.
    expect(body.codewords[0]!.codeword).toBe(body.codewords[1]!.codeword);
    expect(body.codewords[0]!.codeword.slice(0, 72)).toBe(DIGITS_MSB_FIRST.replace(/ /g, ""));
  });

  it.each(CATALOGUE)("$preset: the encoded frame decodes with crc { received, computed } = $check, and one flipped bit is caught", async ({ preset, check }) => {
    const code = { family: "crc", preset };
    const frame = (await ok<Encoded>(await encode({ code, messages: [DIGITS_MSB_FIRST] }))).codewords[0]!.codeword;
    const flipped = frame.slice(0, 3) + (frame[3] === "0" ? "1" : "0") + frame.slice(4);
    const body = await ok<Decoded>(await decode({ code, words: [frame, flipped] }));
    expect(body.results[0]).toMatchObject({ failure: false, message: DIGITS_MSB_FIRST.replace(/ /g, ""), crc: { received: check, computed: check } });
    expect(body.results[1]!.failure).toBe(true);
    expect(body.results[1]!.crc.received).toBe(check);
    expect(body.results[1]!.crc.computed).not.toBe(check);
  });

  it('bitsAs "stream": the bytes written least significant bit first enter as written and give the catalogue check 0xcbf43926', async () => {
    const body = await ok<Encoded>(await encode({ code: { family: "crc", preset: "CRC-32/ISO-HDLC", bitsAs: "stream" }, messages: [DIGITS_LSB_FIRST] }));
    expect(body.codewords[0]!.crc).toBe("0xcbf43926");
  });
});

describe("CRC over bit strings that are not whole bytes", () => {
  const twelve = "1011 0011 1010";

  it("with refin and no bitsAs: 422 at the message, saying why and naming bitsAs as the fix", async () => {
    const p = expectFieldError(await encode({ code: { family: "crc", preset: "CRC-16/KERMIT" }, messages: [twelve] }), "/messages/0", /12 bits.*whole number of bytes.*bitsAs.*"stream"/);
    expect(p.detail ?? "").not.toMatch(/Invalid|expected/);
  });

  it('with bitsAs "stream": the bits enter as written (serial register above), and the codeword decodes back', async () => {
    const code = { family: "crc", preset: "CRC-16/KERMIT", bitsAs: "stream" };
    const want = "0x" + serialCrc(KERMIT, twelve).toString(16).padStart(4, "0");
    const body = await ok<Encoded>(await encode({ code, messages: [twelve] }));
    expect(body.codewords[0]!.crc).toBe(want);
    const back = await ok<Decoded>(await decode({ code, words: [body.codewords[0]!.codeword] }));
    expect(back.results[0]).toMatchObject({ failure: false, message: twelve.replace(/ /g, ""), crc: { received: want, computed: want } });
  });

  it("without refin no option is needed: CRC-16/XMODEM of 12 bits is m(x)·x^16 mod (x^16 + x^12 + x^5 + 1) (init 0, no xorout; Williams 1993 §7)", async () => {
    let rem = BigInt("0b" + twelve.replace(/ /g, "")) << 16n;
    for (let d = rem.toString(2).length - 1; d >= 16; d = rem.toString(2).length - 1) rem ^= 0x11021n << BigInt(d - 16);
    const body = await ok<Encoded>(await encode({ code: { family: "crc", preset: "CRC-16/XMODEM" }, messages: [twelve] }));
    expect(body.codewords[0]!.crc).toBe("0x" + rem.toString(16).padStart(4, "0"));
  });

  it("decode with refin: a 12-bit message before the CRC is refused without bitsAs", async () => {
    expectFieldError(await decode({ code: { family: "crc", preset: "CRC-16/KERMIT" }, words: ["1".repeat(12 + 16)] }), "/words/0", /12 bits.*bitsAs/);
  });
});

describe("CRC { hex, length }: the first `length` bits", () => {
  it('{ hex: "2", length: 3 } is the 3 bits 001, not a byte (CRC-16/XMODEM, no reflection)', async () => {
    const body = await ok<Encoded>(await encode({ code: { family: "crc", preset: "CRC-16/XMODEM" }, messages: [{ hex: "2", length: 3 }, "001", { hex: "20" }] }));
    const [short, bits, byte] = body.codewords;
    expect(short!.codeword).toHaveLength(3 + 16);
    expect(short).toEqual(bits);
    expect(short!.crc).not.toBe(byte!.crc);
    // Serial register with XMODEM's parameters (catalogue: poly 0x1021, init 0, no reflection, xorout 0).
    expect(short!.crc).toBe("0x" + serialCrc({ width: 16, poly: 0x1021n, init: 0n, refout: false, xorout: 0n }, "001").toString(16).padStart(4, "0"));
  });

  it('{ hex: "31", length: 3 } (a length that would drop a whole digit) is refused at its length, saying how many digits 3 bits take', async () => {
    expectFieldError(await encode({ code: { family: "crc", preset: "CRC-16/XMODEM" }, messages: [{ hex: "31", length: 3 }] }), "/messages/0/length", /from 5 to 8.*3 bits take 1 hex digit/);
  });

  it("{ hex, length: 8 } with refin is a whole byte: the same as { hex } (CRC-16/KERMIT)", async () => {
    const body = await ok<Encoded>(await encode({ code: { family: "crc", preset: "CRC-16/KERMIT" }, messages: [{ hex: "31", length: 8 }, { hex: "31" }] }));
    expect(body.codewords[0]).toEqual(body.codewords[1]);
  });

  it("{ hex, length: 3 } with refin asks for bitsAs; with bitsAs stream it is the 3 bits 001", async () => {
    expectFieldError(await encode({ code: { family: "crc", preset: "CRC-16/KERMIT" }, messages: [{ hex: "2", length: 3 }] }), "/messages/0", /3 bits.*bitsAs/);
    const body = await ok<Encoded>(await encode({ code: { family: "crc", preset: "CRC-16/KERMIT", bitsAs: "stream" }, messages: [{ hex: "2", length: 3 }] }));
    expect(body.codewords[0]!.crc).toBe("0x" + serialCrc(KERMIT, "001").toString(16).padStart(4, "0"));
  });

  it("a bitsAs value outside the two is refused in our words at /code/bitsAs", async () => {
    const p = expectFieldError(await encode({ code: { family: "crc", preset: "CRC-16/KERMIT", bitsAs: "lsb" }, messages: ["1"] }), "/code/bitsAs", /"bytes".*"stream"/);
    expect(JSON.stringify(p)).not.toMatch(/Invalid option|expected one of/);
  });
});
