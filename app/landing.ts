import type { CodeSpec } from "@/lib/api/code-spec";
import { endpoints } from "@/lib/api/registry";

/**
 * What the landing page lists. Whether an endpoint is live is read from the registry the API is
 * served from, so the page marks what is not there yet instead of promising it.
 */
export const LANDING_OUTCOMES = [
  {
    title: "Codecs proven bit-exact",
    body: "Upload the vectors your device produced. The reference decodes every one and reports each position where firmware and reference disagree, so a regression fails the build that caused it.",
    endpoint: "POST /conformance",
  },
  {
    title: "BER targets shown, with a confidence",
    body: "State the claim — say, frame errors below 1e-4 for a (7,4) Hamming decoder on a BSC with p = 1e-3 — and get back supported, refuted or inconclusive, with the interval and the confidence level behind it, from a formula, your own counts or a simulation that stops once it is sure.",
    endpoint: "POST /claims",
  },
  {
    title: "Margin to capacity",
    body: "Capacity of BSC, BEC and AWGN channels, the Shannon limit on Eb/N0 for your code rate, and how many dB your design leaves on the table.",
    endpoint: "POST /capacity",
  },
  {
    title: "Test length, planned up front",
    body: "How many bits — and how long at your line rate — it takes to show a BER target at a chosen confidence, with zero or more errors allowed.",
    endpoint: "POST /tests/plan",
  },
] as const;

export const LANDING_ENDPOINTS = [
  ["POST", "/codes/analyze", "Parameters, minimum distance, weight distribution and the classic bounds of a code"],
  ["POST", "/encode", "Message bits to codeword, for every supported code family"],
  ["POST", "/decode", "Hard-decision words (with erasures where the code can fill them) to message, corrected positions and syndrome"],
  ["POST", "/distance", "Hamming distance of two words; minimum distance of a codebook"],
  ["POST", "/channels/bsc", "Flip probabilities, block error and undetected error on a BSC"],
  ["POST", "/capacity", "Channel capacity, Shannon limit on Eb/N0, gap to capacity"],
  ["POST", "/links/ber", "Uncoded BER at an Eb/N0, required Eb/N0 for a BER, coding gain"],
  ["GET", "/usage", "Your organisation's metered usage by day and endpoint"],
  ["POST", "/tests/plan", "Bits and test time needed to demonstrate a BER"],
  ["POST", "/claims", "Verdict on an error-rate claim from a formula, your counts or a simulation, with interval and confidence"],
  ["GET", "/claims", "A firmware label's claims over time"],
  ["GET", "/claims/{id}", "One claim: verdict, interval, reasoning, evidence"],
  ["POST", "/simulations", "Seeded Monte Carlo BER/FER sweeps, run as jobs"],
  ["GET", "/simulations", "Your simulations, newest first"],
  ["GET", "/simulations/{id}", "Progress, counts and intervals of a simulation"],
  ["GET", "/simulations/{id}/events", "A simulation's progress as Server-Sent Events"],
  ["DELETE", "/simulations/{id}", "Cancel a simulation"],
  ["POST", "/conformance", "Device test vectors checked against the reference"],
] as const;

/** One phrase per code family the API takes; typed by the code spec, so a new family cannot be left off. */
const FAMILY_NAMES: Record<CodeSpec["family"], string> = {
  repetition: "repetition",
  parity: "single parity check",
  hamming: "Hamming and extended Hamming",
  golay: "Golay",
  linear: "any binary linear code from its matrices",
  crc: "CRC with the full parameter model",
  bch: "binary BCH",
  rs: "Reed–Solomon",
};
export const SHIPPED_FAMILIES = Object.values(FAMILY_NAMES);
export const PLANNED_FAMILIES = ["convolutional with Viterbi", "LDPC", "polar"];

const live = new Set(endpoints.map((e) => `${e.method} ${e.path}`));

/** "POST /capacity" → whether the API serves it. */
export const isLive = (methodAndPath: string) => live.has(methodAndPath);
