/**
 * The bench's reading of a POST /decode run (lib/console-client/decode-rows.ts): each word's
 * received, corrected and message symbols in columns counted from 0, and the corrected positions.
 * Responses are the endpoint's own documented examples as it answers them; the received words are
 * checked against a plain reading of the request (0/1 characters, hex digits most significant bit
 * first, UTF-8 bytes for { text }), and the marked positions against received XOR corrected.
 */
import { describe, expect, test } from "vitest";
import { columnGroups, decodeLayout, positionsLegend, receivedSymbols } from "@/lib/console-client/decode-rows";

const hamming74 = {
  input: { code: { family: "hamming", r: 3 }, words: ["1011 110", "1001 010"] },
  body: {
    code: { family: "hamming", name: "Hamming (7,4)", n: 7, k: 4, q: 2 },
    results: [
      { message: "1011", codeword: "1011010", correctedPositions: [4], syndrome: "100", failure: false },
      { message: "1011", codeword: "1011010", correctedPositions: [2], syndrome: "110", failure: false },
    ],
    failures: 0,
  },
};

/** Positions where two equal-length symbol rows differ: the reference for what the decoder changed. */
const differing = (a: string[], b: string[]) => a.flatMap((s, i) => (s === b[i] ? [] : [i]));

describe("reading the request's words back", () => {
  test("0/1 strings drop their group separators; arrays stay; hex is read most significant bit first, cut to its length", () => {
    expect(receivedSymbols("1011 110", 2)).toEqual([..."1011110"]);
    expect(receivedSymbols("10_11", 2)).toEqual([..."1011"]);
    expect(receivedSymbols([1, 0, 1], 2)).toEqual(["1", "0", "1"]);
    // 0xA5 = 1010 0101; length 6 keeps the first six.
    expect(receivedSymbols({ hex: "a5" }, 2)).toEqual([..."10100101"]);
    expect(receivedSymbols({ hex: "0xa5", length: 6 }, 2)).toEqual([..."101001"]);
  });

  test("{ text } is its UTF-8 bytes, each most significant bit first: 'é' is C3 A9", () => {
    expect(receivedSymbols({ text: "1" }, 2)).toEqual([..."00110001"]);
    expect(receivedSymbols({ text: "é" }, 2)).toEqual([..."1100001110101001"]);
  });

  test("symbols of GF(16): an array as given, bits four at a time", () => {
    expect(receivedSymbols([0, 7, 15], 16)).toEqual(["0", "7", "15"]);
    expect(receivedSymbols("0000 0111 1111", 16)).toEqual(["0", "7", "15"]);
    expect(receivedSymbols("000001", 16)).toBeUndefined();
  });

  test("what cannot be read is left out, not guessed", () => {
    expect(receivedSymbols("10x1", 2)).toBeUndefined();
    expect(receivedSymbols(undefined, 2)).toBeUndefined();
  });
});

describe("a decode run laid out", () => {
  test("Hamming (7,4): each word's rows line up, and the marked position is the one that differs", () => {
    const layout = decodeLayout(hamming74.input, hamming74.body)!;
    expect(layout.name).toBe("Hamming (7,4)");
    expect(layout.words.map((w) => w.index)).toEqual([0, 1]);
    const [a, b] = layout.words;
    expect(a).toMatchObject({ received: [..."1011110"], codeword: [..."1011010"], message: [..."1011"], corrected: [4], failure: false });
    expect(b).toMatchObject({ received: [..."1001010"], corrected: [2] });
    for (const w of layout.words) expect(w.corrected).toEqual(differing(w.received!, w.codeword));
  });

  test("a failure keeps its reason; an even repetition tie marks nothing", () => {
    const layout = decodeLayout(
      { code: { family: "repetition", n: 4 }, words: ["0011"] },
      { code: { family: "repetition", name: "repetition (4,1)", q: 2 }, results: [{ message: "0", codeword: "0011", correctedPositions: [], failure: true, reason: "tie: 2 ones and 2 zeros" }] },
    )!;
    expect(layout.words[0]).toMatchObject({ corrected: [], failure: true, reason: "tie: 2 ones and 2 zeros" });
  });

  test("Reed–Solomon (15,9) with erasures: symbols per column, the erased positions kept apart from the corrected ones", () => {
    const received = [0, 0, 0, 0, 7, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0];
    const layout = decodeLayout(
      { code: { family: "rs", m: 4, k: 9 }, words: [received], erasures: [[0, 1]] },
      {
        code: { family: "rs", name: "Reed–Solomon (15,9) over GF(2^4)", q: 16 },
        results: [{ message: Array(9).fill(0), codeword: Array(15).fill(0), correctedPositions: [0, 1, 4], failure: false }],
      },
    )!;
    const w = layout.words[0]!;
    expect(w.received).toEqual(received.map(String));
    expect(w.erased).toEqual([0, 1]);
    expect(w.corrected).toEqual([0, 1, 4]);
    // The error at 4 is where received and corrected differ; the erasures at 0 and 1 held zeros already.
    expect(differing(w.received!, w.codeword)).toEqual([4]);
  });

  test("a received word that does not line up with the codeword is left out; the rest stays", () => {
    const layout = decodeLayout({ words: ["101"] }, { code: { q: 2 }, results: [{ message: "1", codeword: "1011", correctedPositions: [], failure: false }] })!;
    expect(layout.words[0]!.received).toBeUndefined();
    expect(layout.words[0]!.codeword).toEqual([..."1011"]);
  });

  test("anything but a decode result is not laid out", () => {
    expect(decodeLayout(hamming74.input, { type: "about:blank", status: 422 })).toBeNull();
    expect(decodeLayout(hamming74.input, { code: { q: 2 }, results: [{ message: 1 }] })).toBeNull();
  });
});

describe("wrapping and the legend", () => {
  test("columns wrap in groups, the same for every row: 23 positions in 16s are 0–15 and 16–22", () => {
    expect(columnGroups(23, 16)).toEqual([
      { from: 0, to: 16 },
      { from: 16, to: 23 },
    ]);
    expect(columnGroups(7, 16)).toEqual([{ from: 0, to: 7 }]);
    expect(columnGroups(0, 16)).toEqual([]);
  });

  test("the legend lists positions in order, or says none", () => {
    expect(positionsLegend("corrected", [5, 2])).toBe("corrected positions: 2, 5");
    expect(positionsLegend("corrected", [])).toBe("corrected positions: none");
  });
});
