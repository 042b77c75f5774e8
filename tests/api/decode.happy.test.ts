import { crc32 } from "node:zlib";
import { beforeAll, describe, expect, it } from "vitest";
import { postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";
import { rng } from "../helpers/rng";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

type Word = string | number[];
interface DecodeResult {
  message: Word;
  codeword: Word;
  correctedPositions: number[];
  syndrome: Word;
  failure: boolean;
  reason?: string;
  crc?: { received: string; computed: string };
}
interface DecodeBody {
  code: { n: number; k: number; q: number; supportsErasures: boolean };
  results: DecodeResult[];
  failures: number;
}

async function encodeAll(code: unknown, messages: Word[]): Promise<Word[]> {
  const res = await postJson("/api/v1/encode", { code, messages }, auth);
  expect(res.status, res.text).toBe(200);
  return (res.body as { codewords: { codeword: Word }[] }).codewords.map((c) => c.codeword);
}

async function decodeOk(body: unknown): Promise<DecodeBody> {
  const res = await postJson("/api/v1/decode", body, auth);
  expect(res.status, res.text).toBe(200);
  return res.body as DecodeBody;
}

// ---- Plain helpers written here, independent of lib/core ----

const int = (next: () => number, below: number) => Math.floor(next() * below);

/** `count` distinct positions out of 0..n−1 (partial Fisher–Yates), ascending. */
function positions(next: () => number, n: number, count: number): number[] {
  const all = Array.from({ length: n }, (_, i) => i);
  for (let i = 0; i < count; i++) {
    const j = i + int(next, n - i);
    [all[i], all[j]] = [all[j]!, all[i]!];
  }
  return all.slice(0, count).sort((a, b) => a - b);
}

const randomBits = (next: () => number, len: number) => Array.from({ length: len }, () => (next() < 0.5 ? "0" : "1")).join("");
const flip = (w: string, at: readonly number[]) => [...w].map((c, i) => (at.includes(i) ? (c === "0" ? "1" : "0") : c)).join("");
const zeros = (w: Word) => (typeof w === "string" ? /^0*$/.test(w) : w.every((s) => s === 0));

/** Binary long division: a(x) mod g(x), first character = highest power. */
function polyMod(a: bigint, g: bigint): bigint {
  const dg = g.toString(2).length - 1;
  for (let d = a.toString(2).length - 1; d >= dg && a !== 0n; d = a.toString(2).length - 1) a ^= g << BigInt(d - dg);
  return a;
}

/** GF(2^m) multiplication by shift and add, reducing by the field polynomial (Lin & Costello ch. 2). */
function gfMul(a: number, b: number, m: number, poly: number): number {
  let r = 0;
  for (; b !== 0; b >>>= 1) {
    if (b & 1) r ^= a;
    a <<= 1;
    if (a & (1 << m)) a ^= poly;
  }
  return r;
}

/**
 * Binary round trip through the API: seeded random messages, ≤ t random bit errors added here,
 * decoded → the message back, correctedPositions = the error positions, failure false.
 */
async function binaryRoundTrip(code: unknown, k: number, t: number, seed: number, count = 60) {
  const next = rng(seed);
  const messages = Array.from({ length: count }, () => randomBits(next, k));
  const codewords = (await encodeAll(code, messages)) as string[];
  const errors = codewords.map((c) => positions(next, c.length, int(next, t + 1)));
  // Every count 0..t appears with 60 draws for the t used here; make sure the test exercises the limit.
  expect(errors.some((e) => e.length === t)).toBe(true);
  const body = await decodeOk({ code, words: codewords.map((c, i) => flip(c, errors[i]!)) });
  expect(body.failures).toBe(0);
  body.results.forEach((r, i) => {
    expect(r.failure, r.reason).toBe(false);
    expect(r.message).toBe(messages[i]);
    expect(r.codeword).toBe(codewords[i]);
    expect(r.correctedPositions).toEqual(errors[i]);
    expect(zeros(r.syndrome)).toBe(errors[i]!.length === 0);
  });
  return body;
}

describe("POST /decode: up to t errors are corrected, for every family", () => {
  it.each([
    ["repetition (7,1), t = 3", { family: "repetition", n: 7 }, 1, 3],
    ["Hamming (7,4), t = 1", { family: "hamming", r: 3 }, 4, 1],
    ["Hamming (31,26), t = 1", { family: "hamming", r: 5 }, 26, 1],
    ["extended Hamming (16,11), t = 1", { family: "hamming", r: 4, extended: true }, 11, 1],
    ["Golay (23,12), t = 3", { family: "golay" }, 12, 3],
    ["extended Golay (24,12), t = 3", { family: "golay", extended: true }, 12, 3],
    ["linear (6,3) from G, dmin 3, t = 1", { family: "linear", generator: ["100110", "010101", "001011"] }, 3, 1],
    ["linear (7,4) from a cyclic Hamming H, t = 1", { family: "linear", parityCheck: ["1110100", "0111010", "1101001"] }, 4, 1],
    ["BCH (15,7), t = 2", { family: "bch", m: 4, t: 2 }, 7, 2],
    ["BCH (31,16), t = 3", { family: "bch", m: 5, t: 3 }, 16, 3],
    ["BCH (63,51) shortened by 10 → (53,41), t = 2", { family: "bch", m: 6, t: 2, shorten: 10 }, 41, 2],
  ])("%s", async (_name, code, k, t) => {
    // t from the definition of each code: repetition ⌊(n−1)/2⌋, Hamming 1, Golay 3 (MacWilliams & Sloane), BCH designed t (Lin & Costello).
    const body = await binaryRoundTrip(code, k, t, k * 1000 + t);
    expect(body.code.k).toBe(k);
  });

  /** RS round trip: ≤ t random symbol errors with random non-zero values (Lin & Costello ch. 7: t = ⌊(n−k)/2⌋). */
  it.each([
    ["RS (7,3) over GF(8), t = 2", { family: "rs", m: 3, k: 3 }, 7, 3],
    ["RS (15,9) over GF(16), t = 3", { family: "rs", m: 4, k: 9 }, 15, 9],
    ["RS (26,16) over GF(256), QR parameters, t = 5", { family: "rs", m: 8, n: 26, k: 16, firstRoot: 0 }, 26, 16],
    ["RS (255,223) over GF(256), t = 16", { family: "rs", m: 8, k: 223 }, 255, 223],
  ])("%s", async (_name, code, n, k) => {
    const q = 2 ** code.m;
    const t = Math.floor((n - k) / 2);
    const next = rng(n * 31 + k);
    const messages = Array.from({ length: 40 }, () => Array.from({ length: k }, () => int(next, q)));
    const codewords = (await encodeAll(code, messages)) as number[][];
    const errors = codewords.map(() => positions(next, n, int(next, t + 1)));
    expect(errors.some((e) => e.length === t)).toBe(true);
    const received = codewords.map((c, i) => c.map((s, p) => (errors[i]!.includes(p) ? s ^ (1 + int(next, q - 1)) : s)));
    const body = await decodeOk({ code, words: received });
    body.results.forEach((r, i) => {
      expect(r.failure, r.reason).toBe(false);
      expect(r.message).toEqual(messages[i]);
      expect(r.codeword).toEqual(codewords[i]);
      expect(r.correctedPositions).toEqual(errors[i]);
      expect(zeros(r.syndrome)).toBe(errors[i]!.length === 0);
    });
  });

  it("RS (15,9) with errors and erasures, 2·errors + erasures ≤ n − k = 6: all recovered; erasures count as corrected positions", async () => {
    const code = { family: "rs", m: 4, k: 9 };
    const next = rng(0xe5);
    const combos: [number, number][] = [];
    for (let e = 0; e <= 3; e++) for (let f = 0; 2 * e + f <= 6; f++) combos.push([e, f]);
    const cases = [...combos, ...combos, ...combos];
    const messages = cases.map(() => Array.from({ length: 9 }, () => int(next, 16)));
    const codewords = (await encodeAll(code, messages)) as number[][];
    const damage = cases.map(([e, f]) => {
      const at = positions(next, 15, e + f);
      const erased = positions(next, at.length, f).map((j) => at[j]!);
      return { errors: at.filter((p) => !erased.includes(p)), erased };
    });
    const received = codewords.map((c, i) =>
      c.map((s, p) => (damage[i]!.errors.includes(p) ? s ^ (1 + int(next, 15)) : damage[i]!.erased.includes(p) ? int(next, 16) : s)),
    );
    const body = await decodeOk({ code, words: received, erasures: damage.map((d) => d.erased) });
    expect(body.failures).toBe(0);
    body.results.forEach((r, i) => {
      expect(r.failure, `case ${JSON.stringify(cases[i])}: ${r.reason}`).toBe(false);
      expect(r.message).toEqual(messages[i]);
      expect(r.correctedPositions).toEqual([...damage[i]!.errors, ...damage[i]!.erased].sort((a, b) => a - b));
    });
  });

  it("RS (26,16): n − k = 10 erasures alone are all filled", async () => {
    const code = { family: "rs", m: 8, n: 26, k: 16, firstRoot: 0 };
    const next = rng(10);
    const message = Array.from({ length: 16 }, () => int(next, 256));
    const [codeword] = (await encodeAll(code, [message])) as number[][];
    const erased = positions(next, 26, 10);
    const body = await decodeOk({ code, words: [codeword!.map((s, p) => (erased.includes(p) ? 0 : s))], erasures: [erased] });
    expect(body.results[0]).toMatchObject({ failure: false, message, correctedPositions: erased });
  });

  it("RS received words as bits (m per symbol, most significant first) decode like symbol arrays", async () => {
    const code = { family: "rs", m: 4, k: 9 };
    const message = [1, 2, 3, 4, 5, 6, 7, 8, 9];
    const [codeword] = (await encodeAll(code, [message])) as number[][];
    const received = codeword!.map((s, p) => (p === 3 || p === 12 ? s ^ 0b1010 : s));
    const bits = received.map((s) => s.toString(2).padStart(4, "0")).join("");
    const body = await decodeOk({ code, words: [received, bits] });
    expect(body.results[1]).toEqual(body.results[0]);
    expect(body.results[0]).toMatchObject({ failure: false, message, correctedPositions: [3, 12] });
  });
});

describe("POST /decode: syndromes as documented", () => {
  it("Hamming (7,4): a single error at p gives the syndrome = H's column p (the documented column numbers 3, 5, 6, 7, 4, 2, 1, MSB first)", async () => {
    const code = { family: "hamming", r: 3 };
    const [c] = (await encodeAll(code, ["1011"])) as string[];
    const columns = [3, 5, 6, 7, 4, 2, 1];
    const body = await decodeOk({ code, words: columns.map((_, p) => flip(c!, [p])) });
    body.results.forEach((r, p) => {
      expect(r.syndrome).toBe(columns[p]!.toString(2).padStart(3, "0"));
      expect(r.correctedPositions).toEqual([p]);
    });
  });

  it("BCH (15,7): the syndrome is r(x) mod g(x), g = 721 octal, computed here by long division", async () => {
    const code = { family: "bch", m: 4, t: 2 };
    const next = rng(721);
    const messages = Array.from({ length: 30 }, () => randomBits(next, 7));
    const codewords = (await encodeAll(code, messages)) as string[];
    const received = codewords.map((c) => flip(c, positions(next, 15, int(next, 3))));
    const body = await decodeOk({ code, words: received });
    body.results.forEach((r, i) => expect(r.syndrome).toBe(polyMod(BigInt(`0b${received[i]}`), 0o721n).toString(2).padStart(8, "0")));
  });

  it("RS (15,9): the syndrome is S_j = r(α^(1+j)), j = 0..5, evaluated here by Horner in GF(16) with x^4 + x + 1", async () => {
    const code = { family: "rs", m: 4, k: 9 };
    const received = [[0, 0, 0, 0, 7, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0], [3, 1, 4, 1, 5, 9, 2, 6, 5, 3, 5, 8, 9, 7, 9]];
    const body = await decodeOk({ code, words: received });
    body.results.forEach((r, i) => {
      const expected = Array.from({ length: 6 }, (_, j) => {
        let x = 1;
        for (let e = 0; e < 1 + j; e++) x = gfMul(x, 2, 4, 0x13);
        return received[i]!.reduce((v, s) => gfMul(v, x, 4, 0x13) ^ s, 0);
      });
      expect(r.syndrome).toEqual(expected);
    });
  });
});

describe("POST /decode: detected failures", () => {
  it("extended Hamming (8,4): every one of the 28 double errors on a codeword is detected (failure true), nothing changed (SEC-DED, MacWilliams & Sloane ch. 1)", async () => {
    const code = { family: "hamming", r: 3, extended: true };
    const [c] = (await encodeAll(code, ["0110"])) as string[];
    const words: string[] = [];
    for (let a = 0; a < 8; a++) for (let b = a + 1; b < 8; b++) words.push(flip(c!, [a, b]));
    const body = await decodeOk({ code, words });
    expect(body.failures).toBe(28);
    body.results.forEach((r, i) => {
      expect(r.failure).toBe(true);
      expect(r.reason).toMatch(/double error/);
      expect(r.correctedPositions).toEqual([]);
      expect(r.codeword).toBe(words[i]);
    });
  });

  it("repetition (4,1): every 2-against-2 word is a tie → failure true with the reason, not a guess (odd n avoids ties)", async () => {
    const words = ["0011", "0101", "0110", "1001", "1010", "1100"];
    const body = await decodeOk({ code: { family: "repetition", n: 4 }, words: [...words, "0111", "0001"] });
    expect(body.failures).toBe(6);
    body.results.slice(0, 6).forEach((r) => {
      expect(r.failure).toBe(true);
      expect(r.reason).toMatch(/tie/);
      expect(r.correctedPositions).toEqual([]);
    });
    // 3 against 1 is a majority.
    expect(body.results[6]).toMatchObject({ failure: false, message: "1", codeword: "1111", correctedPositions: [0] });
    expect(body.results[7]).toMatchObject({ failure: false, message: "0", codeword: "0000", correctedPositions: [3] });
  });

  it("extended Golay (24,12): 4 errors are always detected (dmin 8: a weight-4 coset has no unique leader) → failure true", async () => {
    const code = { family: "golay", extended: true };
    const next = rng(24);
    const messages = Array.from({ length: 50 }, () => randomBits(next, 12));
    const codewords = (await encodeAll(code, messages)) as string[];
    const body = await decodeOk({ code, words: codewords.map((c) => flip(c, positions(next, 24, 4))) });
    expect(body.failures).toBe(50);
    for (const r of body.results) expect(r.failure).toBe(true);
  });

  it("RS (15,9): 2·errors + erasures > n − k is reported as a failure, not miscorrected silently", async () => {
    // 7 erasures > n − k = 6.
    const body = await decodeOk({ code: { family: "rs", m: 4, k: 9 }, words: [new Array(15).fill(0)], erasures: [[0, 1, 2, 3, 4, 5, 6]] });
    expect(body.results[0]).toMatchObject({ failure: true });
    expect(body.results[0]!.reason).toMatch(/7 erasures/);
  });
});

describe("POST /decode: CRC verification", () => {
  it("CRC-16/KERMIT: the bytes of 123456789 then their CRC 0x2189 low byte first verify (catalogue check value)", async () => {
    const body = await decodeOk({ code: { family: "crc", preset: "CRC-16/KERMIT" }, words: [{ hex: "313233343536373839 8921" }] });
    expect(body.results[0]).toMatchObject({ failure: false, correctedPositions: [], syndrome: "0".repeat(16), crc: { received: "0x2189", computed: "0x2189" } });
    // The message is written as it was sent: the bytes, most significant bit first (refin reverses them only inside the register).
    const written = [..."123456789"].map((ch) => ch.charCodeAt(0).toString(2).padStart(8, "0")).join("");
    expect(body.results[0]!.message).toBe(written);
  });

  it("CRC-16/XMODEM (no reflection): 123456789 then 0x31C3 high byte first verifies (catalogue check value)", async () => {
    const body = await decodeOk({ code: { family: "crc", preset: "CRC-16/XMODEM" }, words: [{ hex: "313233343536373839 31c3" }, { hex: "313233343536373839 c331" }] });
    expect(body.results[0]!.failure).toBe(false);
    expect(body.results[1]!.failure).toBe(true);
    expect(body.failures).toBe(1);
  });

  it("CRC-32/ISO-HDLC: seeded random frames with zlib's crc32 appended little-endian verify; one flipped bit in each → failure", async () => {
    const next = rng(32);
    const frames = [1, 5, 16, 40, 100].map((len) => {
      const data = Buffer.from(Array.from({ length: len }, () => int(next, 256)));
      const crc = Buffer.alloc(4);
      crc.writeUInt32LE(crc32(data));
      return Buffer.concat([data, crc]);
    });
    const good = await decodeOk({ code: { family: "crc", preset: "CRC-32/ISO-HDLC" }, words: frames.map((f) => ({ hex: f.toString("hex") })) });
    expect(good.failures).toBe(0);
    good.results.forEach((r, i) => expect((r.message as string).length).toBe(8 * (frames[i]!.length - 4)));

    const broken = frames.map((f) => {
      const copy = Buffer.from(f);
      const bit = int(next, copy.length * 8);
      copy[bit >> 3]! ^= 1 << (bit & 7);
      return copy;
    });
    const bad = await decodeOk({ code: { family: "crc", preset: "CRC-32/ISO-HDLC" }, words: broken.map((f) => ({ hex: f.toString("hex") })) });
    expect(bad.failures).toBe(frames.length);
    for (const r of bad.results) {
      expect(r.failure).toBe(true);
      expect(r.reason).toMatch(/mismatch/);
      expect(r.correctedPositions).toEqual([]);
    }
  });

  it("CRC-16/KERMIT: a single flipped bit at any of the 88 frame positions is detected (a generator with two or more terms catches every single error, Lin & Costello ch. 5)", async () => {
    const code = { family: "crc", preset: "CRC-16/KERMIT" };
    const ok = await decodeOk({ code, words: [{ hex: "3132333435363738398921" }] });
    const frame = ok.results[0]!.codeword as string;
    expect(frame).toHaveLength(88);
    // The codeword as written reads back as the same, valid frame.
    expect((await decodeOk({ code, words: [frame] })).failures).toBe(0);
    const body = await decodeOk({ code, words: Array.from({ length: 88 }, (_, p) => flip(frame, [p])) });
    expect(body.failures).toBe(88);
  });
});

describe("POST /decode: single parity check", () => {
  it("(8,7) even: one erasure per word is filled from the parity, wherever it is", async () => {
    const code = { family: "parity", n: 8 };
    const next = rng(8);
    const messages = Array.from({ length: 8 }, () => randomBits(next, 7));
    const codewords = (await encodeAll(code, messages)) as string[];
    // Erase position i of word i, writing the wrong value there.
    const words = codewords.map((c, i) => flip(c, [i]));
    const body = await decodeOk({ code, words, erasures: codewords.map((_, i) => [i]) });
    body.results.forEach((r, i) => expect(r).toMatchObject({ failure: false, message: messages[i], codeword: codewords[i], correctedPositions: [i] }));
  });

  it("(8,7) odd: an erasure is filled to make the weight odd", async () => {
    const body = await decodeOk({ code: { family: "parity", n: 8, parity: "odd" }, words: ["10110000"], erasures: [[7]] });
    // 1011000 has weight 3 (odd): the parity bit is 0.
    expect(body.results[0]).toMatchObject({ failure: false, codeword: "10110000", message: "1011000", correctedPositions: [7] });
    const body2 = await decodeOk({ code: { family: "parity", n: 8, parity: "odd" }, words: ["10100000"], erasures: [[7]] });
    expect(body2.results[0]).toMatchObject({ codeword: "10100001" });
  });

  it("one or three bit errors are detected (failure); two are not (dmin 2: even-weight patterns are codewords)", async () => {
    const code = { family: "parity", n: 8 };
    const [c] = (await encodeAll(code, ["1100101"])) as string[];
    const body = await decodeOk({ code, words: [flip(c!, [2]), flip(c!, [0, 3, 7]), flip(c!, [1, 6])] });
    expect(body.results.map((r) => r.failure)).toEqual([true, true, false]);
    expect(body.results[0]!.syndrome).toBe("1");
  });

  it("words without erasures may send an empty erasure list beside words that have one", async () => {
    const body = await decodeOk({ code: { family: "parity", n: 4 }, words: ["1010", "1000"], erasures: [[], [2]] });
    expect(body.results[0]).toMatchObject({ failure: false, correctedPositions: [] });
    expect(body.results[1]).toMatchObject({ failure: false, codeword: "1010", correctedPositions: [2] });
  });
});

describe("POST /decode: metering", () => {
  // The documented rule: per word 16·n work for Hamming and 8·n for repetition; 1 compute unit per started 2^22 work units, at least 1.
  const units = (work: number) => Math.max(1, Math.ceil(work / 2 ** 22));

  it("a small batch costs 1 unit", async () => {
    const res = await postJson("/api/v1/decode", { code: { family: "hamming", r: 3 }, words: ["1011010"] }, auth);
    expect(res.status, res.text).toBe(200);
    expect(Number(res.headers["x-compute-units"])).toBe(1);
  });

  it("1,024 Hamming (15,11) words: 1,024 · 16 · 15 = 245,760 work → 1 unit", async () => {
    const res = await postJson("/api/v1/decode", { code: { family: "hamming", r: 4 }, words: new Array(1024).fill("0".repeat(15)) }, auth);
    expect(res.status, res.text).toBe(200);
    expect(Number(res.headers["x-compute-units"])).toBe(units(1024 * 16 * 15));
    expect(units(1024 * 16 * 15)).toBe(1);
  });

  it("the charge grows with the batch: 1, 9 and 17 repetition (65,535,1) words (8 · 65,535 work each) cost 1, 2 and 3 units", async () => {
    const got: number[] = [];
    for (const count of [1, 9, 17]) {
      // All-one and all-zero words in turn: majority decoding gives 1, 0, 1, …
      const words = Array.from({ length: count }, (_, i) => (i % 2 ? { hex: "0".repeat(16384), length: 65535 } : { hex: "f".repeat(16384), length: 65535 }));
      const res = await postJson("/api/v1/decode", { code: { family: "repetition", n: 65535 }, words }, auth);
      expect(res.status, res.text).toBe(200);
      expect(res.body.results.map((r: DecodeResult) => r.message)).toEqual(words.map((_, i) => (i % 2 ? "0" : "1")));
      got.push(Number(res.headers["x-compute-units"]));
      expect(got.at(-1)).toBe(units(count * 8 * 65535));
    }
    expect(got).toEqual([1, 2, 3]);
  });
});
