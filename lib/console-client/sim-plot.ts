import { linearToDb, shannonLimitEbN0 } from "@/lib/core/capacity";
import { qfunc } from "@/lib/core/modulation";
import type { SimulationItem } from "./types";

/**
 * What the result page draws beside a simulation's counts: the uncoded curve of its channel and, on AWGN, the
 * Shannon limit of its code's rate; and the points as CSV. Pure: the page and its tests call the same functions.
 */

export type ChannelSpec = { type: "bsc" } | { type: "bec" } | { type: "awgn"; modulation: "bpsk" | "qpsk"; decisions?: "hard" | "soft" };

/** Uncoded BER at one operating point: p on the BSC; Q(√(2·Eb/N0)) for BPSK and Gray QPSK on AWGN, Eb/N0 in dB (Proakis & Salehi 2008, ch. 8); none for the BEC (an erasure is not an error). */
export function uncodedBer(channel: ChannelSpec, x: number): number | null {
  if (channel.type === "bsc") return x;
  if (channel.type === "awgn") return qfunc(Math.sqrt(2 * 10 ** (x / 10)));
  return null;
}

/** The uncoded curve over [lo, hi] in `steps` pieces: linear in dB on AWGN, geometric in p on the BSC. */
export function uncodedCurve(channel: ChannelSpec, lo: number, hi: number, steps = 60): { x: number; ber: number }[] {
  const out: { x: number; ber: number }[] = [];
  if (channel.type === "bec") return out;
  const geometric = channel.type === "bsc" && lo > 0;
  for (let i = 0; i <= steps; i++) {
    const x = geometric ? lo * (hi / lo) ** (i / steps) : lo + ((hi - lo) * i) / steps;
    const ber = uncodedBer(channel, x)!;
    if (ber > 0) out.push({ x, ber });
  }
  return out;
}

/** The Shannon limit on Eb/N0 in dB for `rate` information bits per real dimension (BPSK, and Gray QPSK as two BPSK channels). */
export const shannonLimitDb = (rate: number) => linearToDb(shannonLimitEbN0(rate));

const CSV_COLUMNS = [
  "point",
  "frames",
  "info_bits",
  "bit_errors",
  "frame_errors",
  "decoder_failures",
  "undetected_errors",
  "ber",
  "ber_cp_lower",
  "ber_cp_upper",
  "fer",
  "fer_cp_lower",
  "fer_cp_upper",
  "stopped_by",
] as const;

const cell = (v: number | string | null | undefined) => (v === null || v === undefined ? "" : typeof v === "number" ? String(v) : /[",\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v);

/** The points as CSV (RFC 4180: comma-separated, CRLF line ends, a header row); intervals are two-sided Clopper–Pearson at the simulation's confidence. */
export function pointsCsv(sim: Pick<SimulationItem, "points">): string {
  const rows = sim.points.map((p) => [
    p.x,
    p.counts.frames,
    p.counts.infoBits,
    p.counts.bitErrors,
    p.counts.frameErrors,
    p.counts.failures,
    p.counts.undetected,
    p.ber?.estimate,
    p.ber?.clopperPearson.lower,
    p.ber?.clopperPearson.upper,
    p.fer?.estimate,
    p.fer?.clopperPearson.lower,
    p.fer?.clopperPearson.upper,
    p.stoppedBy,
  ]);
  return [CSV_COLUMNS as readonly (string | number | null | undefined)[], ...rows].map((r) => r.map(cell).join(",")).join("\r\n") + "\r\n";
}

/** Powers of ten from below `lo` to above `hi`: the ticks of a log axis. */
export function decadeTicks(lo: number, hi: number): number[] {
  const a = Math.floor(Math.log10(lo));
  const b = Math.ceil(Math.log10(hi));
  const out: number[] = [];
  // Parsed, not 10 ** e: the literal is the nearest double to the power (10 ** -4 is not).
  for (let e = a; e <= Math.max(b, a + 1); e++) out.push(Number(`1e${e}`));
  return out;
}
