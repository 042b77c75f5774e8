import { execFile, execFileSync, spawn, type ChildProcess } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { createServer, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { XMLParser } from "fast-xml-parser";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { makeOrgWithKey } from "../helpers/fixtures";
import { startServerProcess, type ServerProcess } from "../helpers/server-process";

/**
 * paritas-claims as CI runs it: a child process against a real API server process (tests/helpers/serve.ts, this
 * file's database, a key made in it), and against a stand-in server for the pending path of simulated claims.
 * Reference values beside each check.
 */

const FIX = "tests/fixtures/claims";
const SOURCE = ["--import", "tsx", "packages/cli/src/main.ts"];
const BUNDLE = ["packages/cli/dist/paritas-claims.mjs"];

interface Run {
  code: number;
  stdout: string;
  stderr: string;
}

function cli(args: string[], env: Record<string, string | undefined>, entry = SOURCE): Promise<Run> {
  return new Promise((resolve) => {
    execFile(process.execPath, [...entry, ...args], { env: { ...process.env, PARITAS_API: undefined, PARITAS_KEY: undefined, ...env } }, (err, stdout, stderr) => {
      resolve({ code: err ? Number(err.code) : 0, stdout, stderr });
    });
  });
}

const xml = new XMLParser({ ignoreAttributes: false, attributeNamePrefix: "", isArray: (name) => name === "testcase" || name === "testsuite" });
interface Case {
  name: string;
  classname: string;
  time: string;
  failure?: { message: string; type?: string; "#text"?: string };
  skipped?: { message: string } | string;
  error?: { message: string };
  "system-out": string;
}
interface Suite {
  name: string;
  tests: string;
  failures: string;
  errors: string;
  skipped: string;
  time: string;
  timestamp?: string;
  testcase: Case[];
}
function readJunit(path: string): { testsuites: Suite & { testsuite: Suite[] } } {
  return xml.parse(readFileSync(path, "utf8")) as { testsuites: Suite & { testsuite: Suite[] } };
}

/** Every element and attribute the JUnit schema requires and CI systems read. */
function expectJunitShape(doc: ReturnType<typeof readJunit>, counts: { tests: number; failures: number; errors: number; skipped: number }) {
  const root = doc.testsuites;
  expect(root).toBeDefined();
  expect(root.testsuite).toHaveLength(1);
  for (const s of [root, root.testsuite[0]!]) {
    expect(s.name).toMatch(/\.(ya?ml|json)$/);
    expect({ tests: Number(s.tests), failures: Number(s.failures), errors: Number(s.errors), skipped: Number(s.skipped) }).toEqual(counts);
    expect(Number(s.time)).toBeGreaterThanOrEqual(0);
  }
  expect(root.testsuite[0]!.timestamp).toMatch(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d$/);
  const cases = root.testsuite[0]!.testcase;
  expect(cases).toHaveLength(counts.tests);
  for (const c of cases) {
    expect(c.name.length).toBeGreaterThan(0);
    expect(c.classname.length).toBeGreaterThan(0);
    expect(Number(c.time)).toBeGreaterThanOrEqual(0);
    expect(c["system-out"]).toMatch(/verdict: /);
    if (c.failure) expect(c.failure.message.length).toBeGreaterThan(0);
  }
  return cases;
}

let api: ServerProcess;
let env: Record<string, string>;
let tmp: string;

beforeAll(async () => {
  const { key } = await makeOrgWithKey();
  api = await startServerProcess();
  env = { PARITAS_API: `${api.base}/api/v1`, PARITAS_KEY: key };
  tmp = mkdtempSync(join(tmpdir(), "paritas-claims-cli-"));
}, 90_000);

afterAll(async () => {
  await api?.kill9();
  if (tmp) rmSync(tmp, { recursive: true, force: true });
});

describe("paritas-claims check against the API", { timeout: 60_000 }, () => {
  it("exit 0 when every claim holds; the table and the JUnit report carry each verdict", async () => {
    const junit = join(tmp, "holding.xml");
    const r = await cli(["check", `${FIX}/holding.yaml`, "--junit", junit], env);
    expect(r.stderr).toBe("");
    expect(r.code).toBe(0);
    const rows = r.stdout.split("\n");
    expect(rows[0]).toMatch(/^name\s+label\s+verdict\s+rate\s+interval\s+reasoning$/);
    // Rule of three, exactly: 0 errors in n bits → one-sided 95 % upper bound 1 − 0.05^(1/n) (Clopper & Pearson 1934); n = 3e9 gives 9.986e-10 ≤ 1e-9.
    const upper = -Math.expm1(Math.log(0.05) / 3e9);
    expect(upper).toBeLessThan(1e-9);
    expect(rows.find((l) => l.startsWith("soak at line rate"))).toMatch(new RegExp(`fw-2\\.4\\.1\\s+supported\\s+0\\s+\\[0, ${upper.toExponential(2).replace(".", "\\.")}\\]`));
    // Hamming (7,4) on a BSC with p = 1e-3 fails a frame when 2 or more of 7 bits flip: 1 − (1−p)^7 − 7p(1−p)^6 = 2.093e-5.
    const fer = 1 - (1 - 1e-3) ** 7 - 7e-3 * (1 - 1e-3) ** 6;
    expect(rows.find((l) => l.startsWith("hamming frames"))).toMatch(new RegExp(`fw-2\\.4\\.1/modem\\s+supported\\s+${fer.toExponential(2).replace(".", "\\.")}`));
    expect(r.stdout).toContain("2 of 2 claims hold.");

    const cases = expectJunitShape(readJunit(junit), { tests: 2, failures: 0, errors: 0, skipped: 0 });
    expect(cases.map((c) => [c.name, c.classname])).toEqual([
      ["soak at line rate", "fw-2.4.1"],
      ["hamming frames on a noisy BSC", "fw-2.4.1/modem"],
    ]);
    expect(cases.every((c) => !c.failure && !c.skipped && !c.error)).toBe(true);
    expect(cases[1]!["system-out"]).toContain("reasoning: Hamming (7,4)");
  });

  it("a JSON claims file works the same, with the file's confidence as the default", async () => {
    const r = await cli(["check", `${FIX}/holding.json`], env);
    expect(r.code).toBe(0);
    // Uncoded QPSK at Eb/N0 = 10.6 dB: BER = Q(√(2·10^1.06)) = 8.257e-7 (scipy.stats.norm.sf), within the data-strict preset 1e-6.
    expect(r.stdout).toMatch(/uncoded QPSK at 10\.6 dB\s+fw-2\.4\.1\s+supported\s+8\.26e-7/);
  });

  it("exit 1 when a claim is refuted: <failure> with a message in the JUnit report", async () => {
    const junit = join(tmp, "refuted.xml");
    const r = await cli(["check", `${FIX}/refuted.yaml`, "--junit", junit], env);
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(/frames after decoding\s+fw-2\.5\.0-rc2\s+refuted\s+5e-5/);
    expect(r.stdout).toContain("1 of 2 claims hold; not holding: frames after decoding (refuted).");
    const cases = expectJunitShape(readJunit(junit), { tests: 2, failures: 1, errors: 0, skipped: 0 });
    const failed = cases.find((c) => c.name === "frames after decoding")!;
    expect(failed.failure!.type).toBe("refuted");
    expect(failed.failure!.message).toMatch(/^refuted: 50 errors in 1,000,000 frames/);
    // One-sided 95 % lower bound for 50 in 1e6: Beta(0.05; 50, 999951) = 3.8965e-5 (scipy.stats.beta.ppf; the χ²(100) table's 77.93 / 2e6 agrees to 1e-5).
    const lower = Number(/interval: \[([^,]+),/.exec(failed["system-out"])![1]);
    expect(lower).toBeCloseTo(3.8965e-5, 8);
    expect(cases.find((c) => c.name === "soak holds")!.failure).toBeUndefined();
  });

  it("inconclusive fails the run under `inconclusive: fail` and passes, skipped, under `pass`", async () => {
    // 0 errors in 1e9 bits: upper bound 1 − 0.05^(1e-9) = 2.996e-9 > 1e-9, lower bound 0 → neither shown.
    const failJunit = join(tmp, "inc-fail.xml");
    const failing = await cli(["check", `${FIX}/inconclusive-fail.yaml`, "--junit", failJunit], env);
    expect(failing.code).toBe(1);
    expect(failing.stdout).toMatch(/short soak\s+fw-2\.5\.0-rc3\s+inconclusive\s+0\s+\[0, 3e-9\]/);
    const f = expectJunitShape(readJunit(failJunit), { tests: 1, failures: 1, errors: 0, skipped: 0 });
    expect(f[0]!.failure!.type).toBe("inconclusive");

    const passJunit = join(tmp, "inc-pass.xml");
    const passing = await cli(["check", `${FIX}/inconclusive-pass.yaml`, "--junit", passJunit], env);
    expect(passing.code).toBe(0);
    expect(passing.stdout).toContain("(inconclusive claims pass by the file's policy)");
    const p = expectJunitShape(readJunit(passJunit), { tests: 1, failures: 0, errors: 0, skipped: 1 });
    expect(p[0]!.skipped).toBeDefined();
    expect(p[0]!.failure).toBeUndefined();
  });

  it("exit 2 on a bad YAML file: each bad entry with its line and field, nothing sent", async () => {
    const r = await cli(["check", `${FIX}/bad-entries.yaml`], env);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toContain("The claims file has 2 problems:");
    expect(r.stderr).toContain(`${FIX}/bad-entries.yaml:11: claims[1].evidence.errors: there cannot be more errors than trials`);
    expect(r.stderr).toContain(`${FIX}/bad-entries.yaml:14: claims[2].evidence.mode: \`mode\` must be analytic, measured or simulated`);
    expect(r.stderr).not.toMatch(/\n\s+at /);
  });

  it("exit 2 on a bad JSON file: a field out of range, and a syntax error, each with its line", async () => {
    const entries = await cli(["check", `${FIX}/bad-entries.json`], env);
    expect(entries.code).toBe(2);
    expect(entries.stderr).toContain(`${FIX}/bad-entries.json:6: claims[0].target.atMost: \`atMost\` is a rate above 0 and below 1`);
    const syntax = await cli(["check", `${FIX}/bad-syntax.json`], env);
    expect(syntax.code).toBe(2);
    expect(syntax.stderr).toMatch(new RegExp(`${FIX}/bad-syntax\\.json:4: not valid JSON`));
  });

  it("exit 2 when the API refuses a claim's evidence: the line of the field it names", async () => {
    const r = await cli(["check", `${FIX}/refused-code.yaml`], env);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(new RegExp(`${FIX}/refused-code\\.yaml:7: claims\\[0\\]\\.evidence\\.code\\.r: the API refused "no such Hamming code": `));
  });

  it("exit 2 on a missing file", async () => {
    const r = await cli(["check", `${FIX}/no-such.yaml`], env);
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toBe(`Cannot read the claims file ${FIX}/no-such.yaml: no such file.`);
  });

  it("exit 3 when the API cannot be reached, when the key is refused, and when there is no key", async () => {
    const closed = createServer();
    await new Promise<void>((ok) => closed.listen(0, "127.0.0.1", () => ok()));
    const port = (closed.address() as AddressInfo).port;
    await new Promise<void>((ok) => closed.close(() => ok()));
    const down = await cli(["check", `${FIX}/holding.yaml`], { ...env, PARITAS_API: `http://127.0.0.1:${port}/api/v1` });
    expect(down.code).toBe(3);
    expect(down.stderr.trim().split("\n")).toHaveLength(1);
    expect(down.stderr).toMatch(/^Cannot reach the Paritas API at http:\/\/127\.0\.0\.1:\d+\/api\/v1/);

    const forged = await cli(["check", `${FIX}/holding.yaml`], { ...env, PARITAS_KEY: `${env.PARITAS_KEY!.slice(0, -4)}AAAA` });
    expect(forged.code).toBe(3);
    expect(forged.stderr.trim().split("\n")).toHaveLength(1);
    expect(forged.stderr).toMatch(/refused the key \(401\)/);

    const { key: computeOnly } = await makeOrgWithKey({ scopes: ["compute"] });
    const scoped = await cli(["check", `${FIX}/holding.yaml`], { ...env, PARITAS_KEY: computeOnly });
    expect(scoped.code).toBe(3);
    expect(scoped.stderr).toMatch(/refused the key for a claim \(403\)/);

    const none = await cli(["check", `${FIX}/holding.yaml`], { ...env, PARITAS_KEY: "" });
    expect(none.code).toBe(3);
    expect(none.stderr).toMatch(/^No API key: set PARITAS_KEY/);
  });
});

describe("paritas-claims plan and help", { timeout: 60_000 }, () => {
  it("plan prints bits and times for 0..2 errors", async () => {
    const r = await cli(["plan", "--target", "1e-9", "--confidence", "0.95", "--errors", "0..2", "--line-rate", "1e9"], env);
    expect(r.code).toBe(0);
    const rows = r.stdout.split("\n").filter((l) => /^\d\s/.test(l));
    expect(rows.map((l) => Number(l.split(/\s+/)[0]))).toEqual([0, 1, 2]);
    // Exact binomial length for 0 errors: smallest n with (1 − 1e-9)^n ≤ 0.05, n = ⌈ln 0.05 / ln(1 − 1e-9)⌉ (rule of three: about 3e9).
    const n0 = Math.ceil(Math.log(0.05) / Math.log1p(-1e-9));
    expect(rows[0]).toContain(n0.toLocaleString("en"));
    // χ²(0.95; 2(k+1))/2 for k = 1, 2: 4.744 and 6.296 (chi-square table) → 4.74e9 and 6.30e9 bits, 4.74 s and 6.30 s at 1 Gbit/s.
    expect(rows[1]).toMatch(/^1\s+4,74\d,\d{3},\d{3}\s+4\.74 s/);
    expect(rows[2]).toMatch(/^2\s+6,29\d,\d{3},\d{3}\s+6\.30 s/);
  });

  it("plan refuses an out-of-range option with exit 2 and names the option", async () => {
    const r = await cli(["plan", "--target", "1e-9", "--confidence", "2"], env);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--confidence: /);
    const bad = await cli(["plan", "--target", "1e-9", "--errors", "3..1"], env);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toContain("runs backwards");
  });

  it("--help for each command exits 0 and names its options", async () => {
    const top = await cli(["--help"], {});
    expect(top.code).toBe(0);
    expect(top.stdout).toMatch(/check \[options\] <file>/);
    expect(top.stdout).toMatch(/plan \[options\]/);
    const check = await cli(["check", "--help"], {});
    expect(check.code).toBe(0);
    for (const o of ["--api <url>", "--junit <path>", "--wait <seconds>", "--every <seconds>"]) expect(check.stdout).toContain(o);
    const plan = await cli(["plan", "--help"], {});
    expect(plan.code).toBe(0);
    for (const o of ["--target <ber>", "--confidence <fraction>", "--errors <k or a..b>", "--line-rate <bit/s>"]) expect(plan.stdout).toContain(o);
  });
});

describe("pending claims against a stand-in server", { timeout: 60_000 }, () => {
  // The stand-in answers as the API does for simulated evidence: 202 + Location with verdict pending, then the claim
  // stays pending until decided. It is not the API: only the CLI's polling is under test here.
  let fake: Server;
  let base = "";
  const seen: string[] = [];
  let decideAfter = 2;
  let gets = 0;
  const ID = "clm-0000pending0001";
  const pending = { id: ID, label: "fw-2.6.0", createdAt: "2026-12-03T10:00:00.000Z", decidedAt: null, target: { metric: "fer", atMost: 1e-4 }, confidence: 0.95, mode: "simulated", verdict: "pending", rate: null, exact: false, interval: null, reasoning: "The simulation is running.", details: {}, simulation: "/simulations/sim-0000pending0001", evidence: {}, caution: "" };

  beforeAll(async () => {
    fake = createServer((req, res) => {
      seen.push(`${req.method} ${req.url} ${req.headers.authorization}`);
      req.resume();
      req.on("end", () => {
        if (req.method === "POST" && req.url === "/api/v1/claims") {
          res.writeHead(202, { "content-type": "application/json", location: `/api/v1/claims/${ID}` });
          res.end(JSON.stringify(pending));
          return;
        }
        gets++;
        const body =
          gets < decideAfter
            ? pending
            : { ...pending, verdict: "supported", decidedAt: "2026-12-03T10:00:05.000Z", rate: 2e-5, exact: false, interval: { lower: 1e-5, upper: 4e-5, method: "a confidence sequence" }, reasoning: "The simulation put the FER at most 4e-5.", details: {} };
        res.writeHead(200, { "content-type": "application/json" });
        res.end(JSON.stringify(body));
      });
    });
    await new Promise<void>((ok) => fake.listen(0, "127.0.0.1", () => ok()));
    base = `http://127.0.0.1:${(fake.address() as AddressInfo).port}/api/v1`;
  });
  afterAll(() => new Promise<void>((ok) => fake.close(() => ok())));

  it("202 then pending then a verdict: polls the Location, a line per change, exit 0", async () => {
    [seen.length, gets, decideAfter] = [0, 0, 2];
    const junit = join(tmp, "pending.xml");
    const r = await cli(["check", `${FIX}/simulated.yaml`, "--junit", junit], { PARITAS_API: base, PARITAS_KEY: "test.prt1.stand-in" });
    expect(r.code).toBe(0);
    expect(seen).toEqual([
      "POST /api/v1/claims Bearer test.prt1.stand-in",
      `GET /api/v1/claims/${ID} Bearer test.prt1.stand-in`,
      `GET /api/v1/claims/${ID} Bearer test.prt1.stand-in`,
    ]);
    // Not a terminal: one plain line per change of state (CI logs), none rewritten in place.
    expect(r.stderr.split("\n").filter(Boolean)).toEqual([
      "simulated hamming: pending (simulation /simulations/sim-0000pending0001)",
      expect.stringMatching(/^simulated hamming: supported after \d+ s$/),
    ]);
    expect(r.stderr).not.toContain("\r");
    expect(r.stdout).toMatch(/simulated hamming\s+fw-2\.6\.0\s+supported\s+2e-5\s+\[1e-5, 4e-5\]/);
    const cases = expectJunitShape(readJunit(junit), { tests: 1, failures: 0, errors: 0, skipped: 0 });
    expect(cases[0]!["system-out"]).toContain("simulation: /simulations/sim-0000pending0001");
  });

  it("a claim still pending when the wait ends: exit 1 and a JUnit <error>", async () => {
    [seen.length, gets, decideAfter] = [0, 0, Infinity];
    const junit = join(tmp, "undecided.xml");
    const r = await cli(["check", `${FIX}/simulated.yaml`, "--junit", junit, "--wait", "1", "--every", "0.3"], { PARITAS_API: base, PARITAS_KEY: "test.prt1.stand-in" });
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(/simulated hamming\s+fw-2\.6\.0\s+undecided/);
    const cases = expectJunitShape(readJunit(junit), { tests: 1, failures: 0, errors: 1, skipped: 0 });
    expect(cases[0]!.error!.message).toContain(`claim ${ID} may still be decided later`);
  });
});

describe("simulated claims against the API and a job runner", { timeout: 180_000 }, () => {
  let runner: ChildProcess | undefined;
  beforeAll(() => {
    runner = spawn(process.execPath, ["--import", "tsx", "scripts/worker.ts"], { env: { ...process.env, PARITAS_BATCH_THREADS: "1" }, stdio: "ignore" });
  });
  afterAll(() => {
    runner?.kill("SIGKILL");
  });

  it("one claim in each mode holds: exit 0, the simulated one followed until decided", async () => {
    const junit = join(tmp, "three-modes.xml");
    const r = await cli(["check", `${FIX}/three-modes.yaml`, "--junit", junit], env);
    expect(r.code).toBe(0);
    expect(r.stderr).toMatch(/^simulated frames: pending \(simulation \/simulations\/sim-[0-9a-z]+\)\nsimulated frames: supported after \d+ s\n$/);
    // The simulated Hamming (7,4) FER at p = 1e-3 estimates 2.093e-5 (the enumeration above); the claim's bound 1e-4 is five times that.
    const sim = r.stdout.split("\n").find((l) => l.startsWith("simulated frames"))!;
    expect(sim).toMatch(/fw-2\.7\.0\s+supported\s/);
    const cases = expectJunitShape(readJunit(junit), { tests: 3, failures: 0, errors: 0, skipped: 0 });
    expect(cases[2]!["system-out"]).toMatch(/simulation: \/simulations\/sim-/);
  });

  it("a simulated claim the simulation refutes: exit 1", async () => {
    const r = await cli(["check", `${FIX}/simulated-refuted.yaml`], env);
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(/uncoded link at p = 1e-2\s+fw-2\.7\.0\s+refuted\s/);
  });
});

describe("the bundled command", { timeout: 120_000 }, () => {
  it("builds to one file that runs without the checkout's TypeScript and gives the same verdicts", async () => {
    execFileSync(process.execPath, ["packages/cli/scripts/build.mjs"], { stdio: "pipe" });
    expect(readFileSync(BUNDLE[0]!, "utf8").startsWith("#!/usr/bin/env node\n")).toBe(true);
    const r = await cli(["check", `${FIX}/refuted.yaml`], env, BUNDLE);
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(/frames after decoding\s+fw-2\.5\.0-rc2\s+refuted/);
  });
});
