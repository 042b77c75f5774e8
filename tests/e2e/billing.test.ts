/**
 * The Billing section in a real browser, against the harness's server, its billing stand-in and its usage
 * reporter: the demo org's billing admin moves from the free plan to Beacon through the stand-in's payment page and
 * sees the page confirm it once the webhook has arrived; a declined card leaves the plan as it was; a closed period
 * becomes an invoice whose PDF and CSV download from its detail; at 390 px the page fits for the roles that may open
 * it, and a developer neither sees nor opens it. Screenshots land in tests/e2e/screenshots/.
 */
import { readFile } from "node:fs/promises";
import type { Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { openDb } from "@/db";
import { findBillingAccount, setOrgPlan, unreportedUsage } from "@/db/queries/billing";
import { findOrgBySlug } from "@/db/queries/orgs";
import { DEMO_ORG, DEMO_PASSWORD, DEMO_USERS } from "@/db/seed/demo";
import { capture, DESKTOP, hydrated, layoutProblems, PHONE, screenshot, settle, signInWithPassword, startE2E, type E2E, type Session, inSession as inBrowser, type SessionOptions } from "./harness";

const ORG = DEMO_ORG.slug;
const userOf = (role: (typeof DEMO_USERS)[number]["role"]) => DEMO_USERS.find((u) => u.role === role)!;
const [OWNER, DEVELOPER, BILLING] = [userOf("owner"), userOf("developer"), userOf("billing")];
// The stand-in's documented test cards (fakes/billing/cards.ts), typed as a person would, in groups of four.
const GOOD_CARD = "4242 4242 4242 4242";
const DECLINED_CARD = "4000 0000 0000 0002";

let e2e: E2E;
let orgId = 0;

/** The test's own connection to the server's database, for what the page does not show (the provider's ids). */
async function withDb<T>(fn: (db: ReturnType<typeof openDb>) => Promise<T>): Promise<T> {
  const db = openDb(e2e.dbFile);
  try {
    return await fn(db);
  } finally {
    await db.destroy();
  }
}

beforeAll(async () => {
  e2e = await startE2E();
  // The seed puts the demo org on Beacon without a subscription at the provider; it starts here on the free plan.
  await withDb(async (db) => {
    orgId = (await findOrgBySlug(db, ORG))!.id;
    await setOrgPlan(db, orgId, "lantern");
  });
}, 15 * 60_000);

afterAll(async () => {
  await e2e?.stop();
}, 30_000);

const inSession = (fn: (s: Session) => Promise<void>, viewport: SessionOptions["viewport"] = DESKTOP) => inBrowser(e2e, fn, { viewport });

const billingUrl = () => `${e2e.baseUrl}/console/${ORG}/billing`;

/** The plan's name as the "Plan" section shows it. */
const planShown = (page: Page) => page.getByRole("region", { name: "Plan", exact: true }).locator("p span").first().innerText();

async function openBilling(page: Page): Promise<void> {
  await page.goto(billingUrl());
  await page.getByRole("heading", { level: 2, name: "Plan", exact: true }).waitFor();
  await settle(page);
}

/** Start the move to a paid plan from the page and fill the stand-in's card form; resolves on the stand-in's answer. */
async function payFor(page: Page, plan: "Beacon" | "Lighthouse", card: string, screenshotAs?: string): Promise<void> {
  const move = page.getByRole("button", { name: `Move to ${plan}` });
  await hydrated(move);
  await move.click();
  await page.waitForURL((u) => u.origin === e2e.billing.url && u.pathname.startsWith("/pay/"));
  await page.locator("#card-number").fill(card);
  await page.locator("#card-expiry").fill("12/39");
  await page.locator("#card-cvc").fill("123");
  if (screenshotAs) await screenshot(page, screenshotAs);
  await page.locator("#pay").click();
}

describe("the Billing section", { timeout: 180_000 }, () => {
  test("at 1280 px the billing admin moves from Lantern to Beacon through the payment page and sees the new plan once it is confirmed", async () => {
    await inSession(async ({ page }) => {
      await signInWithPassword(e2e, page, BILLING.email, DEMO_PASSWORD);
      await openBilling(page);
      expect(await planShown(page)).toBe("Lantern");
      await payFor(page, "Beacon", GOOD_CARD, "billing-payment-page");
      // Back on the Billing page, which polls until the provider's webhook has changed the plan.
      await page.waitForURL((u) => u.href.startsWith(billingUrl()) && u.searchParams.get("checkout") === "done");
      await page.getByRole("status").filter({ hasText: "You are now on Beacon." }).waitFor({ timeout: 30_000 });
      await expect.poll(() => planShown(page), { timeout: 10_000 }).toBe("Beacon");
      await expect.poll(() => page.getByRole("region", { name: "Plan", exact: true }).innerText()).toContain("Visa ending 4242");
      await settle(page);
      await capture(page, "billing-moved-1280");
      expect(await layoutProblems(page)).toEqual([]);
    });
  });

  test("a declined card shows the stand-in's refusal, and going back leaves the plan as it was", async () => {
    const before = await withDb((db) => findBillingAccount(db, orgId));
    expect(before?.subscription_id).toBeTruthy();
    await inSession(async ({ page }) => {
      await signInWithPassword(e2e, page, BILLING.email, DEMO_PASSWORD);
      await openBilling(page);
      expect(await planShown(page)).toBe("Beacon");
      await payFor(page, "Lighthouse", DECLINED_CARD);
      const refusal = page.locator("#payment-error");
      await refusal.waitFor();
      expect(await refusal.innerText()).toBe("The card was declined. Nothing was charged; try another card or go back.");
      await screenshot(page, "billing-payment-declined");
      await page.getByRole("link", { name: "Back" }).click();
      await page.waitForURL((u) => u.href.startsWith(billingUrl()) && u.searchParams.get("checkout") === "cancelled");
      await page.getByRole("status").filter({ hasText: "Nothing was charged; your plan is unchanged." }).waitFor();
      await settle(page);
      expect(await planShown(page)).toBe("Beacon");
      await capture(page, "billing-declined-1280");
    });
    // Nothing changed at the provider either: the org keeps the subscription from the first move, still active.
    const after = await withDb((db) => findBillingAccount(db, orgId));
    expect(after?.subscription_id).toBe(before!.subscription_id);
    expect(after?.subscription_status).toBe("active");
  });

  test("a closed period becomes an invoice whose PDF and CSV download from its detail, the CSV's total the amount shown", async () => {
    // The reporter sends this month's live usage first, so the invoice carries it (as the demo waits before closing).
    await expect.poll(() => withDb(async (db) => (await unreportedUsage(db, 1)).length), { timeout: 60_000, interval: 500 }).toBe(0);
    const subscription = (await withDb((db) => findBillingAccount(db, orgId)))!.subscription_id!;
    const closed = await fetch(`${e2e.billing.url}/_stand-in/subscriptions/${subscription}/close-period`, { method: "POST", headers: { authorization: `Bearer ${e2e.billing.secretKey}` } });
    expect(closed.status).toBe(200);
    const invoice = (await closed.json()) as { number: string; total: number; status: string };
    expect(invoice.status).toBe("paid"); // charged at once to the card the first move put on file

    await inSession(async ({ page }) => {
      await signInWithPassword(e2e, page, BILLING.email, DEMO_PASSWORD);
      await openBilling(page);
      const table = page.getByRole("table", { name: "Invoices, newest first" });
      const row = table.getByRole("row").filter({ hasText: invoice.number });
      await row.waitFor();
      // The newest invoice is the first row.
      expect(await table.locator("tbody tr").first().innerText()).toContain(invoice.number);
      const shownAmount = (await row.locator('[data-label="Amount"]').innerText()).trim();
      expect(shownAmount).toMatch(/^\$[\d,]+\.\d\d$/);
      await row.getByRole("button", { name: `Lines and downloads of invoice ${invoice.number}` }).click();
      const detail = page.getByRole("region", { name: `Details of invoice ${invoice.number}` });
      await detail.getByRole("table", { name: `Line items of invoice ${invoice.number}` }).waitFor();

      const [pdf] = await Promise.all([page.waitForEvent("download"), detail.getByRole("link", { name: "PDF" }).click()]);
      expect(pdf.suggestedFilename()).toBe(`paritas-invoice-${ORG}-${invoice.number}.pdf`);
      // Every PDF file starts with its header line "%PDF-" (ISO 32000-1 §7.5.2).
      expect((await readFile((await pdf.path())!)).subarray(0, 5).toString("latin1")).toBe("%PDF-");

      const [csv] = await Promise.all([page.waitForEvent("download"), detail.getByRole("link", { name: "CSV" }).click()]);
      const rows = (await readFile((await csv.path())!, "utf8")).trim().split("\r\n");
      const total = rows.at(-1)!.split(",");
      expect(total[0]).toBe("Total");
      // The CSV's decimal dollars, as the page writes the same amount: "$1,234.50" ↔ "1234.50".
      expect(total.at(-2)).toBe(shownAmount.replace(/[$,]/g, ""));
      // …and both are the stand-in's own total for the period, in cents.
      expect(Math.round(Number(total.at(-2)) * 100)).toBe(invoice.total);

      await detail.scrollIntoViewIfNeeded();
      await settle(page);
      await capture(page, "billing-invoice-1280");
      expect(await layoutProblems(page)).toEqual([]);
    });
  });

  test.each([
    ["owner", OWNER],
    ["billing admin", BILLING],
  ] as const)("at 390 px the page fits the window for the %s, an invoice's detail open", async (_role, user) => {
    await inSession(async ({ page }) => {
      await signInWithPassword(e2e, page, user.email, DEMO_PASSWORD);
      await openBilling(page);
      expect(await layoutProblems(page)).toEqual([]);
      await page.getByRole("button", { name: /^Lines and downloads/ }).first().click();
      await page.getByRole("link", { name: "PDF" }).waitFor();
      await settle(page);
      expect(await layoutProblems(page)).toEqual([]);
      if (user === BILLING) {
        await page.getByRole("heading", { level: 2, name: "Invoices" }).scrollIntoViewIfNeeded();
        await capture(page, "billing-invoices-390");
      }
    }, PHONE);
  });

  test("at 390 px a developer has no Billing entry in the sections and is refused on the page and by its route", async () => {
    await inSession(async (s) => {
      const { page } = s;
      await signInWithPassword(e2e, page, DEVELOPER.email, DEMO_PASSWORD);
      await page.waitForURL(`${e2e.baseUrl}/console/${ORG}`);
      await page.getByRole("button", { name: /^Sections/ }).click();
      const nav = page.getByRole("navigation", { name: "Console sections" });
      // The open list shows the developer's sections, Meter among them, but no Billing.
      await nav.getByRole("link", { name: /^Meter\b/ }).waitFor();
      expect(await nav.getByRole("link", { name: /^Billing\b/ }).count()).toBe(0);

      await page.goto(billingUrl());
      await page.getByText("Billing is open to owners and billing admins").waitFor();
      expect(await page.getByRole("heading", { level: 2, name: "Plan", exact: true }).count()).toBe(0);
      await settle(page);
      expect(await layoutProblems(page)).toEqual([]);
      await capture(page, "billing-developer-refused-390");
      const res = await fetch(`${e2e.baseUrl}/api/console/orgs/${ORG}/billing`, { headers: { cookie: await s.cookieHeader() } });
      expect(res.status).toBe(403);
      expect(res.headers.get("content-type")).toContain("application/problem+json");
    }, PHONE);
  });
});
