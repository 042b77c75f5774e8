import { beforeAll, describe, expect, it } from "vitest";
import { codeSpec } from "@/lib/api/code-spec";
import { codeWork } from "@/lib/api/code-work";
import { expectFieldError, postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

interface AnalyzeBody {
  code: { n: number; k: number; minimumDistance: number };
  weightDistribution: { terms: { weight: number; count: string }[] };
}

async function analyze(code: unknown): Promise<AnalyzeBody> {
  const res = await postJson("/api/v1/codes/analyze", { code }, auth);
  expect(res.status, res.text).toBe(200);
  return res.body as AnalyzeBody;
}

const dist = (b: AnalyzeBody) => Object.fromEntries(b.weightDistribution.terms.map((t) => [t.weight, Number(t.count)]));

describe("Hamming codes by n and k", () => {
  it("n = 7, k = 4 is the (7,4) code: weight distribution A0 = 1, A3 = 7, A4 = 7, A7 = 1 (MacWilliams & Sloane)", async () => {
    const b = await analyze({ family: "hamming", n: 7, k: 4 });
    expect(b.code).toMatchObject({ n: 7, k: 4, minimumDistance: 3 });
    expect(dist(b)).toEqual({ 0: 1, 3: 7, 4: 7, 7: 1 });
  });

  it("n = 8, k = 4 is the extended (8,4) code: A0 = 1, A4 = 14, A8 = 1 (MacWilliams & Sloane)", async () => {
    const b = await analyze({ family: "hamming", n: 8, k: 4 });
    expect(b.code).toMatchObject({ n: 8, k: 4, minimumDistance: 4 });
    expect(dist(b)).toEqual({ 0: 1, 4: 14, 8: 1 });
  });

  it("n and k encode exactly as r does, and agree with r and extended when given too", async () => {
    const messages = ["1011", "0110", "0000", "1111"];
    const encode = async (code: unknown) => {
      const res = await postJson("/api/v1/encode", { code, messages }, auth);
      expect(res.status, res.text).toBe(200);
      return (res.body as { codewords: unknown[] }).codewords;
    };
    expect(await encode({ family: "hamming", n: 7, k: 4 })).toEqual(await encode({ family: "hamming", r: 3 }));
    expect(await encode({ family: "hamming", n: 8, k: 4, r: 3, extended: true })).toEqual(await encode({ family: "hamming", r: 3, extended: true }));
  });

  it("the work estimate reads the r that n and k resolve to: n = 2^r − 1 and k = n − r for r = 4 (15, 11)", () => {
    const byNk = codeWork(codeSpec.parse({ family: "hamming", n: 15, k: 11 }));
    expect(byNk).toEqual(codeWork(codeSpec.parse({ family: "hamming", r: 4 })));
    expect(byNk).toMatchObject({ n: 15, k: 11 });
  });
});

describe("Hamming specs that do not work: our words, with the fix", () => {
  const call = (code: unknown) => postJson("/api/v1/encode", { code, messages: ["1011"] }, auth);

  it("n = 15, k = 10 is not a Hamming pair: 422 at /code/k naming the k that n = 15 needs", async () => {
    expectFieldError(await call({ family: "hamming", n: 15, k: 10 }), "/code/k", /not a Hamming code: for n = 15, k is 11\..*n = 2\^r − 1, k = n − r/);
  });

  it("n = 9, k = 5 (no Hamming length) lists the pairs", async () => {
    expectFieldError(await call({ family: "hamming", n: 9, k: 5 }), "/code/k", /not a Hamming code\. .*7 and 4.*8 and 4/);
  });

  it("n without k, neither r nor n, a disagreeing r or extended: each says what to give", async () => {
    expectFieldError(await call({ family: "hamming", n: 7 }), "/code/k", /give both/);
    expectFieldError(await call({ family: "hamming" }), "/code/r", /Give `r`.*or `n` and `k`/);
    expectFieldError(await call({ family: "hamming", n: 7, k: 4, r: 4 }), "/code/r", /disagrees with n = 7, k = 4 \(r = 3\)/);
    expectFieldError(await call({ family: "hamming", n: 8, k: 4, extended: false }), "/code/extended", /extended code: drop `extended` or set it to true/);
  });
});

describe("code spec errors are in our words, never the validator's", () => {
  const call = (code: unknown) => postJson("/api/v1/encode", { code, messages: ["1011"] }, auth);
  const RAW = /Invalid (input|discriminator|option)|expected \w+, received|Too (small|big)|expected number to be/;
  it.each([
    ["no code", undefined, "/code", /`code` is required/],
    ["code not an object", "hamming", "/code", /must be an object with a `family`/],
    ["no family", {}, "/code/family", /`family` is required: one of/],
    ["unknown family", { family: "turbo" }, "/code/family", /`family` must be one of .*got "turbo"/],
    ["r as a string", { family: "hamming", r: "3" }, "/code/r", /whole number from 2 to 16; got "3"/],
    ["r too small", { family: "hamming", r: 1 }, "/code/r", /whole number from 2 to 16; got 1/],
    ["repetition without n", { family: "repetition" }, "/code/n", /`n` is required/],
    ["parity kind", { family: "parity", n: 5, parity: "x" }, "/code/parity", /"even" or "odd"/],
    ["golay extended not boolean", { family: "golay", extended: "yes" }, "/code/extended", /true or false/],
    ["linear generator not a list", { family: "linear", generator: "101" }, "/code/generator", /a list of 1 to 4096 rows/],
    ["crc preset not a string", { family: "crc", preset: 5 }, "/code/preset", /catalogue name/],
    ["crc poly of the wrong type", { family: "crc", width: 8, poly: true }, "/code/poly", /hex digits .* or a whole number/],
    ["bch without t", { family: "bch", m: 4 }, "/code/t", /`t` is required/],
    ["rs without k", { family: "rs", m: 8 }, "/code/k", /`k` is required/],
  ])("%s → %s", async (_name, code, pointer, message) => {
    const p = expectFieldError(await call(code), pointer, message);
    for (const e of p.errors!) expect(e.message).not.toMatch(RAW);
  });
});
