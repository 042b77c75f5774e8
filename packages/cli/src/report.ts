import { create } from "xmlbuilder2";
import type { ClaimView } from "./api.js";

/** What became of one claim in the file: its verdict, or why it has none. */
export interface Outcome {
  name: string;
  label: string;
  /** The claim as last seen; absent when the API never answered for it. */
  claim?: ClaimView;
  /** Set when no verdict came in time. */
  timedOut?: boolean;
  seconds: number;
}

export type Policy = "fail" | "pass";

/** Whether an outcome holds up a build: refuted, undecided, or inconclusive under the `fail` policy. */
export function fails(o: Outcome, policy: Policy): boolean {
  const v = o.claim?.verdict;
  return v !== "supported" && !(v === "inconclusive" && policy === "pass");
}

/** A rate in 3 significant digits: exponent form outside 0.001 … 1e6. */
export function formatRate(x: number): string {
  if (x === 0) return "0";
  return Math.abs(x) >= 1e-3 && Math.abs(x) < 1e6 ? String(Number(x.toPrecision(3))) : x.toExponential(2).replace(/\.?0+e/, "e");
}

function shorten(s: string, max: number): string {
  return s.length <= max ? s : `${s.slice(0, max - 1).trimEnd()}…`;
}

function verdictOf(o: Outcome): string {
  if (o.timedOut) return "undecided";
  return o.claim?.verdict ?? "—";
}

/** A plain text table with a header row, columns padded to their widest cell. */
export function textTable(header: string[], rows: string[][]): string {
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i]!.length)));
  const line = (cells: string[]) => cells.map((c, i) => (i === cells.length - 1 ? c : c.padEnd(widths[i]!))).join("  ").trimEnd();
  return [line(header), line(widths.map((w) => "-".repeat(w))), ...rows.map(line)].join("\n");
}

export const REASONING_WIDTH = 72;

/** The verdict table printed after a run. */
export function claimsTable(outcomes: Outcome[]): string {
  return textTable(
    ["name", "label", "verdict", "rate", "interval", "reasoning"],
    outcomes.map((o) => {
      const c = o.claim;
      return [
        o.name,
        o.label,
        verdictOf(o),
        c?.rate != null ? formatRate(c.rate) : "",
        c?.interval ? `[${formatRate(c.interval.lower)}, ${formatRate(c.interval.upper)}]` : "",
        shorten(o.timedOut ? `no verdict within the wait (claim ${c?.id ?? "?"})` : (c?.reasoning ?? ""), REASONING_WIDTH),
      ];
    }),
  );
}

const seconds = (s: number) => s.toFixed(3);
const precise = (x: number) => String(Number(x.toPrecision(6)));

/**
 * A JUnit XML report: one <testsuite> (the claims file) with one <testcase> per claim. A refuted claim is a
 * <failure>, an inconclusive one a <failure> or <skipped> by the file's policy, an undecided one an <error>;
 * each case's <system-out> has the full reasoning.
 */
export function junitXml(suiteName: string, outcomes: Outcome[], policy: Policy, totalSeconds: number, timestamp: Date): string {
  let failures = 0;
  let errors = 0;
  let skipped = 0;
  const cases = outcomes.map((o) => {
    const v = o.claim?.verdict;
    const reasoning = o.claim?.reasoning ?? "";
    let mark: { el: "failure" | "error" | "skipped"; message: string; type?: string } | undefined;
    if (o.timedOut || !v || v === "pending") {
      errors++;
      mark = { el: "error", message: `No verdict within the wait${o.claim ? `; claim ${o.claim.id} may still be decided later` : ""}.`, type: "undecided" };
    } else if (v === "refuted") {
      failures++;
      mark = { el: "failure", message: `refuted: ${reasoning}`, type: "refuted" };
    } else if (v === "inconclusive" && policy === "fail") {
      failures++;
      mark = { el: "failure", message: `inconclusive: ${reasoning}`, type: "inconclusive" };
    } else if (v === "inconclusive") {
      skipped++;
      mark = { el: "skipped", message: `inconclusive: ${reasoning}` };
    }
    return { o, mark, reasoning };
  });

  const doc = create({ version: "1.0", encoding: "UTF-8" });
  const attrs = (tests: number) => ({ name: suiteName, tests: String(tests), failures: String(failures), errors: String(errors), skipped: String(skipped), time: seconds(totalSeconds) });
  const suite = doc
    .ele("testsuites", attrs(outcomes.length))
    .ele("testsuite", { ...attrs(outcomes.length), timestamp: timestamp.toISOString().replace(/\.\d+Z$/, "") });
  for (const { o, mark, reasoning } of cases) {
    const tc = suite.ele("testcase", { name: o.name, classname: o.label, time: seconds(o.seconds) });
    if (mark) {
      const el = tc.ele(mark.el, { message: mark.message, ...(mark.type ? { type: mark.type } : {}) });
      if (mark.el !== "skipped") el.txt(mark.message);
    }
    const c = o.claim;
    const out = c
      ? [`verdict: ${c.verdict}`, `claim: ${c.id}`, `label: ${c.label}`, ...(c.rate != null ? [`rate: ${precise(c.rate)}`] : []), ...(c.interval ? [`interval: [${precise(c.interval.lower)}, ${precise(c.interval.upper)}] (${c.interval.method})`] : []), ...(c.simulation ? [`simulation: ${c.simulation}`] : []), `reasoning: ${reasoning}`]
      : ["The API gave no answer for this claim."];
    tc.ele("system-out").txt(out.join("\n"));
  }
  return doc.end({ prettyPrint: true }) + "\n";
}
