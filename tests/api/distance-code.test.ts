import { beforeAll, describe, expect, it } from "vitest";
import { expectFieldError, expectWorkLimit, postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

const call = (body: unknown) => postJson("/api/v1/distance", body, auth);

async function codeDistance(body: Record<string, unknown>) {
  const res = await call(body);
  expect(res.status, res.text).toBe(200);
  expect(res.body.kind).toBe("code");
  return res.body as { kind: "code"; name: string; n: number; k: number; minimumDistance: number; correctingRadius: number; detectionCapability: number; method: string };
}

/**
 * Minimum distance of the CRC's linear code (init = xorout = 0) computed here: the least weight of
 * m(x)·x^w + (m(x)·x^w mod g(x)) over all non-zero m of k bits (Williams 1993; Lin & Costello ch. 5).
 * Weight does not depend on the bit order of the CRC, so refin/refout do not matter.
 */
function crcMinimumDistance(width: number, poly: number, k: number): number {
  // 32-bit integer XOR below: keep the codeword within 30 bits.
  if (k + width > 30) throw new Error("too long for this brute force");
  const g = (1 << width) | poly;
  let best = Infinity;
  for (let m = 1; m < 1 << k; m++) {
    let r = m << width;
    for (let d = k + width - 1; d >= width; d--) if ((r >> d) & 1) r ^= g << (d - width);
    // r now holds the remainder; the codeword is m·2^w + remainder.
    const weight = m.toString(2).replaceAll("0", "").length + r.toString(2).replaceAll("0", "").length;
    best = Math.min(best, weight);
  }
  return best;
}

describe("POST /distance with { code }: the minimum distance of a code", () => {
  it.each([
    // Hamming codes have dmin 3, extended 4 (Hamming 1950; MacWilliams & Sloane ch. 1).
    ["Hamming r = 3 → dmin 3", { family: "hamming", r: 3 }, 7, 4, 3],
    ["Hamming r = 5 → dmin 3", { family: "hamming", r: 5 }, 31, 26, 3],
    ["extended Hamming r = 3 → dmin 4", { family: "hamming", r: 3, extended: true }, 8, 4, 4],
    ["extended Hamming r = 4 → dmin 4", { family: "hamming", r: 4, extended: true }, 16, 11, 4],
    // Golay 7 and 8 (MacWilliams & Sloane ch. 2; REFERENCES.md).
    ["Golay (23,12) → dmin 7", { family: "golay" }, 23, 12, 7],
    ["Golay (24,12) → dmin 8", { family: "golay", extended: true }, 24, 12, 8],
    // Repetition (n,1): dmin = n; single parity check: 2 (common practice; MacWilliams & Sloane ch. 1).
    ["repetition (6,1) → dmin 6", { family: "repetition", n: 6 }, 6, 1, 6],
    ["parity (9,8) → dmin 2", { family: "parity", n: 9 }, 9, 8, 2],
    // BCH (15,7) t = 2 and (15,5) t = 3: dmin 5 and 7 (Lin & Costello BCH table).
    ["BCH (15,7) → dmin 5", { family: "bch", m: 4, t: 2 }, 15, 7, 5],
    ["BCH (15,5) → dmin 7", { family: "bch", m: 4, t: 3 }, 15, 5, 7],
  ])("%s", async (_name, code, n, k, d) => {
    const b = await codeDistance({ code });
    expect(b).toMatchObject({ n, k, minimumDistance: d, correctingRadius: Math.floor((d - 1) / 2), detectionCapability: d - 1 });
  });

  it.each([
    ["BCH (15,7), g = 721 octal", { family: "bch", m: 4, t: 2 }, 7, 0o721],
    ["BCH (15,5), g = 2467 octal", { family: "bch", m: 4, t: 3 }, 5, 0o2467],
    ["BCH (31,21), g = 3551 octal", { family: "bch", m: 5, t: 2 }, 21, 0o3551],
  ])("%s: dmin equals the least weight of m(x)·g(x) over all messages, enumerated here from the tabulated generator (Lin & Costello BCH table)", async (_name, code, k, g) => {
    let least = Infinity;
    for (let m = 1; m < 2 ** k; m++) {
      let c = 0;
      for (let i = 0; i < k; i++) if ((m >> i) & 1) c ^= g << i;
      least = Math.min(least, c.toString(2).replaceAll("0", "").length);
    }
    const b = await codeDistance({ code });
    expect(b.minimumDistance).toBe(least);
  });

  it.each([
    ["RS (15,11) over GF(16)", { family: "rs", m: 4, k: 11 }, 15, 11],
    ["RS (255,223) over GF(256)", { family: "rs", m: 8, k: 223 }, 255, 223],
    ["RS (26,16), QR parameters", { family: "rs", m: 8, n: 26, k: 16, firstRoot: 0 }, 26, 16],
    ["RS (3,1) over GF(4)", { family: "rs", m: 2, k: 1 }, 3, 1],
  ])("%s → n − k + 1 (MDS, Singleton bound met; MacWilliams & Sloane ch. 11)", async (_name, code, n, k) => {
    const b = await codeDistance({ code });
    expect(b).toMatchObject({ n, k, minimumDistance: n - k + 1, method: "mds-formula" });
  });

  it("CRC-3/GSM with crcMessageBits 4: g = x^3 + x + 1 is primitive, so the (7,4) CRC code is a cyclic Hamming code, dmin 3 (MacWilliams & Sloane ch. 7)", async () => {
    const b = await codeDistance({ code: { family: "crc", preset: "CRC-3/GSM" }, crcMessageBits: 4 });
    expect(b).toMatchObject({ n: 7, k: 4, minimumDistance: 3 });
    expect(crcMinimumDistance(3, 0x3, 4)).toBe(3);
  });

  it("a width-1 CRC with poly 1 (g = x + 1) is a single parity bit: dmin 2 (Williams 1993)", async () => {
    const b = await codeDistance({ code: { family: "crc", width: 1, poly: 1 }, crcMessageBits: 7 });
    expect(b).toMatchObject({ n: 8, k: 7, minimumDistance: 2 });
  });

  it.each([
    ["CRC-8/SMBUS, 16-bit messages", { family: "crc", preset: "CRC-8/SMBUS" }, 8, 0x07, 16],
    ["CRC-8/SMBUS, 12-bit messages", { family: "crc", preset: "CRC-8/SMBUS" }, 8, 0x07, 12],
    ["CRC-16/KERMIT (reflected), 12-bit messages", { family: "crc", preset: "CRC-16/KERMIT" }, 16, 0x1021, 12],
    ["CRC-5/USB, 11-bit messages", { family: "crc", preset: "CRC-5/USB" }, 5, 0x05, 11],
  ])("%s: dmin equals the brute-force minimum weight computed here", async (_name, code, width, poly, k) => {
    const b = await codeDistance({ code, crcMessageBits: k });
    expect(b).toMatchObject({ n: k + width, k });
    expect(b.minimumDistance).toBe(crcMinimumDistance(width, poly, k));
  });

  it("a CRC code without crcMessageBits → /crcMessageBits", async () => {
    expectFieldError(await call({ code: { family: "crc", preset: "CRC-8/SMBUS" } }), "/crcMessageBits");
  });

  it("a code together with a pair of words → /code, one way of calling at a time", async () => {
    expectFieldError(await call({ code: { family: "golay" }, a: "1", b: "0" }), "/code", /one of/);
  });

  it("a code too large to analyse → 422 work-limit at /code with the reason", async () => {
    expectWorkLimit(await call({ code: { family: "bch", m: 7, t: 9 } }), "/code", /both exceed 24/);
  });

  it("a bad code spec points into it: unknown preset → /code/preset", async () => {
    expectFieldError(await call({ code: { family: "crc", preset: "CRC-0/VOID" }, crcMessageBits: 8 }), "/code/preset");
  });
});
