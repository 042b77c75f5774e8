/**
 * Deliberately plain BCH (255,239), t = 2, over GF(2^8) with x^8 + x^4 + x^3 + x^2 + 1 (0x11D), for the
 * benchmark: no tables anywhere. Same conventions as lib/core/codes/bch.ts: bit 0 = coefficient of x^254,
 * message bits first, then the 16 parity bits; decode returns the message (uncorrected on failure).
 */

const N = 255;
const K = 239;
const FIELD_POLY = 0x11d;

// g(x) = m1(x)·m3(x) = 267543 octal (Lin & Costello 2004, BCH table, from memory; tests/unit/bch-rs-baselines.test.ts
// checks it against the shipped codec), as 17 bits from x^16 down to x^0.
const GENERATOR = Array.from((0o267543).toString(2), Number);

/** a·b in GF(2^8) by shift-and-add with reduction by 0x11D (Lin & Costello 2004, ch. 2). */
function gfMul(a: number, b: number): number {
  let r = 0;
  for (; b !== 0; b >>>= 1) {
    if (b & 1) r ^= a;
    a <<= 1;
    if (a & 0x100) a ^= FIELD_POLY;
  }
  return r;
}

/** a^e by repeated multiplication. */
function gfPow(a: number, e: number): number {
  let r = 1;
  for (let i = 0; i < e; i++) r = gfMul(r, a);
  return r;
}

/** a^(−1) = a^254 (Fermat). */
function gfInv(a: number): number {
  return gfPow(a, 254);
}

/** Systematic encoding: x^16·m(x) mod g(x) by long division one bit at a time (Lin & Costello 2004, ch. 5). */
export function encode(message: Uint8Array): Uint8Array {
  const work = new Uint8Array(N);
  work.set(message);
  for (let i = 0; i < K; i++) {
    if (work[i] === 0) continue;
    for (let j = 0; j < GENERATOR.length; j++) work[i + j]! ^= GENERATOR[j]!;
  }
  const out = new Uint8Array(N);
  out.set(message);
  out.set(work.subarray(K), K);
  return out;
}

/** r(x) at a field element by Horner's rule with shift-and-add multiplication. */
function evaluateBits(word: Uint8Array, x: number): number {
  let s = 0;
  for (let i = 0; i < N; i++) s = gfMul(s, x) ^ word[i]!;
  return s;
}

/**
 * Peterson's direct solution for t = 2: σ1 = S1, σ2 = (S3 + S1³)/S1, then a Chien search by evaluating
 * Λ(α^(−p)) at every position, α^(−p) by repeated multiplication (Lin & Costello 2004, ch. 6). Fails when S1 = 0 ≠ S3 or the roots are not deg Λ.
 */
export function decode(received: Uint8Array): Uint8Array {
  const s1 = evaluateBits(received, 2);
  const s3 = evaluateBits(received, gfPow(2, 3));
  const message = received.slice(0, K);
  // S1 = S3 = 0 is a codeword; S1 = 0 ≠ S3 needs more than two errors.
  if (s1 === 0) return message;
  const s1Cubed = gfMul(s1, gfMul(s1, s1));
  const sigma2 = gfMul(s3 ^ s1Cubed, gfInv(s1));
  const locator = sigma2 === 0 ? [1, s1] : [1, s1, sigma2];
  const positions: number[] = [];
  const alphaInv = gfInv(2);
  for (let p = 0, x = 1; p < N; p++, x = gfMul(x, alphaInv)) {
    let v = 0;
    for (let i = locator.length - 1; i >= 0; i--) v = gfMul(v, x) ^ locator[i]!;
    if (v === 0) positions.push(N - 1 - p);
  }
  if (positions.length !== locator.length - 1) return message;
  const word = received.slice();
  for (const i of positions) word[i]! ^= 1;
  return word.slice(0, K);
}
