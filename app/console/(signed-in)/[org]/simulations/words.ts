/** A simulation's request in a few words, for lists and headings. */

type Obj = Record<string, unknown>;

/** The code spec's family and its parameters as written ("hamming r=3"); "uncoded" when there is none. */
export function codeWords(code: unknown): string {
  if (typeof code !== "object" || code === null) return "uncoded";
  const { family, ...rest } = code as Obj;
  const params = Object.entries(rest)
    .filter(([, v]) => typeof v === "number" || typeof v === "boolean" || (typeof v === "string" && v.length <= 12))
    .map(([k, v]) => `${k}=${String(v)}`);
  return [String(family), ...params].join(" ");
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
