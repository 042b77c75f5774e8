/**
 * Benchmark baseline: Hamming (7,4) on a binary symmetric channel simulated the plain way, one bit at a
 * time: 4 message bits and 7 channel flips each drawn with Math.random, encoding by the generator matrix
 * G = [I_4 | P] entry by entry, decoding by syndrome H·rᵀ (H = [Pᵀ | I_3]) and flipping the position whose
 * column equals it (Hamming 1950; MacWilliams & Sloane 1977, ch. 1). Same bit order as
 * lib/core/codes/hamming.ts with r = 3: message bits first, then the 3 parity bits.
 */
const G = [
  [1, 0, 0, 0, 0, 1, 1],
  [0, 1, 0, 0, 1, 0, 1],
  [0, 0, 1, 0, 1, 1, 0],
  [0, 0, 0, 1, 1, 1, 1],
];
/** H = [Pᵀ | I_3], row by row. */
const H = [0, 1, 2].map((r) => [...G.map((row) => row[4 + r]!), ...[0, 1, 2].map((j) => (j === r ? 1 : 0))]);

/** Frames of Hamming (7,4) over BSC(p): information bit errors and frame errors. */
export function simulateHamming74Bsc(p: number, frames: number): { bitErrors: number; frameErrors: number } {
  const msg = [0, 0, 0, 0];
  const word = [0, 0, 0, 0, 0, 0, 0];
  const syndrome = [0, 0, 0];
  let bitErrors = 0;
  let frameErrors = 0;
  for (let f = 0; f < frames; f++) {
    for (let i = 0; i < 4; i++) msg[i] = Math.random() < 0.5 ? 1 : 0;
    for (let j = 0; j < 7; j++) {
      let s = 0;
      for (let i = 0; i < 4; i++) s ^= msg[i]! & G[i]![j]!;
      word[j] = s ^ (Math.random() < p ? 1 : 0);
    }
    let any = 0;
    for (let r = 0; r < 3; r++) {
      let s = 0;
      for (let j = 0; j < 7; j++) s ^= H[r]![j]! & word[j]!;
      syndrome[r] = s;
      any |= s;
    }
    if (any) {
      for (let j = 0; j < 7; j++) {
        if (H[0]![j] === syndrome[0] && H[1]![j] === syndrome[1] && H[2]![j] === syndrome[2]) {
          word[j] = word[j]! ^ 1;
          break;
        }
      }
    }
    let errors = 0;
    for (let i = 0; i < 4; i++) if (word[i] !== msg[i]) errors++;
    bitErrors += errors;
    if (errors > 0) frameErrors++;
  }
  return { bitErrors, frameErrors };
}
