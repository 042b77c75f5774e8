/**
 * End-to-end harness: one production build, one `next start` server, one fake SMTP server, one
 * billing stand-in and one headless Chromium per test file, on a throw-away SQLite database seeded
 * with the demo org; the job runner and the usage reporter run beside the server, as in the demo.
 *
 *   const e2e = await startE2E();      // in beforeAll (allow several minutes: it may build)
 *   const s = await e2e.session();     // a fresh browser context + page per test
 *   ...
 *   await s.close();                   // fails if any request left 127.0.0.1 or a page threw
 *   await e2e.stop();                  // in afterAll: kills the server's process group, cleans up
 *
 * Nothing here reaches beyond the loopback interface; every page request is recorded and a
 * request to any host other than 127.0.0.1 fails the session.
 */
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { existsSync, mkdirSync, mkdtempSync, readdirSync, rmSync, statSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import axe from "axe-core";
import { chromium, type Browser, type BrowserContext, type Locator, type Page } from "playwright-core";
import { expect } from "vitest";
import { migrate, openDb } from "@/db";
import { seedDemo } from "@/db/seed/demo";
import { startFakeBilling, type FakeBilling } from "@/fakes/billing";
import { waitForMessage } from "@/fakes/mailbox";
import { startFakeSmtp, type FakeSmtp } from "@/fakes/smtp";

export const ROOT = fileURLToPath(new URL("../../", import.meta.url)).replace(/\/$/, "");
export const SCREENSHOT_DIR = join(ROOT, "tests", "e2e", "screenshots");
export const CHROMIUM = process.env.PARITAS_E2E_CHROMIUM ?? "/usr/bin/chromium";

export const DESKTOP = { width: 1280, height: 800 } as const;
export const PHONE = { width: 390, height: 844 } as const;

const CHROMIUM_ARGS = [
  "--no-sandbox",
  "--disable-gpu",
  "--disable-background-networking",
  "--disable-component-update",
  "--no-first-run",
  "--disable-sync",
  "--disable-quic",
];

/** What the production build is made from; a file newer than .next/BUILD_ID means the build is stale. */
const BUILD_INPUTS = ["app", "components", "lib", "db", "migrations", "openapi", "fakes", "public", "instrumentation.ts", "instrumentation-client.ts", "proxy.ts", "next.config.ts", "postcss.config.mjs", "tsconfig.json", "package.json", "package-lock.json"];

function newestMtime(path: string): number {
  if (!existsSync(path)) return 0;
  const st = statSync(path);
  if (!st.isDirectory()) return st.mtimeMs;
  let newest = st.mtimeMs;
  for (const entry of readdirSync(path)) {
    if (entry === "node_modules" || entry.startsWith(".")) continue;
    newest = Math.max(newest, newestMtime(join(path, entry)));
  }
  return newest;
}

/** Why the build must be (re)made, or null when .next holds a production build newer than every source. */
export function buildStaleReason(): string | null {
  const id = join(ROOT, ".next", "BUILD_ID");
  if (!existsSync(id)) return ".next/BUILD_ID is missing";
  const built = statSync(id).mtimeMs;
  for (const input of BUILD_INPUTS) {
    const t = newestMtime(join(ROOT, input));
    if (t > built) return `${input} changed after the last build`;
  }
  return null;
}

/** `npm run build` (prebuild copies the vendored assets, then `next build`) unless the build is fresh. PARITAS_E2E_BUILD=always forces it. */
export function ensureBuild(log: (s: string) => void = (s) => console.log(s)): { built: boolean; ms: number } {
  const reason = process.env.PARITAS_E2E_BUILD === "always" ? "PARITAS_E2E_BUILD=always" : buildStaleReason();
  if (!reason) return { built: false, ms: 0 };
  log(`e2e: building the app (${reason})…`);
  const t0 = Date.now();
  const r = spawnSync("npm", ["run", "build"], {
    cwd: ROOT,
    env: { ...process.env, NODE_ENV: "production", NEXT_TELEMETRY_DISABLED: "1" },
    encoding: "utf8",
    maxBuffer: 64 * 1024 * 1024,
  });
  if (r.status !== 0) throw new Error(`next build failed (exit ${r.status}):\n${(r.stdout ?? "").slice(-4000)}\n${(r.stderr ?? "").slice(-4000)}`);
  const ms = Date.now() - t0;
  log(`e2e: build done in ${(ms / 1000).toFixed(0)} s`);
  return { built: true, ms };
}

/** A free TCP port on the loopback interface. */
export function freePort(): Promise<number> {
  return new Promise((ok, fail) => {
    const srv = createServer();
    srv.unref();
    srv.once("error", fail);
    srv.listen(0, "127.0.0.1", () => {
      const addr = srv.address();
      const port = typeof addr === "object" && addr ? addr.port : 0;
      srv.close(() => ok(port));
    });
  });
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** The server's own output, kept for the error message when it does not come up or a test fails. */
class OutputTail {
  private chunks: string[] = [];
  push(b: Buffer) {
    this.chunks.push(b.toString("utf8"));
    if (this.chunks.length > 400) this.chunks.splice(0, this.chunks.length - 400);
  }
  text(max = 6000) {
    return this.chunks.join("").slice(-max);
  }
}

export interface Session {
  context: BrowserContext;
  page: Page;
  /** Every request a page of this context made to a host other than 127.0.0.1. */
  offHost: string[];
  /** Uncaught exceptions in the pages of this context. */
  pageErrors: string[];
  /** console.error lines (reported, not failed on: React logs some of them on purpose). */
  consoleErrors: string[];
  /** Content Security Policy violations, from the console and from `securitypolicyviolation` events; any one fails the session. */
  cspViolations: string[];
  /** The session cookie header of this context, for calling console routes from the test. */
  cookieHeader(): Promise<string>;
  /** Close the context; throws if a request left the loopback host or a page threw. */
  close(): Promise<void>;
}

export interface SessionOptions {
  viewport?: { width: number; height: number };
  /** false: the page as a browser sees it before (or without) its script. */
  javaScriptEnabled?: boolean;
}

export interface E2E {
  baseUrl: string;
  port: number;
  dbFile: string;
  mailboxDir: string;
  smtp: FakeSmtp;
  /** The billing provider's stand-in; its control endpoints (/_stand-in/…) take `Bearer <secretKey>`. */
  billing: FakeBilling & { secretKey: string };
  browser: Browser;
  build: { built: boolean; ms: number };
  serverOutput(): string;
  session(opts?: SessionOptions): Promise<Session>;
  stop(): Promise<void>;
}

async function waitForHealth(url: string, child: ChildProcess, out: OutputTail, timeoutMs: number): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    if (child.exitCode !== null || child.signalCode !== null) throw new Error(`next start exited (${child.exitCode ?? child.signalCode}) before it answered:\n${out.text()}`);
    try {
      const res = await fetch(url, { signal: AbortSignal.timeout(2000) });
      if (res.ok) return;
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) throw new Error(`no answer from ${url} within ${timeoutMs} ms:\n${out.text()}`);
    await sleep(150);
  }
}

function killGroup(child: ChildProcess, signal: NodeJS.Signals) {
  if (child.pid === undefined) return;
  try {
    process.kill(-child.pid, signal); // the whole process group: npm-less, but next start forks its server
  } catch {
    // already gone
  }
}

async function stopServer(child: ChildProcess): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return;
  const exited = new Promise<void>((ok) => child.once("exit", () => ok()));
  killGroup(child, "SIGTERM");
  const timedOut = await Promise.race([exited.then(() => false), sleep(5000).then(() => true)]);
  if (timedOut) {
    killGroup(child, "SIGKILL");
    await Promise.race([exited, sleep(2000)]);
  }
}

/** Build if needed, seed a fresh database, start SMTP + server + Chromium; `env` adds to the server's environment (a short confirmation window, say). */
export async function startE2E(opts: { env?: Record<string, string> } = {}): Promise<E2E> {
  const build = ensureBuild();
  const tmp = mkdtempSync(join(tmpdir(), "paritas-e2e-"));
  const dbFile = join(tmp, "paritas.db");
  const mailboxDir = join(tmp, "mailbox");
  mkdirSync(mailboxDir);

  // Migrate and seed with our own connection, then close it: the server opens the same file.
  const db = openDb(dbFile);
  try {
    await migrate(db);
    await seedDemo(db);
  } finally {
    await db.destroy();
  }

  const smtp = await startFakeSmtp({ port: 0, dir: mailboxDir });
  const port = await freePort();
  const baseUrl = `http://127.0.0.1:${port}`;
  // Its webhooks go to the server, retried until the server is up; fresh secrets every run.
  const billingSecretKey = `e2e-${randomBytes(12).toString("hex")}`;
  const webhookSecret = `e2e-${randomBytes(24).toString("hex")}`;
  const billing = await startFakeBilling({ port: 0, stateFile: join(tmp, "billing-stand-in.json"), secretKey: billingSecretKey, webhookUrl: `${baseUrl}/api/webhooks/billing`, webhookSecret });
  const out = new OutputTail();
  const env: NodeJS.ProcessEnv = {
    PATH: process.env.PATH,
    HOME: process.env.HOME,
    TMPDIR: process.env.TMPDIR,
    NODE_ENV: "production",
    PARITAS_DB_FILE: dbFile,
    PARITAS_SMTP_URL: `smtp://127.0.0.1:${smtp.port}`,
    PARITAS_MAILBOX_DIR: mailboxDir,
    PARITAS_DEV_MAILBOX: "1",
    PARITAS_AUTH_SECRET: randomBytes(32).toString("base64url"),
    NEXTAUTH_URL: baseUrl,
    NEXT_TELEMETRY_DISABLED: "1",
    PARITAS_BILLING_SECRET_KEY: billingSecretKey,
    PARITAS_BILLING_HOST: "127.0.0.1",
    PARITAS_BILLING_PORT: String(billing.port),
    PARITAS_BILLING_PROTOCOL: "http",
    PARITAS_BILLING_WEBHOOK_SECRET: webhookSecret,
    ...opts.env,
  };
  const child = spawn(join(ROOT, "node_modules", ".bin", "next"), ["start", "-H", "127.0.0.1", "-p", String(port)], {
    cwd: ROOT,
    env,
    detached: true, // its own process group, so stop() can take down every process it forks
    stdio: ["ignore", "pipe", "pipe"],
  });
  child.stdout!.on("data", (b: Buffer) => out.push(b));
  child.stderr!.on("data", (b: Buffer) => out.push(b));
  // The job runner beside it, as the demo runs it (simulations started from the console run here).
  const runner = spawn(join(ROOT, "node_modules", ".bin", "tsx"), ["scripts/worker.ts"], { cwd: ROOT, env, detached: true, stdio: ["ignore", "pipe", "pipe"] });
  runner.stdout!.on("data", (b: Buffer) => out.push(b));
  runner.stderr!.on("data", (b: Buffer) => out.push(b));
  // The usage reporter too: live usage goes to the billing stand-in as meter events, so a closed period invoices it.
  const reporter = spawn(join(ROOT, "node_modules", ".bin", "tsx"), ["scripts/billing-reporter.ts"], { cwd: ROOT, env, detached: true, stdio: ["ignore", "pipe", "pipe"] });
  reporter.stdout!.on("data", (b: Buffer) => out.push(b));
  reporter.stderr!.on("data", (b: Buffer) => out.push(b));

  let browser: Browser | undefined;
  const cleanup = async () => {
    await browser?.close().catch(() => undefined);
    await stopServer(reporter);
    await stopServer(runner);
    await stopServer(child);
    await billing.close().catch(() => undefined);
    await smtp.close().catch(() => undefined);
    rmSync(tmp, { recursive: true, force: true });
  };

  try {
    await waitForHealth(`${baseUrl}/api/health`, child, out, 60_000);
    // Default temporary profile: Playwright makes a fresh user-data dir for the launch and deletes it on close;
    // every session() below is a new, empty browser context on top of it.
    browser = await chromium.launch({ executablePath: CHROMIUM, headless: true, args: CHROMIUM_ARGS });
  } catch (e) {
    await cleanup();
    throw e;
  }
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  const b = browser;

  async function session(opts: SessionOptions = {}): Promise<Session> {
    const context = await b.newContext({
      viewport: opts.viewport ?? DESKTOP,
      javaScriptEnabled: opts.javaScriptEnabled ?? true,
      locale: "en-GB",
      timezoneId: "UTC",
      colorScheme: "light",
    });
    context.setDefaultTimeout(15_000);
    const offHost: string[] = [];
    const pageErrors: string[] = [];
    const consoleErrors: string[] = [];
    const cspViolations: string[] = [];
    // Chromium logs most refusals to the console, but not every one (a blocked inline style attribute, say); the event sees them all.
    await context.exposeBinding("__paritasCspViolation", ({ page }, text: string) => void cspViolations.push(`${page.url()}: ${text}`));
    await context.addInitScript(() => {
      document.addEventListener("securitypolicyviolation", (e) => {
        const report = (window as unknown as { __paritasCspViolation(text: string): void }).__paritasCspViolation;
        report(`${e.disposition} ${e.effectiveDirective}: ${e.blockedURI || "inline"} (${e.sourceFile || "?"}:${e.lineNumber})`);
      });
    });
    const watch = (page: Page) => {
      page.on("request", (req) => {
        const url = req.url();
        if (url.startsWith("data:") || url.startsWith("blob:") || url === "about:blank") return;
        try {
          if (new URL(url).hostname !== "127.0.0.1") offHost.push(url);
        } catch {
          offHost.push(url);
        }
      });
      page.on("pageerror", (err) => pageErrors.push(`${page.url()}: ${err.message}`));
      page.on("console", (msg) => {
        if (/violates the following Content Security Policy directive/.test(msg.text())) cspViolations.push(`${page.url()}: ${msg.text()}`);
        else if (msg.type() === "error") consoleErrors.push(`${page.url()}: ${msg.text()}`);
      });
      page.on("response", (res) => {
        // Failed loads, for the report next to the console errors (several are expected refusals: 401, 403).
        if (res.status() >= 400) consoleErrors.push(`${page.url()}: ${res.request().method()} ${res.url()} → ${res.status()}`);
      });
    };
    context.on("page", watch);
    const page = await context.newPage();
    return {
      context,
      page,
      offHost,
      pageErrors,
      consoleErrors,
      cspViolations,
      async cookieHeader() {
        return (await context.cookies(baseUrl)).map((c) => `${c.name}=${c.value}`).join("; ");
      },
      async close() {
        await context.close();
        if (consoleErrors.length) console.warn(`e2e: console errors:\n  ${consoleErrors.join("\n  ")}`);
        if (offHost.length) throw new Error(`requests left 127.0.0.1:\n  ${offHost.join("\n  ")}`);
        if (pageErrors.length) throw new Error(`uncaught errors in the page:\n  ${pageErrors.join("\n  ")}`);
        if (cspViolations.length) throw new Error(`Content Security Policy violations:\n  ${cspViolations.join("\n  ")}`);
      },
    };
  }

  return {
    baseUrl,
    port,
    dbFile,
    mailboxDir,
    smtp,
    billing: { ...billing, secretKey: billingSecretKey },
    browser: b,
    build,
    serverOutput: () => out.text(),
    session,
    stop: cleanup,
  };
}

/**
 * Run `fn` in a fresh browser session of `e2e` and close it after (failing on off-host requests, page errors and
 * CSP violations). A failure says where the page was and what it showed: a git-ignored *.tmp.png next to the
 * screenshots, the page's alerts, and the server's last output.
 */
export async function inSession(e2e: E2E, fn: (s: Session) => Promise<void>, opts?: SessionOptions): Promise<void> {
  const s = await e2e.session(opts);
  try {
    await fn(s);
  } catch (err) {
    const name = `failure-${expect.getState().currentTestName?.replace(/\W+/g, "-").slice(0, 80) ?? "test"}.tmp`;
    const shot = await screenshot(s.page, name).catch(() => "(no screenshot)");
    const alerts = await s.page.getByRole("alert").allInnerTexts().catch(() => []);
    await s.context.close().catch(() => undefined);
    throw new Error(
      `${(err as Error).message}\n--- page: ${s.page.url()} (${shot}); alerts: ${JSON.stringify(alerts)}\n--- last server output ---\n${e2e.serverOutput().slice(-2000)}`,
      { cause: err },
    );
  }
  await s.close();
}

/** Save a screenshot of the viewport under tests/e2e/screenshots/<name>.png, once fonts have loaded. */
export async function screenshot(page: Page, name: string): Promise<string> {
  await page.evaluate(() => document.fonts.ready.then(() => undefined));
  const path = join(SCREENSHOT_DIR, `${name}.png`);
  await page.screenshot({ path, animations: "disabled", caret: "hide" });
  return path;
}

/** The WCAG 2.1 A and AA rules axe-core checks automatically (it cannot judge everything: keyboard order and wording still need eyes). */
const AXE_TAGS = ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa"];

/**
 * What axe-core finds wrong with the page as it is now, one line per rule and element: its
 * violations, and the checks it could not decide except colour contrast over a background image
 * or a chart (the squared-paper grid, recharts' SVG), which it never can.
 */
export async function accessibilityProblems(page: Page): Promise<string[]> {
  // axe-core's own engine, injected into the page (its Playwright wrapper asks for Node 22).
  if (!(await page.evaluate(() => "axe" in window))) await page.addScriptTag({ content: axe.source });
  const result = await page.evaluate((tags) => (window as unknown as { axe: typeof axe }).axe.run(document, { runOnly: { type: "tag", values: tags } }), AXE_TAGS);
  const undecided = result.incomplete.filter((r) => r.id !== "color-contrast");
  return [...result.violations, ...undecided].flatMap((v) =>
    v.nodes.map((n) => `${v.id} (${v.impact}): ${v.help} — ${n.target.join(" ")}${n.failureSummary ? ` — ${n.failureSummary.replace(/\s+/g, " ")}` : ""}`),
  );
}

/** Screenshot the page under `name` and check it with axe-core; fails on any WCAG 2.1 A/AA problem it finds. */
export async function capture(page: Page, name: string): Promise<void> {
  // After a client-side navigation the new page's <title> arrives a moment after its content; a page without
  // one still fails the check below once this wait runs out.
  await page.waitForFunction(() => document.title.trim() !== "", null, { timeout: 5000 }).catch(() => undefined);
  await screenshot(page, name);
  const problems = await accessibilityProblems(page);
  if (problems.length) throw new Error(`accessibility problems on ${name} (${page.url()}):\n  ${problems.join("\n  ")}`);
}

/** The first http(s) URL in a mail's text that starts with `prefix`. */
export function linkIn(text: string, prefix: string): string {
  const url = text.match(/https?:\/\/[^\s<>"]+/g)?.find((u) => u.startsWith(prefix));
  if (!url) throw new Error(`no link starting with ${prefix} in:\n${text}`);
  return url;
}

/**
 * Resolves once React has hydrated the element: before that a click on a submit button does a
 * plain HTML form submission instead of running the page's handler.
 */
export async function hydrated(locator: Locator): Promise<void> {
  await locator.waitFor();
  await locator.evaluate(
    (el) =>
      new Promise<void>((ok) => {
        const done = () => Object.keys(el).some((k) => k.startsWith("__reactProps$"));
        if (done()) return ok();
        const t = setInterval(() => {
          if (done()) {
            clearInterval(t);
            ok();
          }
        }, 25);
      }),
  );
}

/**
 * Ask for a sign-in link on /signin, read it from the fake mailbox and follow it; resolves once
 * the browser has left next-auth's callback (on the console, or on the page the sign-in was for).
 * `fromCurrentPage` keeps the page where it is (already on /signin, with its callbackUrl).
 */
export async function signInWithLink(
  e2e: E2E,
  page: Page,
  email: string,
  opts: { screenshotAs?: string; checkMailScreenshotAs?: string; fromCurrentPage?: boolean } = {},
): Promise<{ link: string; checkMailScrollY: number }> {
  const since = new Date();
  if (!opts.fromCurrentPage) await page.goto(`${e2e.baseUrl}/signin`);
  const send = page.getByRole("button", { name: "E-mail me a link" });
  await hydrated(send);
  await page.getByLabel("E-mail for the link").fill(email);
  if (opts.screenshotAs) await capture(page, opts.screenshotAs);
  await send.click();
  await page.waitForURL(/\/signin\/check-mail/);
  await page.getByRole("heading", { name: "Check your inbox" }).waitFor();
  const checkMailScrollY = await page.evaluate(() => window.scrollY);
  if (opts.checkMailScreenshotAs) await capture(page, opts.checkMailScreenshotAs);
  const message = await waitForMessage(e2e.mailboxDir, email, { since, timeoutMs: 10_000 });
  const link = linkIn(message.text, `${e2e.baseUrl}/api/auth/callback/email`);
  await page.goto(link);
  await page.waitForURL((u) => u.pathname.startsWith("/console"));
  return { link, checkMailScrollY };
}

/** Sign in with e-mail and password on /signin; resolves once the console has opened. */
export async function signInWithPassword(e2e: E2E, page: Page, email: string, password: string): Promise<void> {
  await page.goto(`${e2e.baseUrl}/signin`);
  const submit = page.getByRole("button", { name: "Sign in", exact: true });
  await hydrated(submit);
  // Two fields are labelled with "E-mail"; the password form's is exactly that.
  await page.getByLabel("E-mail", { exact: true }).fill(email);
  await page.locator('input[name="password"]').fill(password);
  await submit.click();
  await page.waitForURL((u) => u.pathname.startsWith("/console"));
}

/** Wait until the console has nothing left loading: no skeletons, no "…" placeholders. */
export async function settle(page: Page): Promise<void> {
  // Not "networkidle": the router's prefetches of neighbouring sections may keep a request open.
  await page.waitForLoadState("load");
  await page.waitForFunction(() => document.querySelectorAll('[data-loading], [role="status"][aria-live="polite"] .animate-pulse').length === 0);
}

/**
 * What does not fit the width of the window, one line each: the page scrolling sideways, a box
 * that scrolls or cuts its content sideways (code listings excepted: long lines of code scroll on
 * purpose), a control or link reaching past either edge, and a select too narrow for its chosen option.
 */
export async function layoutProblems(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const problems: string[] = [];
    const width = window.innerWidth;
    const name = (el: Element) => {
      const label = el.getAttribute("aria-label") ?? (el.textContent ?? "").trim().replace(/\s+/g, " ").slice(0, 60);
      return `<${el.tagName.toLowerCase()}> "${label}"`;
    };
    const shown = (el: Element) => {
      const r = el.getBoundingClientRect();
      return r.width > 1 && r.height > 1 && getComputedStyle(el).visibility !== "hidden";
    };
    const page = document.documentElement.scrollWidth - width;
    if (page > 0) problems.push(`the page scrolls sideways by ${page} px`);
    for (const el of document.body.querySelectorAll("*")) {
      if (!shown(el) || el.closest("pre, svg, [aria-hidden='true']")) continue;
      const st = getComputedStyle(el);
      if (st.overflowX !== "visible" && el.scrollWidth > el.clientWidth + 1 && !el.querySelector(":scope > pre, :scope > code")) {
        problems.push(`${name(el)} cuts or scrolls its content sideways (${el.scrollWidth} px in ${el.clientWidth} px)`);
      }
      if (el.matches("a[href], button, select, input:not([type=hidden]), textarea, summary")) {
        const r = el.getBoundingClientRect();
        if (r.left < -1 || r.right > width + 1) problems.push(`${name(el)} reaches past the window (${Math.round(r.left)}–${Math.round(r.right)} px of ${width})`);
      }
      if (el instanceof HTMLSelectElement && el.selectedOptions[0]) {
        const ctx = document.createElement("canvas").getContext("2d")!;
        ctx.font = `${st.fontWeight} ${st.fontSize} ${st.fontFamily}`;
        const text = ctx.measureText(el.selectedOptions[0].text).width;
        const room = el.clientWidth - parseFloat(st.paddingLeft) - parseFloat(st.paddingRight);
        if (text > room + 1) problems.push(`${name(el)} shows ${Math.round(room)} px of its ${Math.round(text)} px choice "${el.selectedOptions[0].text}"`);
      }
    }
    return problems;
  });
}
