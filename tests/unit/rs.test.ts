import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { bitsToSymbols, type RsCode, rs, symbolsToBits } from "@/lib/core/codes/rs";
import { InputError } from "@/lib/core/errors";
import { galoisField } from "@/lib/core/gfpm";
import { rng } from "../helpers/rng";

// ---- Plain arithmetic written here, independent of lib/core ----

function plainMul(a: number, b: number, m: number, poly: number): number {
  let r = 0;
  for (; b !== 0; b >>>= 1) {
    if (b & 1) r ^= a;
    a <<= 1;
    if (a & (1 << m)) a ^= poly;
  }
  return r;
}

function plainPow(a: number, e: number, m: number, poly: number): number {
  let r = 1;
  for (let i = 0; i < e; i++) r = plainMul(r, a, m, poly);
  return r;
}

/** S_j = c(β^(b+j)) by Horner with plain multiplication: all zero iff c is a codeword. */
function plainSyndromes(code: RsCode, word: ArrayLike<number>): number[] {
  const { m, primitivePoly: poly, primitiveElement: beta, firstRoot, n, k } = code;
  return Array.from({ length: n - k }, (_, j) => {
    const x = plainPow(beta, firstRoot + j, m, poly);
    let v = 0;
    for (let i = 0; i < n; i++) v = plainMul(v, x, m, poly) ^ word[i]!;
    return v;
  });
}

function distinctPositions(next: () => number, n: number, count: number): number[] {
  const all = Array.from({ length: n }, (_, i) => i);
  for (let i = 0; i < count; i++) {
    const j = i + Math.floor(next() * (n - i));
    [all[i], all[j]] = [all[j]!, all[i]!];
  }
  return all.slice(0, count);
}

function randomSymbols(next: () => number, q: number, length: number): Uint16Array {
  return Uint16Array.from({ length }, () => Math.floor(next() * q));
}

function inputError(fn: () => unknown): InputError {
  try {
    fn();
  } catch (e) {
    if (e instanceof InputError) return e;
    throw e;
  }
  throw new Error("expected an InputError");
}

const sorted = (a: number[]) => [...a].sort((x, y) => x - y);

// ---- QR code example ----

const QR_DATA = [32, 91, 11, 120, 209, 114, 220, 77, 67, 64, 236, 17, 236, 17, 236, 17];
const QR_EC = [196, 35, 39, 119, 235, 215, 231, 226, 93, 23];

describe("the QR code version 1-M example (ISO/IEC 18004 worked example, from memory; REFERENCES.md)", () => {
  const code = rs({ m: 8, n: 26, k: 16, firstRoot: 0 });

  it("encodes the 16 data codewords to the 10 EC codewords 196 35 39 119 235 215 231 226 93 23", () => {
    expect(Array.from(code.encode(Uint16Array.from(QR_DATA)))).toEqual([...QR_DATA, ...QR_EC]);
  });

  it("the generator for 10 EC codewords is α^0, α^251, α^67, α^46, α^61, α^118, α^70, α^64, α^94, α^32, α^45 (ISO/IEC 18004 Annex A, from memory), and agrees with ∏(x − α^i) done by plain arithmetic", () => {
    const f = galoisField(8);
    expect(code.generator.map((c) => f.log(c))).toEqual([0, 251, 67, 46, 61, 118, 70, 64, 94, 32, 45]);
    let g = [1];
    for (let i = 0; i < 10; i++) {
      const root = plainPow(2, i, 8, 0x11d);
      const next = [...g, 0];
      for (let j = 0; j < g.length; j++) next[j + 1]! ^= plainMul(g[j]!, root, 8, 0x11d);
      g = next;
    }
    expect(code.generator).toEqual(g);
  });

  it("decodes back after corrupting up to 5 symbols, and with up to 10 erasures", () => {
    const cw = Uint16Array.from([...QR_DATA, ...QR_EC]);
    const next = rng(18004);
    for (let trial = 0; trial < 200; trial++) {
      const count = trial % 6;
      const positions = distinctPositions(next, 26, count);
      const bad = cw.slice();
      for (const p of positions) bad[p]! ^= 1 + Math.floor(next() * 255);
      const d = code.decode(bad);
      expect(d.failure).toBe(false);
      expect(Array.from(d.message)).toEqual(QR_DATA);
      expect(d.codeword).toEqual(cw);
      expect(d.correctedPositions).toEqual(sorted(positions));
    }
    const erased = [0, 3, 5, 8, 11, 15, 17, 20, 22, 25];
    const bad = cw.slice();
    for (const p of erased) bad[p] = 0;
    const d = code.decode(bad, erased);
    expect(d.failure).toBe(false);
    expect(d.codeword).toEqual(cw);
    expect(d.correctedPositions).toEqual(erased);
  });

  it("six errors are beyond t = 5: failure or another codeword", () => {
    const cw = Uint16Array.from([...QR_DATA, ...QR_EC]);
    const next = rng(6);
    for (let trial = 0; trial < 100; trial++) {
      const bad = cw.slice();
      for (const p of distinctPositions(next, 26, 6)) bad[p]! ^= 1 + Math.floor(next() * 255);
      const d = code.decode(bad);
      if (!d.failure) expect(plainSyndromes(code, d.codeword).every((v) => v === 0)).toBe(true);
    }
  });
});

describe("parameters", () => {
  it("RS (255,223) over GF(2^8): t = 16, dmin = 33, MDS", () => {
    const code = rs({ m: 8, k: 223 });
    expect(code).toMatchObject({
      family: "reed-solomon", name: "Reed–Solomon (255,223) over GF(2^8)", n: 255, k: 223, q: 256, t: 16, dmin: 33, dminIsDesigned: false,
      firstRoot: 1, primitivePoly: 0x11d, primitiveElement: 2, shorten: 0, supportsErasures: true, m: 8,
    });
    expect(code.generator.length).toBe(33);
    expect(code.generator[0]).toBe(1);
    expect(code.messagePositions).toEqual(Array.from({ length: 223 }, (_, i) => i));
  });

  it("n and shorten describe the same length", () => {
    expect(rs({ m: 8, k: 16, shorten: 229 }).n).toBe(26);
    expect(rs({ m: 8, k: 16, n: 26 }).shorten).toBe(229);
    expect(rs({ m: 8, k: 16, n: 26, shorten: 229 }).n).toBe(26);
  });

  it("a shortened code is the full code with leading zero message symbols dropped", () => {
    const full = rs({ m: 4, k: 9 });
    const short = rs({ m: 4, k: 5, shorten: 4 });
    const msg = Uint16Array.of(3, 14, 0, 7, 9);
    expect(short.encode(msg)).toEqual(full.encode(Uint16Array.of(0, 0, 0, 0, ...msg)).slice(4));
  });

  it("CCSDS-style parameters (field 0x187, β = α^11, b = 112; CCSDS 131.0-B, from memory, without the dual basis): codewords have zero plain syndromes", () => {
    const beta = galoisField(8, 0x187).exp(11);
    const code = rs({ m: 8, k: 223, primitivePoly: 0x187, primitiveElement: beta, firstRoot: 112 });
    const next = rng(131);
    const msg = randomSymbols(next, 256, 223);
    const cw = code.encode(msg);
    expect(plainSyndromes(code, cw).every((v) => v === 0)).toBe(true);
    const bad = cw.slice();
    const positions = distinctPositions(next, 255, 16);
    for (const p of positions) bad[p]! ^= 0x5a;
    const d = code.decode(bad);
    expect(d.failure).toBe(false);
    expect(d.message).toEqual(msg);
    expect(d.correctedPositions).toEqual(sorted(positions));
  });

  it("the generator of RS with b = 1 over GF(8) is (x − α)(x − α^2) = x^2 + α^4 x + α^3 (Lin & Costello 2004, ch. 7; product by hand with α^3 = α + 1)", () => {
    const f = galoisField(3);
    expect(rs({ m: 3, k: 5 }).generator).toEqual([1, f.exp(4), f.exp(3)]);
  });
});

describe("decoding", () => {
  it("RS (255,223): 16 symbol errors are corrected; 17 fail or land on a codeword", () => {
    const code = rs({ m: 8, k: 223 });
    const next = rng(255);
    for (let trial = 0; trial < 20; trial++) {
      const msg = randomSymbols(next, 256, 223);
      const cw = code.encode(msg);
      const positions = distinctPositions(next, 255, 16);
      const bad = cw.slice();
      for (const p of positions) bad[p]! ^= 1 + Math.floor(next() * 255);
      const d = code.decode(bad);
      expect(d.failure).toBe(false);
      expect(d.message).toEqual(msg);
      expect(Array.from(d.syndrome)).toEqual(plainSyndromes(code, bad));
      for (const p of distinctPositions(next, 255, 17)) bad[p]! ^= 1 + Math.floor(next() * 255);
      const e = code.decode(bad);
      if (!e.failure) expect(plainSyndromes(code, e.codeword).every((v) => v === 0)).toBe(true);
    }
  });

  it("edge sizes: GF(4) RS (3,1); n − k = 1 (t = 0) detects one error and fills one erasure; GF(2^16) RS (65535,65503) corrects 16 errors", () => {
    const tiny = rs({ m: 2, k: 1 });
    const cw = tiny.encode(Uint16Array.of(3));
    expect(plainSyndromes(tiny, cw)).toEqual([0, 0]);
    const bad = cw.slice();
    bad[1]! ^= 2;
    expect(tiny.decode(bad)).toMatchObject({ failure: false, correctedPositions: [1] });

    const spc = rs({ m: 4, k: 14 });
    const word = spc.encode(Uint16Array.from({ length: 14 }, (_, i) => i));
    const hit = word.slice();
    hit[5]! ^= 9;
    expect(spc.decode(hit).failure).toBe(true);
    expect(spc.decode(hit, [5]).codeword).toEqual(word);

    const big = rs({ m: 16, k: 65503 });
    const next = rng(16);
    const msg = randomSymbols(next, 65536, big.k);
    const long = big.encode(msg);
    const positions = distinctPositions(next, big.n, 16);
    for (const p of positions) long[p]! ^= 1 + Math.floor(next() * 65535);
    const d = big.decode(long);
    expect(d.failure).toBe(false);
    expect(d.message).toEqual(msg);
    expect(d.correctedPositions).toEqual(sorted(positions));
  });

  it("too many erasures is a decoding failure, not bad input", () => {
    const code = rs({ m: 4, k: 11 });
    const d = code.decode(new Uint16Array(15), [0, 1, 2, 3, 4]);
    expect(d).toMatchObject({ failure: true, reason: "5 erasures are more than n − k = 4", correctedPositions: [] });
  });

  it("a codeword decodes with an all-zero syndrome and no corrections; erased positions are reported even when already right", () => {
    const code = rs({ m: 4, k: 9 });
    const cw = code.encode(Uint16Array.of(1, 2, 3, 4, 5, 6, 7, 8, 9));
    expect(code.decode(cw)).toMatchObject({ failure: false, correctedPositions: [] });
    expect(code.decode(cw).syndrome).toEqual(new Uint16Array(6));
    expect(code.decode(cw, [4, 2]).correctedPositions).toEqual([2, 4]);
  });

  // m from 3 to 8, n, k, first root b, primitive element β, and a seed for the message and the damage.
  const params = fc.integer({ min: 3, max: 8 }).chain((m) => {
    const order = 2 ** m - 1;
    return fc.record({
      m: fc.constant(m),
      n: fc.integer({ min: 2, max: order }),
      kFrac: fc.double({ min: 0, max: 1, noNaN: true, maxExcluded: true }),
      firstRoot: fc.integer({ min: 0, max: order - 1 }),
      betaLog: fc.integer({ min: 1, max: order - 1 }),
      seed: fc.integer(),
    });
  });
  const gcd = (a: number, b: number): number => (b === 0 ? a : gcd(b, a % b));
  function codeFor(p: { m: number; n: number; kFrac: number; firstRoot: number; betaLog: number }): RsCode {
    const order = 2 ** p.m - 1;
    let j = p.betaLog;
    while (gcd(j, order) !== 1) j++;
    const k = 1 + Math.floor(p.kFrac * (p.n - 1));
    return rs({ m: p.m, n: p.n, k, firstRoot: p.firstRoot, primitiveElement: galoisField(p.m).exp(j) });
  }

  it("property: any mix with 2·errors + erasures ≤ n − k is corrected, with exactly those positions reported (fast-check)", () => {
    fc.assert(
      fc.property(params, (p) => {
        const code = codeFor(p);
        const next = rng(p.seed);
        const msg = randomSymbols(next, code.q, code.k);
        const cw = code.encode(msg);
        expect(plainSyndromes(code, cw).every((v) => v === 0)).toBe(true);
        const r = code.n - code.k;
        const rho = Math.floor(next() * (r + 1));
        const nu = Math.floor(next() * (Math.floor((r - rho) / 2) + 1));
        const positions = distinctPositions(next, code.n, rho + nu);
        const erasures = positions.slice(0, rho);
        const bad = cw.slice();
        for (const e of erasures) bad[e] = Math.floor(next() * code.q);
        for (const e of positions.slice(rho)) bad[e]! ^= 1 + Math.floor(next() * (code.q - 1));
        const d = code.decode(bad, erasures);
        expect(d.failure).toBe(false);
        expect(d.message).toEqual(msg);
        expect(d.codeword).toEqual(cw);
        expect(d.correctedPositions).toEqual(sorted(positions));
      }),
      { numRuns: 400 },
    );
  });

  it("property: beyond that, failure: true or a valid codeword, never a non-codeword with failure: false (fast-check)", () => {
    fc.assert(
      fc.property(params, (p) => {
        const code = codeFor(p);
        const next = rng(p.seed);
        const cw = code.encode(randomSymbols(next, code.q, code.k));
        const r = code.n - code.k;
        const rho = Math.floor(next() * (r + 1));
        const nu = Math.min(code.n - rho, Math.floor((r - rho) / 2) + 1 + Math.floor(next() * 3));
        const positions = distinctPositions(next, code.n, rho + nu);
        const erasures = positions.slice(0, rho);
        const bad = cw.slice();
        for (const e of positions.slice(rho)) bad[e]! ^= 1 + Math.floor(next() * (code.q - 1));
        const d = code.decode(bad, erasures);
        if (d.failure) {
          expect(d.reason).toBeTruthy();
          expect(d.codeword).toEqual(bad);
        } else {
          expect(plainSyndromes(code, d.codeword).every((v) => v === 0)).toBe(true);
          // Only erased positions and at most ⌊(n − k − ρ)/2⌋ others changed.
          const changed = Array.from(d.codeword).flatMap((v, i) => (v !== bad[i] ? [i] : []));
          expect(changed.filter((i) => !erasures.includes(i)).length).toBeLessThanOrEqual(Math.floor((r - rho) / 2));
        }
      }),
      { numRuns: 400 },
    );
  });

  it("property: random words fail or decode to a codeword (fast-check)", () => {
    fc.assert(
      fc.property(params, (p) => {
        const code = codeFor(p);
        const word = randomSymbols(rng(p.seed), code.q, code.n);
        const d = code.decode(word);
        if (!d.failure) expect(plainSyndromes(code, d.codeword).every((v) => v === 0)).toBe(true);
      }),
      { numRuns: 300 },
    );
  });
});

describe("bits and symbols", () => {
  it("m bits per symbol, most significant bit first, round trip (fast-check)", () => {
    expect(bitsToSymbols(Uint8Array.of(1, 0, 1, 1, 0, 0, 0, 1), 4)).toEqual(Uint16Array.of(11, 1));
    expect(symbolsToBits(Uint16Array.of(11, 1), 4)).toEqual(Uint8Array.of(1, 0, 1, 1, 0, 0, 0, 1));
    fc.assert(
      fc.property(fc.integer({ min: 2, max: 16 }), fc.array(fc.nat()), (m, raw) => {
        const symbols = Uint16Array.from(raw, (v) => v % 2 ** m);
        expect(bitsToSymbols(symbolsToBits(symbols, m), m)).toEqual(symbols);
      }),
    );
  });

  it("errors: a length that is not a multiple of m, a non-bit, a symbol too large, m out of range", () => {
    expect(inputError(() => bitsToSymbols(new Uint8Array(7), 4)).message).toBe("7 bits are not a whole number of 4-bit symbols");
    expect(inputError(() => bitsToSymbols(Uint8Array.of(0, 3, 0, 0), 4)).path).toEqual([1]);
    const e = inputError(() => symbolsToBits(Uint16Array.of(1, 16), 4));
    expect(e.path).toEqual([1]);
    expect(e.message).toBe("symbol 1 is 16; 4-bit symbols are 0 to 15");
    expect(inputError(() => symbolsToBits(Uint16Array.of(1), 17)).path).toEqual(["m"]);
  });
});

describe("errors", () => {
  it("m out of range", () => {
    for (const m of [1, 17]) expect(inputError(() => rs({ m, k: 1 })).path).toEqual(["m"]);
  });

  it("k ≥ n, k < 1", () => {
    const e = inputError(() => rs({ m: 4, n: 10, k: 10 }));
    expect(e.path).toEqual(["k"]);
    expect(e.message).toBe("k must be an integer from 1 to n − 1 = 9; got 10");
    expect(inputError(() => rs({ m: 4, k: 0 })).path).toEqual(["k"]);
    expect(inputError(() => rs({ m: 4, k: 2.5 })).path).toEqual(["k"]);
  });

  it("n > 2^m − 1, shorten too big, n and shorten disagreeing", () => {
    const e = inputError(() => rs({ m: 4, n: 16, k: 3 }));
    expect(e.path).toEqual(["n"]);
    expect(e.message).toBe("n must be an integer from 2 to 15; got 16");
    expect(inputError(() => rs({ m: 4, k: 3, shorten: 14 })).path).toEqual(["shorten"]);
    const s = inputError(() => rs({ m: 4, k: 3, shorten: 12 }));
    expect(s.path).toEqual(["k"]);
    expect(s.message).toBe("k must be an integer from 1 to n − 1 = 2 (n = 2^4 − 1 − shorten); got 3");
    expect(inputError(() => rs({ m: 4, n: 10, k: 3, shorten: 4 })).message).toBe("n = 10 and shorten = 4 disagree: n + shorten must be 2^4 − 1 = 15");
  });

  it("firstRoot out of range", () => {
    const e = inputError(() => rs({ m: 4, k: 3, firstRoot: 15 }));
    expect(e.path).toEqual(["firstRoot"]);
    expect(e.message).toBe("firstRoot must be an integer from 0 to 14; got 15");
    expect(inputError(() => rs({ m: 4, k: 3, firstRoot: -1 })).path).toEqual(["firstRoot"]);
  });

  it("non-primitive polynomial and non-primitive element", () => {
    expect(inputError(() => rs({ m: 8, k: 223, primitivePoly: 0x11b })).path).toEqual(["primitivePoly"]);
    const e = inputError(() => rs({ m: 4, k: 3, primitiveElement: galoisField(4).exp(3) }));
    expect(e.path).toEqual(["primitiveElement"]);
    expect(e.message).toMatch(/has order 5, not 2\^4 − 1 = 15; it is not primitive/);
  });

  it("symbol out of range and wrong lengths", () => {
    const code = rs({ m: 4, k: 9 });
    const e = inputError(() => code.encode(Uint16Array.of(1, 2, 3, 4, 16, 6, 7, 8, 9)));
    expect(e.path).toEqual(["message", 4]);
    expect(e.message).toBe("message symbol 4 is 16; symbols of GF(16) are 0 to 15");
    const short = inputError(() => code.encode(new Uint16Array(8)));
    expect(short.path).toEqual(["message"]);
    expect(short.message).toBe("message has 8 symbols; Reed–Solomon (15,9) over GF(2^4) takes 9");
    expect(inputError(() => code.decode(new Uint16Array(14))).message).toBe("received has 14 symbols; Reed–Solomon (15,9) over GF(2^4) takes 15");
    expect(inputError(() => code.decode(Uint16Array.from({ length: 15 }, (_, i) => (i === 14 ? 99 : 0)))).path).toEqual(["received", 14]);
    // A Uint8Array of symbols is accepted too.
    expect(code.encode(Uint8Array.of(1, 2, 3, 4, 5, 6, 7, 8, 9))).toEqual(code.encode(Uint16Array.of(1, 2, 3, 4, 5, 6, 7, 8, 9)));
  });

  it("erasure positions out of range, not integers, or repeated", () => {
    const code = rs({ m: 4, k: 9 });
    const w = new Uint16Array(15);
    const e = inputError(() => code.decode(w, [1, 15]));
    expect(e.path).toEqual(["erasures", 1]);
    expect(e.message).toBe("erasure 1 is 15; positions are 0 to 14");
    expect(inputError(() => code.decode(w, [-1])).path).toEqual(["erasures", 0]);
    expect(inputError(() => code.decode(w, [0.5])).path).toEqual(["erasures", 0]);
    const r = inputError(() => code.decode(w, [3, 7, 3]));
    expect(r.path).toEqual(["erasures", 2]);
    expect(r.message).toBe("position 3 is erased twice (erasures 0 and 2)");
  });
});
