import type { ClaimItem } from "./types";

/** A claim's numbers and evidence in the words the Claims page shows; plain functions of the API's presentation. */

/** A rate as the API's reasoning writes it: plain from 1e-3 up, else mantissa·e-exponent (2.09e-5, 1e-9). */
export function formatRate(x: number): string {
  if (x === 0) return "0";
  if (x >= 1e-3 && x < 1e6) return String(Number(x.toPrecision(4)));
  return x.toExponential(3).replace(/\.?0+e/, "e");
}

const int = new Intl.NumberFormat("en");
export const formatCount = (n: number) => int.format(n);
export const formatConfidence = (c: number) => `${Number((c * 100).toPrecision(6))} %`;

const METRIC = { ber: "BER", fer: "FER" } as const;

/** "BER ≤ 1e-9 (fibre preset)". */
export function targetWords(t: ClaimItem["target"]): string {
  return `${METRIC[t.metric]} ≤ ${formatRate(t.atMost)}${t.preset ? ` (${t.preset} preset)` : ""}`;
}

const FAMILY: Record<string, string> = {
  repetition: "repetition",
  parity: "single parity check",
  hamming: "Hamming",
  golay: "Golay",
  linear: "linear",
  crc: "CRC",
  bch: "BCH",
  rs: "Reed–Solomon",
};

const asRecord = (v: unknown): Record<string, unknown> | undefined => (v !== null && typeof v === "object" && !Array.isArray(v) ? (v as Record<string, unknown>) : undefined);

function codeWords(code: Record<string, unknown>, details: ClaimItem["details"]): string {
  const family = typeof code.family === "string" ? code.family : "code";
  const name = `${code.extended === true ? "extended " : ""}${FAMILY[family] ?? family}`;
  return typeof details.n === "number" && typeof details.k === "number" ? `${name} (${details.n},${details.k})` : name;
}

/** A simulated claim gives its operating point as `at` (p, ε or Eb/N0 in dB by channel); an analytic one inside its channel. */
function channelWords(ch: Record<string, unknown>, at: unknown): string {
  const point = (v: unknown) => (typeof v === "number" ? v : typeof at === "number" ? at : undefined);
  const p = point(ch.p);
  if (ch.type === "bsc") return p === undefined ? "BSC" : `BSC p = ${formatRate(p)}`;
  if (ch.type === "bec") return p === undefined ? "BEC" : `BEC ε = ${formatRate(p)}`;
  if (ch.type === "awgn") {
    const m = String(ch.modulation);
    const scheme = m === "bpsk" || m === "qpsk" ? m.toUpperCase() : `${String(ch.order)}-${m.toUpperCase()}`;
    const soft = ch.decisions === "soft" ? ", soft decisions" : "";
    const ebN0 = point(ch.ebN0Db);
    return `${scheme} on AWGN${ebN0 === undefined ? "" : ` at Eb/N0 = ${ebN0} dB`}${soft}`;
  }
  return String(ch.type);
}

/**
 * The evidence in one line: "measured: 2 errors in 5,000,000,000 bits", "analytic: Hamming (7,4) on BSC p = 0.001",
 * "analytic: uncoded QPSK on AWGN at Eb/N0 = 10.6 dB". Any other mode names its code and channel when it has them.
 */
export function evidenceWords(c: Pick<ClaimItem, "mode" | "evidence" | "details" | "target">): string {
  const e = c.evidence;
  if (c.mode === "measured" && typeof e.trials === "number" && typeof e.errors === "number") {
    const unit = c.target.metric === "ber" ? "bits" : "frames";
    return `measured: ${formatCount(e.errors)} ${e.errors === 1 ? "error" : "errors"} in ${formatCount(e.trials)} ${unit}`;
  }
  const code = asRecord(e.code);
  const channel = asRecord(e.channel);
  const on = channel ? channelWords(channel, e.at) : "";
  const what = code ? `${codeWords(code, c.details)}${on ? ` on ${on}` : ""}` : `uncoded ${on}`.trim();
  const frames = !code && typeof e.frameBits === "number" ? `, ${formatCount(e.frameBits)}-bit frames` : "";
  return `${c.mode}: ${what}${frames}`;
}

/** The interval behind a decided verdict: a range for counts, the rate itself for a formula. */
export function intervalWords(c: { interval: { lower: number; upper: number }; exact: boolean }): string {
  const { lower, upper } = c.interval;
  if (lower === upper) return c.exact ? `exactly ${formatRate(lower)}` : `${formatRate(lower)} (a point estimate)`;
  return `${formatRate(lower)} to ${formatRate(upper)}`;
}
