import type { Bits } from "../bits";
import { InputError } from "../errors";
import { checkBinaryWord } from "../gf2";
import type { BlockCode, DecodeResult, Word } from "./types";

/** Largest single-parity-check length accepted. */
export const MAX_PARITY_N = 1 << 20;

function checkErasures(erasures: readonly number[], n: number): void {
  const seen = new Set<number>();
  erasures.forEach((e, i) => {
    if (!Number.isInteger(e) || e < 0 || e >= n) throw new InputError(`erasure ${i} is ${e}; positions are integers from 0 to ${n - 1}`, ["erasures", i]);
    if (seen.has(e)) throw new InputError(`erasure ${i} repeats position ${e}`, ["erasures", i]);
    seen.add(e);
  });
}

/**
 * The (n, n − 1) single parity check code: the message followed by one bit that makes the codeword's
 * weight even ("even") or odd ("odd"), dmin = 2 (MacWilliams & Sloane 1977, ch. 1). Decoding detects
 * an odd number of bit errors (failure, nothing corrected) and fills one erasure from the parity; the
 * 1-bit syndrome counts erased positions as 0. The odd kind is a coset of a linear code, so it has no
 * generator matrix.
 */
export function parity(n: number, kind: "even" | "odd" = "even"): BlockCode {
  if (!Number.isInteger(n) || n < 2 || n > MAX_PARITY_N) throw new InputError(`n must be an integer from 2 to ${MAX_PARITY_N}; got ${n}`, ["n"]);
  if (kind !== "even" && kind !== "odd") throw new InputError(`kind must be "even" or "odd"; got ${JSON.stringify(kind)}`, ["kind"]);
  const k = n - 1;
  const target = kind === "odd" ? 1 : 0;
  const name = `${kind} parity (${n},${k})`;
  const xorAll = (w: Bits, skip: ReadonlySet<number>): number => {
    let x = 0;
    for (let i = 0; i < w.length; i++) if (!skip.has(i)) x ^= w[i]!;
    return x;
  };
  const none = new Set<number>();
  const code: BlockCode = {
    family: "parity",
    name,
    n,
    k,
    q: 2,
    dmin: 2,
    messagePositions: Array.from({ length: k }, (_, i) => i),
    bitOrder: `Message bits in positions 0..${k - 1}, then the parity bit in position ${k}.`,
    supportsErasures: true,
    encode(message: Word): Bits {
      const m = checkBinaryWord(message, k, "message", name);
      const c = new Uint8Array(n);
      c.set(m);
      c[k] = xorAll(m, none) ^ target;
      return c;
    },
    decode(received: Word, erasures: number[] = []): DecodeResult {
      const r = checkBinaryWord(received, n, "received", name);
      checkErasures(erasures, n);
      const erased = new Set(erasures);
      const rest = xorAll(r, erased);
      const syndrome = Uint8Array.of(rest ^ target);
      const unchanged = (reason: string): DecodeResult => ({ message: r.slice(0, k), codeword: r.slice(), correctedPositions: [], syndrome, failure: true, reason });
      if (erasures.length > 1) return unchanged(`${erasures.length} erasures; a single parity check can fill only one`);
      const codeword = r.slice();
      const e = erasures[0];
      if (e !== undefined) codeword[e] = rest ^ target;
      else if (rest !== target) return unchanged("parity check failed: an odd number of bits are in error (detected, not corrected)");
      return { message: codeword.slice(0, k), codeword, correctedPositions: e === undefined ? [] : [e], syndrome, failure: false };
    },
  };
  if (kind === "even") {
    code.generatorRows = () =>
      Array.from({ length: k }, (_, i) => {
        const row = new Uint8Array(n);
        row[i] = 1;
        row[k] = 1;
        return row;
      });
    // Every even-weight word: A_w = C(n, w) for even w (MacWilliams & Sloane 1977, ch. 1).
    code.weightDistribution = () => {
      const a: bigint[] = [1n];
      let c = 1n;
      for (let w = 1; w <= n; w++) {
        c = (c * BigInt(n - w + 1)) / BigInt(w);
        a.push(w % 2 === 0 ? c : 0n);
      }
      return a;
    };
  }
  return code;
}
