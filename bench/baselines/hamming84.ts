/**
 * Benchmark baseline: the extended (8,4) Hamming code written the plain way, to measure the shipped codec
 * against. Encoding multiplies the message by G = [I_4 | P | overall parity] bit by bit; decoding tries all
 * 16 codewords and keeps the first nearest (minimum-distance decoding, MacWilliams & Sloane 1977, ch. 1),
 * which is the unique one whenever at most one bit is wrong. Same bit order as lib/core/codes/hamming.ts
 * with r = 3, extended: message bits first, then 3 parity bits, then the overall parity bit.
 */
const G: Uint8Array[] = [
  Uint8Array.of(1, 0, 0, 0, 0, 1, 1, 1),
  Uint8Array.of(0, 1, 0, 0, 1, 0, 1, 1),
  Uint8Array.of(0, 0, 1, 0, 1, 1, 0, 1),
  Uint8Array.of(0, 0, 0, 1, 1, 1, 1, 0),
];

/** Codeword c = m·G over GF(2), one matrix entry at a time. */
export function encode(msg: Uint8Array): Uint8Array {
  const out = new Uint8Array(8);
  for (let j = 0; j < 8; j++) {
    let sum = 0;
    for (let i = 0; i < 4; i++) sum += msg[i]! * G[i]![j]!;
    out[j] = sum % 2;
  }
  return out;
}

/** Message of the first codeword nearest to the word, found by comparing with every codeword. */
export function decode(word: Uint8Array): Uint8Array {
  let best = new Uint8Array(4);
  let bestDistance = Infinity;
  for (let m = 0; m < 16; m++) {
    const msg = Uint8Array.of((m >> 3) & 1, (m >> 2) & 1, (m >> 1) & 1, m & 1);
    const c = encode(msg);
    let distance = 0;
    for (let j = 0; j < 8; j++) if (c[j] !== word[j]) distance++;
    if (distance < bestDistance) {
      bestDistance = distance;
      best = msg;
    }
  }
  return best;
}
