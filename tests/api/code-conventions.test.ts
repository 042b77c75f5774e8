import { beforeAll, describe, expect, it } from "vitest";
import { postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

async function summaryOf(code: unknown, message: unknown): Promise<Record<string, unknown>> {
  const res = await postJson("/api/v1/encode", { code, messages: [message] }, auth);
  expect(res.status, res.text).toBe(200);
  return (res.body as { code: Record<string, unknown> }).code;
}

// The field polynomials are the primitive ones that GF(2^m) tables list first: x^8 + x^4 + x^3 + x^2 + 1 = 0x11d
// (the QR-code field, ISO/IEC 18004) and x^4 + x + 1 = 0x13 (Lin & Costello, table of primitive polynomials).
describe("the code summary echoes the conventions in force", () => {
  it("Reed–Solomon left open: firstRoot 1, field 0x11d, α = 2, full length 255", async () => {
    const code = await summaryOf({ family: "rs", m: 8, k: 239 }, new Array(239).fill(0));
    expect(code.conventions).toEqual({ firstRoot: 1, primitivePoly: "0x11d", primitiveElement: 2, n: 255 });
  });

  it("Reed–Solomon as stated for QR codes: firstRoot 0 and n 26 come back as given", async () => {
    const code = await summaryOf({ family: "rs", m: 8, n: 26, k: 16, firstRoot: 0, primitivePoly: "0x11d" }, new Array(16).fill(1));
    expect(code.conventions).toEqual({ firstRoot: 0, primitivePoly: "0x11d", primitiveElement: 2, n: 26 });
  });

  it("BCH left open: the field polynomial x^4 + x + 1 = 0x13; stated x^4 + x^3 + 1 = 0x19 comes back", async () => {
    expect((await summaryOf({ family: "bch", m: 4, t: 2 }, "1010011")).conventions).toEqual({ primitivePoly: "0x13" });
    expect((await summaryOf({ family: "bch", m: 4, t: 2, primitivePoly: 0x19 }, "1010011")).conventions).toEqual({ primitivePoly: "0x19" });
  });

  it("CRC keeps its full parameter echo: CRC-32/ISO-HDLC is poly 0x04c11db7, init and xorout 0xffffffff, reflected (catalogue)", async () => {
    const code = await summaryOf({ family: "crc", preset: "CRC-32/ISO-HDLC" }, { text: "123456789" });
    expect(code.crc).toEqual({ width: 32, poly: "0x04c11db7", init: "0xffffffff", refin: true, refout: true, xorout: "0xffffffff" });
    expect(code.conventions).toBeUndefined();
  });

  it("a Hamming code has no convention left open and no conventions field", async () => {
    expect((await summaryOf({ family: "hamming", r: 3 }, "1011")).conventions).toBeUndefined();
  });
});
