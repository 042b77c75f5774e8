/** A simulation's request in a few words, for lists and headings. */

type Obj = Record<string, unknown>;

const num = (v: unknown) => (typeof v === "number" && Number.isInteger(v) ? v : undefined);

/**
 * The code a spec names, in the words an engineer uses ("Hamming (7,4)", "Reed–Solomon (255,223)"), read off the
 * spec without building the code; a family whose (n, k) needs the construction (BCH's k, a matrix code) is named by
 * its parameters. "uncoded" when there is no code.
 */
export function codeWords(code: unknown): string {
  if (typeof code !== "object" || code === null) return "uncoded";
  const c = code as Obj;
  switch (c.family) {
    case "repetition":
      return num(c.n) ? `repetition (${c.n},1)` : "repetition";
    case "parity":
      return num(c.n) ? `${c.parity === "odd" ? "odd" : "even"} parity (${c.n},${num(c.n)! - 1})` : "parity";
    case "hamming": {
      const r = num(c.r) ?? (num(c.n) && num(c.k) ? num(c.n)! - num(c.k)! - (c.extended ? 1 : 0) : undefined);
      if (r === undefined) return "Hamming";
      const n = 2 ** r - 1;
      return c.extended ? `extended Hamming (${n + 1},${n - r})` : `Hamming (${n},${n - r})`;
    }
    case "golay":
      return c.extended ? "extended Golay (24,12)" : "Golay (23,12)";
    case "rs":
      return num(c.m) ? `Reed–Solomon (${num(c.n) ?? 2 ** num(c.m)! - 1},${num(c.k) ?? "?"}) over GF(2^${c.m})` : "Reed–Solomon";
    case "bch":
      return num(c.m) ? `BCH, n = ${2 ** num(c.m)! - 1 - (num(c.shorten) ?? 0)}, t = ${num(c.t) ?? "?"}` : "BCH";
    case "crc":
      return typeof c.preset === "string" ? c.preset : `CRC-${num(c.width) ?? "?"}`;
    case "linear":
      return Array.isArray(c.generator) ? `linear code, ${c.generator.length}-row generator` : Array.isArray(c.parityCheck) ? `linear code, ${c.parityCheck.length}-row parity check` : "linear code";
    default:
      return String(c.family);
  }
}

export function channelWords(channel: unknown): string {
  const c = (channel ?? {}) as Obj;
  if (c.type === "awgn") return `AWGN, ${String(c.modulation).toUpperCase()}, ${String(c.decisions ?? "hard")} decisions`;
  return c.type === "bec" ? "BEC" : "BSC";
}

/** The axis name of the operating point. */
export const pointName = (channel: unknown) => {
  const t = ((channel ?? {}) as Obj).type;
  return t === "awgn" ? "Eb/N0 (dB)" : t === "bec" ? "erasure probability ε" : "crossover probability p";
};
