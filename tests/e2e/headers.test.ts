import { readdirSync } from "node:fs";
import { join, relative, sep } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO_ORG, DEMO_PASSWORD, DEMO_USERS } from "@/db/seed/demo";
import { ROOT, signInWithPassword, startE2E, type E2E } from "./harness";

/**
 * Every page of the app (the page.tsx files under app/, not a hand-kept list) on the production server:
 * an enforced Content-Security-Policy whose script nonce is new on every request and is the one on the
 * page's scripts, and the other security headers. The expected values are the OWASP Secure Headers
 * Project's recommendations (owasp.org/www-project-secure-headers) and Next.js's nonce guide, written
 * out here. /docs and the billing stand-in's payment page have policies of their own.
 */

/** Route paths of every page.tsx under app/: route groups "(…)" dropped, "[param]" kept. */
function pagePatterns(dir = join(ROOT, "app")): string[] {
  const out: string[] = [];
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const path = join(dir, entry.name);
    if (entry.isDirectory()) out.push(...pagePatterns(path));
    else if (entry.name === "page.tsx") {
      const segments = relative(join(ROOT, "app"), dir).split(sep).filter((s) => s && !/^\(.*\)$/.test(s));
      out.push(`/${segments.join("/")}`);
    }
  }
  return out;
}

const SAMPLE: Record<string, string> = { "[org]": DEMO_ORG.slug, "[id]": "sim_0000000000000000", "[token]": "no-such-token", "[code]": "not-found" };
const pages = pagePatterns().map((pattern) => ({ pattern, path: pattern.replace(/\[[^\]]+\]/g, (p) => SAMPLE[p] ?? "x") }));

/** The directives of a policy, by name. */
function directives(policy: string): Map<string, string[]> {
  return new Map(
    policy
      .split(";")
      .map((d) => d.trim().split(/\s+/))
      .filter((d) => d[0])
      .map(([name, ...values]) => [name!, values]),
  );
}

function expectCommonHeaders(h: Headers, what: string): void {
  expect(h.get("x-content-type-options"), what).toBe("nosniff");
  expect(h.get("referrer-policy"), what).toBe("strict-origin-when-cross-origin");
  expect(h.get("x-frame-options"), what).toBe("DENY");
  for (const feature of ["camera", "microphone", "geolocation", "payment", "usb"]) expect(h.get("permissions-policy"), what).toContain(`${feature}=()`);
  // The e2e server's public origin is http: no HSTS.
  expect(h.get("strict-transport-security"), what).toBeNull();
  expect(h.get("content-security-policy-report-only"), what).toBeNull();
}

/** The page policy's fixed directives, and its script nonce. */
function pagePolicy(h: Headers, what: string): string {
  const policy = h.get("content-security-policy");
  expect(policy, what).toBeTruthy();
  const d = directives(policy!);
  expect(d.get("default-src"), what).toEqual(["'self'"]);
  expect(d.get("object-src"), what).toEqual(["'none'"]);
  expect(d.get("base-uri"), what).toEqual(["'self'"]);
  expect(d.get("form-action"), what).toEqual(["'self'"]);
  expect(d.get("frame-ancestors"), what).toEqual(["'none'"]);
  expect(d.get("connect-src"), what).toEqual(["'self'"]);
  expect(d.get("font-src"), what).toEqual(["'self'"]);
  const script = d.get("script-src") ?? [];
  expect(script, what).toContain("'strict-dynamic'");
  expect(script, what).not.toContain("'unsafe-inline'");
  // A production server: no eval.
  expect(script, what).not.toContain("'unsafe-eval'");
  const nonce = script.map((s) => /^'nonce-([A-Za-z0-9+/=]+)'$/.exec(s)?.[1]).find(Boolean);
  expect(nonce, what).toBeTruthy();
  // At least 128 bits (CSP 3 §7.2 asks for that much), base64.
  expect(Buffer.from(nonce!, "base64").length, what).toBeGreaterThanOrEqual(16);
  return nonce!;
}

let e2e: E2E;
let cookie = "";
beforeAll(async () => {
  e2e = await startE2E();
  const s = await e2e.session();
  await signInWithPassword(e2e, s.page, DEMO_USERS[0]!.email, DEMO_PASSWORD);
  cookie = await s.cookieHeader();
  await s.close();
});
afterAll(async () => {
  await e2e?.stop();
});

const get = (path: string, withCookie = true) => fetch(`${e2e.baseUrl}${path}`, { redirect: "manual", headers: withCookie ? { cookie } : {} });

describe("security headers on every page", () => {
  it("finds the pages: landing, sign-in, the console's and the problem catalogue", () => {
    const patterns = pages.map((p) => p.pattern);
    for (const p of ["/", "/signin", "/console", "/console/[org]/keys", "/problems/[code]"]) expect(patterns).toContain(p);
    expect(patterns.length).toBeGreaterThanOrEqual(20);
  });

  it("each page: an enforced policy with a nonce new on every request, on every script of the page", async () => {
    for (const { path } of pages) {
      const [a, b] = [await get(path), await get(path)];
      const what = `${path} → ${a.status}`;
      expect(a.status, what).toBeLessThan(500);
      expectCommonHeaders(a.headers, what);
      const [na, nb] = [pagePolicy(a.headers, what), pagePolicy(b.headers, what)];
      expect(na, what).not.toBe(nb);
      if (a.headers.get("content-type")?.startsWith("text/html")) {
        const scripts = [...(await a.text()).matchAll(/<script\b[^>]*>/g)].map((m) => m[0]);
        expect(scripts.length, what).toBeGreaterThan(0);
        for (const tag of scripts) expect(tag, what).toContain(`nonce="${na}"`);
      }
      await b.body?.cancel();
    }
  });

  it("a signed-out visit to a console page: the redirect carries the headers too", async () => {
    const res = await get(`/console/${DEMO_ORG.slug}/keys`, false);
    expect(res.status).toBe(307);
    expect(res.headers.get("location")).toMatch(/\/signin\?callbackUrl=/);
    expectCommonHeaders(res.headers, "redirect");
  });

  it("/docs: its own policy, the start-up script by hash, no nonce, nothing inline beyond it", async () => {
    const res = await get("/docs");
    expect(res.status).toBe(200);
    expectCommonHeaders(res.headers, "/docs");
    const d = directives(res.headers.get("content-security-policy") ?? "");
    const script = d.get("script-src") ?? [];
    expect(script[0]).toBe("'self'");
    expect(script.slice(1).length).toBeGreaterThan(0);
    for (const s of script.slice(1)) expect(s).toMatch(/^'sha256-[A-Za-z0-9+/]{43}='$/);
    expect(d.get("frame-ancestors")).toEqual(["'none'"]);
    expect(d.get("object-src")).toEqual(["'none'"]);
    // The hash is that of the inline script actually served (computed here with WebCrypto).
    const html = await res.text();
    const inline = [...html.matchAll(/<script(?![^>]*\bsrc=)[^>]*>([\s\S]*?)<\/script>/g)].map((m) => m[1]!);
    expect(inline.length).toBe(script.length - 1);
    for (const body of inline) {
      const digest = Buffer.from(await crypto.subtle.digest("SHA-256", new TextEncoder().encode(body))).toString("base64");
      expect(script).toContain(`'sha256-${digest}'`);
    }
  });

  it("built assets under /_next/static are not sniffed", async () => {
    const html = await (await get("/")).text();
    const asset = /\/_next\/static\/[^"]+\.js/.exec(html)?.[0];
    expect(asset).toBeTruthy();
    const res = await get(asset!);
    expect(res.status).toBe(200);
    expect(res.headers.get("x-content-type-options")).toBe("nosniff");
    await res.body?.cancel();
  });

  it("the billing stand-in's payment pages: nothing loads, no script, never framed", async () => {
    const res = await fetch(`${e2e.billing.url}/pay/cs_no_such_session`);
    expect(res.status).toBe(404);
    const d = directives(res.headers.get("content-security-policy") ?? "");
    expect(d.get("default-src")).toEqual(["'none'"]);
    expect(d.get("script-src")).toBeUndefined();
    expect(d.get("frame-ancestors")).toEqual(["'none'"]);
    expect(d.get("form-action")).toEqual(["'self'"]);
    const style = /<style>([\s\S]*?)<\/style>/.exec(await res.text())![1]!;
    const digest = Buffer.from(await crypto.subtle.digest("SHA-256", new TextEncoder().encode(style))).toString("base64");
    expect(d.get("style-src")).toEqual([`'sha256-${digest}'`]);
  });
});
