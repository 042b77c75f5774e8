import { describe, expect, it } from "vitest";
import { codeWords } from "@/app/console/(signed-in)/[org]/simulations/words";

/** Codes named as engineers name them: (n, k) from the spec's own parameters (n = 2^r − 1, k = n − r for Hamming; MacWilliams & Sloane 1977). */
describe("a simulation's code in words", () => {
  it.each([
    [undefined, "uncoded"],
    [{ family: "hamming", r: 3 }, "Hamming (7,4)"],
    [{ family: "hamming", r: 4, extended: true }, "extended Hamming (16,11)"],
    [{ family: "hamming", n: 15, k: 11 }, "Hamming (15,11)"],
    [{ family: "golay", extended: true }, "extended Golay (24,12)"],
    [{ family: "repetition", n: 5 }, "repetition (5,1)"],
    [{ family: "parity", n: 8 }, "even parity (8,7)"],
    [{ family: "rs", m: 8, k: 223 }, "Reed–Solomon (255,223) over GF(2^8)"],
    [{ family: "bch", m: 5, t: 3 }, "BCH, n = 31, t = 3"],
    [{ family: "crc", preset: "CRC-32/ISO-HDLC" }, "CRC-32/ISO-HDLC"],
  ])("%j → %s", (code, words) => {
    expect(codeWords(code)).toBe(words);
  });
});
