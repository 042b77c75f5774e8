#!/usr/bin/env node
import { readFileSync, writeFileSync } from "node:fs";
import { basename } from "node:path";
import { Command, InvalidArgumentError } from "commander";
import { Api, ApiUnavailable, DEFAULT_API, RequestRefused, type ClaimView } from "./api.js";
import { ClaimsFileError, filePath, parseClaims, requestBody, type FileProblem, type LoadedClaims } from "./claims-file.js";
import { claimsTable, fails, formatRate, junitXml, textTable, type Outcome } from "./report.js";

/**
 * paritas-claims: checks a file of error-rate claims against the Paritas API for a CI job, and plans BER tests.
 * Exit codes: 0 every claim holds, 1 a claim does not, 2 the claims file (or an option) is wrong, 3 the API
 * cannot be reached or refuses the key.
 */

const EXIT = { held: 0, failed: 1, badInput: 2, api: 3 } as const;

/** An expected failure: its message is printed as it is, without a stack, and the process exits with `code`. */
class Stop extends Error {
  constructor(
    message: string,
    readonly code: number,
  ) {
    super(message);
  }
}

function apiFrom(opts: { api?: string }): Api {
  const base = opts.api ?? process.env.PARITAS_API ?? DEFAULT_API;
  try {
    new URL(base);
  } catch {
    throw new Stop(`The API address "${base}" is not a URL (expected e.g. ${DEFAULT_API}).`, EXIT.badInput);
  }
  const key = process.env.PARITAS_KEY?.trim();
  if (!key) throw new Stop("No API key: set PARITAS_KEY to a key with the claims scope (the plan command needs the compute scope).", EXIT.api);
  return new Api(base, key);
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Progress while claims are pending: one rewritten line on a terminal, a line per change otherwise (CI logs). */
class Progress {
  private readonly tty = Boolean(process.stderr.isTTY);
  private readonly last = new Map<string, string>();
  private shown = false;

  update(name: string, state: string, pendingCount: number, elapsed: number): void {
    if (this.tty) {
      process.stderr.write(`\r\x1b[2K${pendingCount} pending, ${Math.round(elapsed)} s: ${name} ${state}`);
      this.shown = true;
    } else if (this.last.get(name) !== state) {
      process.stderr.write(`${name}: ${state}\n`);
    }
    this.last.set(name, state);
  }

  done(): void {
    if (this.tty && this.shown) process.stderr.write("\r\x1b[2K");
  }
}

/** A pending claim's state in words, naming the simulation behind it. */
function pendingState(c: ClaimView): string {
  return `pending${c.simulation ? ` (simulation ${c.simulation})` : ""}`;
}

function describeRefusal(loaded: LoadedClaims, index: number, e: RequestRefused): FileProblem[] {
  const name = loaded.data.claims[index]!.name;
  if (e.fields.length === 0) return [{ line: loaded.lineOf(["claims", index]), field: `claims[${index}]`, message: `the API refused "${name}" (${e.status}): ${e.message}` }];
  return e.fields.map((f) => {
    const body = f.pointer.split("/").slice(1).map((s) => s.replaceAll("~1", "/").replaceAll("~0", "~"));
    const path = filePath(loaded.data, index, body);
    return {
      line: loaded.lineOf(path.map((k) => (typeof k === "string" && /^\d+$/.test(k) ? Number(k) : k))),
      field: path.map((k, i) => (typeof k === "number" || /^\d+$/.test(String(k)) ? `[${k}]` : `${i === 0 ? "" : "."}${k}`)).join(""),
      message: `the API refused "${name}": ${f.message}`,
    };
  });
}

interface CheckOptions {
  api?: string;
  junit?: string;
  wait: number;
  every: number;
}

async function check(file: string, opts: CheckOptions): Promise<number> {
  let text: string;
  try {
    text = readFileSync(file, "utf8");
  } catch (e) {
    throw new Stop(`Cannot read the claims file ${file}: ${(e as NodeJS.ErrnoException).code === "ENOENT" ? "no such file" : (e as Error).message}.`, EXIT.badInput);
  }
  let loaded: LoadedClaims;
  try {
    loaded = parseClaims(text, file);
  } catch (e) {
    if (e instanceof ClaimsFileError) throw new Stop(`The claims file has ${e.problems.length === 1 ? "a problem" : `${e.problems.length} problems`}:\n${e.message}`, EXIT.badInput);
    throw e;
  }
  const api = apiFrom(opts);
  const { data } = loaded;
  const started = Date.now();
  const elapsed = () => (Date.now() - started) / 1000;

  const outcomes: Outcome[] = [];
  const waiting: { outcome: Outcome; id: string; since: number }[] = [];
  for (const [i, c] of data.claims.entries()) {
    const body = requestBody(data, c);
    const since = Date.now();
    let answer: Awaited<ReturnType<Api["submitClaim"]>>;
    try {
      answer = await api.submitClaim(body);
    } catch (e) {
      if (e instanceof RequestRefused) {
        throw new Stop(`The API refused a claim in ${file}:\n${new ClaimsFileError(file, describeRefusal(loaded, i, e)).message}`, EXIT.badInput);
      }
      throw e;
    }
    const outcome: Outcome = { name: c.name, label: body.label, claim: answer.claim, seconds: (Date.now() - since) / 1000 };
    outcomes.push(outcome);
    if (answer.claim.verdict === "pending") waiting.push({ outcome, id: answer.id, since });
  }

  const progress = new Progress();
  const deadline = started + opts.wait * 1000;
  for (const w of waiting) progress.update(w.outcome.name, pendingState(w.outcome.claim!), waiting.length, elapsed());
  while (waiting.length > 0) {
    if (Date.now() >= deadline) {
      for (const w of waiting) w.outcome.timedOut = true;
      break;
    }
    await sleep(Math.min(opts.every * 1000, Math.max(0, deadline - Date.now())));
    for (const w of [...waiting]) {
      const c = await api.claim(w.id);
      w.outcome.claim = c;
      w.outcome.seconds = (Date.now() - w.since) / 1000;
      if (c.verdict === "pending") {
        progress.update(w.outcome.name, pendingState(c), waiting.length, elapsed());
      } else {
        waiting.splice(waiting.indexOf(w), 1);
        progress.update(w.outcome.name, `${c.verdict} after ${Math.round(w.outcome.seconds)} s`, waiting.length, elapsed());
      }
    }
  }
  progress.done();

  console.log(claimsTable(outcomes));
  const failing = outcomes.filter((o) => fails(o, data.inconclusive));
  if (opts.junit) {
    try {
      writeFileSync(opts.junit, junitXml(basename(file), outcomes, data.inconclusive, elapsed(), new Date(started)));
    } catch (e) {
      throw new Stop(`Cannot write the JUnit report to ${opts.junit}: ${(e as Error).message}`, EXIT.badInput);
    }
  }
  const held = outcomes.length - failing.length;
  console.log(
    `\n${held} of ${outcomes.length} claims hold` +
      (failing.length > 0 ? `; not holding: ${failing.map((o) => `${o.name} (${o.timedOut ? "undecided" : o.claim!.verdict})`).join(", ")}` : "") +
      (data.inconclusive === "pass" && outcomes.some((o) => o.claim?.verdict === "inconclusive") ? " (inconclusive claims pass by the file's policy)" : "") +
      ".",
  );
  return failing.length > 0 ? EXIT.failed : EXIT.held;
}

/** `K` (only the plan allowing K errors) or `A..B` (plans allowing A to B errors). */
function parseErrors(v: string): { from: number; to: number } {
  const m = /^(\d+)(?:\.\.(\d+))?$/.exec(v.trim());
  if (!m) throw new InvalidArgumentError("give a whole number of errors (2) or a range (0..2).");
  const from = Number(m[1]);
  const to = m[2] === undefined ? from : Number(m[2]);
  if (to < from) throw new InvalidArgumentError(`the range ${v} runs backwards; write the smaller end first.`);
  return { from, to };
}

function parseNumber(v: string): number {
  const x = Number(v);
  if (v.trim() === "" || !Number.isFinite(x)) throw new InvalidArgumentError("give a number, e.g. 1e-9 or 0.95.");
  return x;
}

async function plan(opts: { target: number; confidence: number; errors: { from: number; to: number }; lineRate?: number; api?: string }): Promise<number> {
  const api = apiFrom(opts);
  const single = opts.errors.from === opts.errors.to && opts.errors.from > 0;
  let result;
  try {
    result = await api.plan({
      targetBer: opts.target,
      confidence: opts.confidence,
      maxErrors: opts.errors.to,
      onlyMaxErrors: single,
      ...(opts.lineRate !== undefined ? { lineRateBps: opts.lineRate } : {}),
    });
  } catch (e) {
    if (e instanceof RequestRefused) {
      const option: Record<string, string> = { targetBer: "--target", confidence: "--confidence", maxErrors: "--errors", lineRateBps: "--line-rate" };
      const lines = e.fields.length > 0 ? e.fields.map((f) => `${option[f.pointer.slice(1)] ?? f.pointer}: ${f.message}`) : [e.message];
      throw new Stop(`The API refused the plan:\n${lines.join("\n")}`, EXIT.badInput);
    }
    throw e;
  }
  const plans = result.plans.filter((p) => p.allowedErrors >= opts.errors.from);
  const timed = opts.lineRate !== undefined;
  console.log(`Bits to show BER ≤ ${formatRate(result.targetBer)} at ${result.confidence * 100} % confidence${timed ? ` (times at ${formatRate(opts.lineRate!)} bit/s)` : ""}:\n`);
  console.log(
    textTable(
      ["errors allowed", "bits (exact binomial)", ...(timed ? ["time"] : []), "bits (chi-square)", ...(timed ? ["time"] : [])],
      plans.map((p) => [
        String(p.allowedErrors),
        p.exact.bits.toLocaleString("en"),
        ...(timed ? [p.exact.duration ?? ""] : []),
        p.chiSquare.bits.toLocaleString("en"),
        ...(timed ? [p.chiSquare.duration ?? ""] : []),
      ]),
    ),
  );
  console.log(`\n${result.assumption}`);
  return EXIT.held;
}

const program = new Command("paritas-claims")
  .description("Check error-rate claims against the Paritas API from CI, and plan BER tests.")
  .showHelpAfterError("(run with --help for the options)")
  .configureOutput({ outputError: (s, write) => write(s) })
  .exitOverride();

const apiOption = `the API's base URL (default: $PARITAS_API, else ${DEFAULT_API})`;

program
  .command("check")
  .description("Submit each claim in a claims file (YAML or JSON), wait for pending ones, print a table and exit 0 when all hold, 1 when one does not, 2 on a bad file, 3 when the API cannot be reached or refuses the key ($PARITAS_KEY).")
  .argument("<file>", "the claims file: .yaml, .yml or .json")
  .option("--api <url>", apiOption)
  .option("--junit <path>", "also write a JUnit XML report there")
  .option("--wait <seconds>", "how long to wait for pending (simulated) claims", parseNumber, 1800)
  .option("--every <seconds>", "how often to ask about a pending claim", parseNumber, 1.5)
  .action(async (file: string, opts: CheckOptions) => {
    process.exitCode = await check(file, opts);
  });

program
  .command("plan")
  .description("How many bits (and how long at a line rate) a test must run to show BER ≤ target at a confidence, allowing a number of errors.")
  .requiredOption("--target <ber>", "the BER to demonstrate, e.g. 1e-9", parseNumber)
  .option("--confidence <fraction>", "confidence level as a fraction", parseNumber, 0.95)
  .option("--errors <k or a..b>", "errors the test may allow: one count, or a range such as 0..2", parseErrors, { from: 0, to: 0 })
  .option("--line-rate <bit/s>", "line rate, to give each plan's test time", parseNumber)
  .option("--api <url>", apiOption)
  .action(async (opts: Parameters<typeof plan>[0]) => {
    process.exitCode = await plan(opts);
  });

try {
  await program.parseAsync();
} catch (e) {
  if (e instanceof Stop) {
    console.error(e.message);
    process.exitCode = e.code;
  } else if (e instanceof ApiUnavailable) {
    console.error(e.message);
    process.exitCode = EXIT.api;
  } else if (e instanceof Error && "exitCode" in e && "code" in e && String(e.code).startsWith("commander.")) {
    // Help and version exit 0; a wrong command or option is a usage error, like a bad file.
    process.exitCode = e.exitCode === 0 ? 0 : EXIT.badInput;
  } else {
    throw e;
  }
}
