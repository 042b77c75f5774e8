import type { Bits } from "../bits";
import { InputError } from "../errors";
import { checkBinaryWord, rejectErasures } from "../gf2";
import type { BlockCode, DecodeResult, Word } from "./types";

/** Largest repetition length accepted. */
export const MAX_REPETITION_N = 1 << 20;

/**
 * The (n, 1) repetition code: the message bit sent n times, dmin = n, decoded by majority vote
 * (MacWilliams & Sloane 1977, ch. 1). For even n a vote of n/2 against n/2 is a tie: the decoder
 * reports failure instead of guessing, changes nothing, and the message is the first received bit.
 * The syndrome has n − 1 bits, s_j = r_0 ⊕ r_{j+1}.
 */
export function repetition(n: number): BlockCode {
  if (!Number.isInteger(n) || n < 1 || n > MAX_REPETITION_N) throw new InputError(`n must be an integer from 1 to ${MAX_REPETITION_N}; got ${n}`, ["n"]);
  const name = `repetition (${n},1)`;
  const encode = (message: Word): Bits => new Uint8Array(n).fill(checkBinaryWord(message, 1, "message", name)[0]!);
  return {
    family: "repetition",
    name,
    n,
    k: 1,
    q: 2,
    dmin: n,
    messagePositions: [0],
    bitOrder: "Every codeword bit is the message bit; position 0 carries it as the message position.",
    supportsErasures: false,
    encode,
    decode(received: Word, erasures?: number[]): DecodeResult {
      const r = checkBinaryWord(received, n, "received", name);
      rejectErasures(erasures, name);
      let ones = 0;
      for (let i = 0; i < n; i++) ones += r[i]!;
      const syndrome = new Uint8Array(n - 1);
      for (let j = 1; j < n; j++) syndrome[j - 1] = r[0]! ^ r[j]!;
      if (2 * ones === n) {
        return { message: r.slice(0, 1), codeword: r.slice(), correctedPositions: [], syndrome, failure: true, reason: `tie: ${n / 2} ones and ${n / 2} zeros` };
      }
      const bit = 2 * ones > n ? 1 : 0;
      const correctedPositions: number[] = [];
      for (let i = 0; i < n; i++) if (r[i] !== bit) correctedPositions.push(i);
      return { message: Uint8Array.of(bit), codeword: new Uint8Array(n).fill(bit), correctedPositions, syndrome, failure: false };
    },
    generatorRows: () => [new Uint8Array(n).fill(1)],
    // The all-zero and the all-one word (MacWilliams & Sloane 1977, ch. 1).
    weightDistribution: () => Array.from({ length: n + 1 }, (_, w) => (w === 0 || w === n ? 1n : 0n)),
  };
}
