/**
 * The Claims section in a real browser, on the seeded demo (db/seed/demo.ts: six claims about the buoys'
 * telemetry link under three labels). Every role opens it at desktop and phone width; one picks a label
 * and filters its history by verdict. Screenshots land in tests/e2e/screenshots/.
 */
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { openDb } from "@/db";
import { insertOrg } from "@/db/queries/orgs";
import { findUserByEmail } from "@/db/queries/users";
import { DEMO_ORG, DEMO_PASSWORD, DEMO_USERS } from "@/db/seed/demo";
import { capture, DESKTOP, hydrated, layoutProblems, PHONE, screenshot, settle, signInWithPassword, startE2E, type E2E } from "./harness";

const ORG = DEMO_ORG.slug;
let e2e: E2E;

/** A second organisation of the demo owner, without a claim yet. */
const EMPTY_ORG = { slug: "harbour-lab", name: "Harbour Lab" };

beforeAll(async () => {
  e2e = await startE2E();
  const db = openDb(e2e.dbFile);
  try {
    const org = await insertOrg(db, EMPTY_ORG);
    const owner = await findUserByEmail(db, DEMO_USERS[0]!.email);
    await db.insertInto("memberships").values({ org_id: org.id, user_id: owner!.id, role: "owner", created_at: new Date().toISOString() }).execute();
  } finally {
    await db.destroy();
  }
}, 15 * 60_000);

afterAll(async () => {
  await e2e?.stop();
}, 30_000);

const CASES = DEMO_USERS.flatMap((u) => [
  [u.role, "1280", u, DESKTOP],
  [u.role, "390", u, PHONE],
] as const);

describe("the Claims section", { timeout: 90_000 }, () => {
  test.each(CASES)("as %s at %s px: labels with their latest verdict, a label's history, a verdict filter, nothing wider than the window", async (role, width, user, viewport) => {
    const s = await e2e.session({ viewport });
    const { page } = s;
    try {
      await signInWithPassword(e2e, page, user.email, DEMO_PASSWORD);
      await page.goto(`${e2e.baseUrl}/console/${ORG}/claims`);
      await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe("Error-rate claims");
      await settle(page);
      const labels = page.getByRole("navigation", { name: "Labels" });
      // The newest label first, each with its newest claim's verdict in words.
      const buttons = labels.getByRole("button");
      await expect.poll(() => buttons.allInnerTexts()).toHaveLength(4);
      const texts = await buttons.allInnerTexts();
      expect(texts[0]).toMatch(/^All labels/);
      expect(texts[1]).toMatch(/telemetry-fw\/2\.4\.1[\s\S]*supported/);
      expect(texts[2]).toMatch(/telemetry-fw\/2\.4\.0[\s\S]*inconclusive/);
      expect(texts[3]).toMatch(/telemetry-fw\/2\.3\.0[\s\S]*supported/);
      const claims = page.getByRole("list", { name: "Claims, newest first" }).getByRole("article");
      await expect.poll(() => claims.count()).toBe(6);
      expect(await layoutProblems(page)).toEqual([]);
      if (role === "owner") await capture(page, `claims-${width}`);
      if (viewport === DESKTOP) expect(await page.getByRole("navigation", { name: "Console sections" }).getByRole("link", { name: /^Claims\b/ }).getAttribute("aria-current")).toBe("page");

      // One label's history: three claims, the evidence in words.
      const pick = buttons.filter({ hasText: "telemetry-fw/2.4.0" });
      await hydrated(pick);
      await pick.click();
      await expect.poll(() => pick.getAttribute("aria-pressed")).toBe("true");
      await expect.poll(() => claims.count()).toBe(3);
      const history = await claims.allInnerTexts();
      expect(history[0]).toMatch(/inconclusive[\s\S]*measured: 2 errors in 5,000,000,000 bits[\s\S]*more error-free bits/);
      expect(history[1]).toMatch(/supported[\s\S]*analytic: Golay \(23,12\) on BSC p = 0\.005/);
      expect(history[2]).toMatch(/refuted[\s\S]*analytic: Hamming \(7,4\) on BSC p = 0\.005/);
      const title = page.getByRole("heading", { level: 2 }).first();
      expect(await title.textContent()).toBe("telemetry-fw/2.4.0");
      // On a phone the labels sit above the history, which comes into view when a label is picked.
      const top = await title.evaluate((el) => el.getBoundingClientRect().top);
      expect(top).toBeGreaterThanOrEqual(0);
      expect(top).toBeLessThan(viewport.height / 2);
      expect(await layoutProblems(page)).toEqual([]);
      if (role === "owner") await capture(page, `claims-label-${width}`);

      // Only the refuted claim.
      await page.getByLabel("Verdict").selectOption("refuted");
      await expect.poll(() => claims.count()).toBe(1);
      expect(await claims.first().locator("[data-verdict]").first().getAttribute("data-verdict")).toBe("refuted");
      expect(await layoutProblems(page)).toEqual([]);
      if (role === "owner") await capture(page, `claims-refuted-${width}`);
      await s.close();
    } catch (err) {
      await screenshot(page, `failure-claims-${role}-${width}.tmp`).catch(() => undefined);
      await s.context.close().catch(() => undefined);
      throw err;
    }
  });

  test.each([
    ["1280", DESKTOP],
    ["390", PHONE],
  ] as const)("at %s px, an organisation without claims shows a newcomer the call and the CI command that make one", async (width, viewport) => {
    const s = await e2e.session({ viewport });
    const { page } = s;
    try {
      await signInWithPassword(e2e, page, DEMO_USERS[0]!.email, DEMO_PASSWORD);
      await page.goto(`${e2e.baseUrl}/console/${EMPTY_ORG.slug}/claims`);
      await page.getByText("No claims yet").waitFor();
      await settle(page);
      const curl = await page.getByRole("region", { name: "curl" }).textContent();
      expect(curl).toContain(`${e2e.baseUrl}/api/v1/claims`);
      expect(curl).toContain("Bearer $PARITAS_KEY");
      expect(await page.getByRole("region", { name: "shell" }).textContent()).toBe("npx paritas-claims check claims.yaml --junit claims.xml");
      expect(await page.getByRole("navigation", { name: "Labels" }).count()).toBe(0);
      expect(await layoutProblems(page)).toEqual([]);
      await capture(page, `claims-empty-${width}`);
      await s.close();
    } catch (err) {
      await screenshot(page, `failure-claims-empty-${width}.tmp`).catch(() => undefined);
      await s.context.close().catch(() => undefined);
      throw err;
    }
  });
});
