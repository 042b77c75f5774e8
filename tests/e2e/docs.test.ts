import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DESKTOP, PHONE, screenshot, startE2E, type E2E } from "./harness";

/**
 * The API reference at /docs on the production server: the renderer loads the served document without
 * reporting validation errors (it logs them as a console warning), shows none of its own branding, and
 * shows each operation's 200 example. Session.close() fails if anything came from another host.
 */
let e2e: E2E;
beforeAll(async () => {
  e2e = await startE2E();
});
afterAll(async () => {
  await e2e?.stop();
});

describe("/docs", () => {
  it.each([
    ["1280", DESKTOP],
    ["390", PHONE],
  ] as const)("at %s px: loads the document clean, Paritas only, examples from real responses", async (width, viewport) => {
    const s = await e2e.session({ viewport });
    const warnings: string[] = [];
    s.page.on("console", (m) => {
      if (m.type() === "warning") warnings.push(m.text());
    });
    await s.page.goto(`${e2e.baseUrl}/docs`, { waitUntil: "networkidle" });
    await s.page.getByRole("heading", { name: "Paritas API" }).waitFor();
    expect(warnings.filter((w) => /validation error/i.test(w))).toEqual([]);
    // The renderer's credit links are in the page but never shown.
    for (const link of await s.page.locator('a[href*="scalar.com"]').all()) expect(await link.isVisible()).toBe(false);
    expect(await s.page.getByText(/powered by/i).filter({ visible: true }).count()).toBe(0);
    await screenshot(s.page, `docs-${width}`);
    // Hamming (7,4)'s rate, 4/7 as JSON writes it, from the stored 200 example of POST /encode.
    await s.page.goto(`${e2e.baseUrl}/docs#tag/block-codes/POST/encode`, { waitUntil: "networkidle" });
    await s.page.getByText("0.5714285714285714").first().waitFor();
    expect(warnings.filter((w) => /validation error/i.test(w))).toEqual([]);
    await s.close();
  });
});
