/**
 * Benchmark baseline: the extended Golay (24,12) code written the plain way, to measure the shipped
 * codec against. The generator matrix comes from polynomial long division by
 * g(x) = x^11 + x^10 + x^6 + x^5 + x^4 + x^2 + 1 (systematic cyclic encoding, Lin & Costello 2004, ch. 5)
 * plus an overall parity bit; encoding multiplies by it bit by bit; decoding tries every error pattern
 * of weight 0, 1, 2, 3 and keeps the first that leaves a codeword, else returns the received message
 * bits. Same bit order as lib/core/codes/golay.ts: 12 message bits, 11 parity bits, overall parity.
 */
const g = [1, 1, 0, 0, 0, 1, 1, 1, 0, 1, 0, 1]; // coefficients of x^11 down to x^0

function generatorRow(i: number): Uint8Array {
  // Coefficients of x^22 down to x^0 of x^(11 − i)·x^11, then subtract multiples of g(x).
  const reg = new Uint8Array(23);
  reg[i] = 1;
  for (let d = 0; d < 12; d++) if (reg[d]) for (let j = 0; j < 12; j++) reg[d + j]! ^= g[j]!;
  const row = new Uint8Array(24);
  row[i] = 1;
  for (let j = 12; j < 23; j++) row[j] = reg[j]!;
  let parity = 0;
  for (let j = 0; j < 23; j++) parity ^= row[j]!;
  row[23] = parity;
  return row;
}

const G: Uint8Array[] = Array.from({ length: 12 }, (_, i) => generatorRow(i));

/** Codeword c = m·G over GF(2), one matrix entry at a time. */
export function encode(msg: Uint8Array): Uint8Array {
  const out = new Uint8Array(24);
  for (let j = 0; j < 24; j++) {
    let sum = 0;
    for (let i = 0; i < 12; i++) sum += msg[i]! * G[i]![j]!;
    out[j] = sum % 2;
  }
  return out;
}

function isCodeword(word: Uint8Array): boolean {
  const c = encode(word.slice(0, 12));
  for (let j = 0; j < 24; j++) if (c[j] !== word[j]) return false;
  return true;
}

/** Message after correcting up to 3 errors by trying every error pattern of weight ≤ 3. */
export function decode(word: Uint8Array): Uint8Array {
  const w = word.slice();
  if (isCodeword(w)) return w.slice(0, 12);
  for (let a = 0; a < 24; a++) {
    w[a]! ^= 1;
    if (isCodeword(w)) return w.slice(0, 12);
    for (let b = a + 1; b < 24; b++) {
      w[b]! ^= 1;
      if (isCodeword(w)) return w.slice(0, 12);
      for (let c = b + 1; c < 24; c++) {
        w[c]! ^= 1;
        if (isCodeword(w)) return w.slice(0, 12);
        w[c]! ^= 1;
      }
      w[b]! ^= 1;
    }
    w[a]! ^= 1;
  }
  return word.slice(0, 12);
}
