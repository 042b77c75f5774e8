/**
 * Confirming the password before a sensitive action, in a real browser: the server runs with a
 * confirmation window of a few seconds, so a session signed in a moment ago is already stale.
 */
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { DEMO_ORG, DEMO_PASSWORD, DEMO_USERS } from "@/db/seed/demo";
import { waitForMessage } from "@/fakes/mailbox";
import { capture, DESKTOP, layoutProblems, linkIn, PHONE, settle, signInWithPassword, startE2E, type E2E, type Session, inSession as inBrowser, type SessionOptions } from "./harness";

const OWNER = DEMO_USERS[0]!;
const ORG = DEMO_ORG.slug;
// Long enough for a sign-in by link to reach the keys page and ask again inside it, short enough to wait out.
const WINDOW_SECONDS = 10;

let e2e: E2E;

beforeAll(async () => {
  e2e = await startE2E({ env: { PARITAS_REAUTH_WINDOW_SECONDS: String(WINDOW_SECONDS) } });
}, 15 * 60_000);

afterAll(async () => {
  await e2e?.stop();
}, 30_000);

const inSession = (fn: (s: Session) => Promise<void>, opts?: SessionOptions) => inBrowser(e2e, fn, opts);

/** Signed in as the owner on the keys page, with the sign-in's confirmation already past the window. */
async function staleOnKeysPage(s: Session) {
  const { page } = s;
  await signInWithPassword(e2e, page, OWNER.email, DEMO_PASSWORD);
  await page.goto(`${e2e.baseUrl}/console/${ORG}/keys`);
  await page.getByRole("heading", { name: "API keys", level: 1 }).waitFor();
  await settle(page);
  await page.waitForTimeout((WINDOW_SECONDS + 1) * 1000);
}

async function askForLiveKey(s: Session, name: string) {
  await s.page.getByRole("button", { name: "Create a key" }).first().click();
  const create = s.page.getByRole("dialog", { name: "Create a key" });
  await create.getByLabel("Name").fill(name);
  await create.getByRole("radio").and(create.locator('[value="live"]')).check();
  await create.getByRole("button", { name: "Create key" }).click();
  return create;
}

/** A stale session asking for a live key: the create dialog, and the password dialog it brought up. */
async function askedForPassword(s: Session, name: string) {
  await staleOnKeysPage(s);
  const create = await askForLiveKey(s, name);
  const ask = s.page.getByRole("dialog", { name: "Your password, once more" });
  await ask.getByLabel("Password").waitFor();
  return { create, ask };
}

describe("re-confirming the password in the console", { timeout: 90_000 }, () => {
  for (const [label, viewport] of [
    ["desktop", DESKTOP],
    ["phone", PHONE],
  ] as const) {
    test(`a stale session creating a live key is asked for the password, then the key is made and shown once (${label})`, async () => {
      await inSession(
        async (s) => {
          const { page } = s;
          const { ask } = await askedForPassword(s, `e2e live key ${label}`);
          const password = ask.getByLabel("Password");
          // The dialog starts on the password field, so the keyboard alone gets through it.
          expect(await password.evaluate((el) => el === document.activeElement)).toBe(true);
          expect(await layoutProblems(page)).toEqual([]);
          await capture(page, `reauth-dialog-${viewport.width}`);

          await page.keyboard.type("not the demo password");
          await page.keyboard.press("Enter");
          await ask.getByRole("alert").filter({ hasText: "not this account's password" }).waitFor();
          expect(await password.getAttribute("aria-invalid")).toBe("true");
          await capture(page, `reauth-dialog-wrong-${viewport.width}`);

          await password.fill(DEMO_PASSWORD);
          await page.keyboard.press("Enter");
          const shown = page.getByRole("dialog", { name: "Your new key" });
          const field = shown.getByLabel("The new key");
          await field.waitFor();
          expect(await field.inputValue()).toMatch(/^live\.prt1\.[0-9A-Za-z]{36}$/);
          await ask.waitFor({ state: "detached" });
        },
        { viewport },
      );
    });
  }

  test("cancelling the password leaves the action refused and nothing made", async () => {
    await inSession(async (s) => {
      const { page } = s;
      const { create, ask } = await askedForPassword(s, "e2e never made");
      await page.keyboard.press("Escape");
      await ask.waitFor({ state: "detached" });
      await create.getByText("Confirm your password first").waitFor();
      await create.getByRole("button", { name: "Cancel" }).click();
      await settle(page);
      expect(await page.getByText("e2e never made").count()).toBe(0);
    });
  });

  test("an e-mail link instead of the password: following it signs in again, and the action then goes through unasked", async () => {
    await inSession(async (s) => {
      const { page } = s;
      const { create, ask } = await askedForPassword(s, "e2e by link");
      const since = new Date();
      await ask.getByRole("button", { name: "E-mail me a sign-in link" }).click();
      await ask.getByText("A sign-in link is on its way").waitFor();
      await capture(page, "reauth-dialog-link-sent-1280");
      const message = await waitForMessage(e2e.mailboxDir, OWNER.email, { since, timeoutMs: 10_000 });
      // The refused request stays refused; the link brings the person back to this page to repeat it.
      await page.keyboard.press("Escape");
      await create.getByText("Confirm your password first").waitFor();
      await page.goto(linkIn(message.text, `${e2e.baseUrl}/api/auth/callback/email`));
      await page.waitForURL((u) => u.pathname === `/console/${ORG}/keys`);
      await page.getByRole("heading", { name: "API keys", level: 1 }).waitFor();
      await settle(page);
      await askForLiveKey(s, "e2e by link");
      const field = page.getByRole("dialog", { name: "Your new key" }).getByLabel("The new key");
      await field.waitFor();
      expect(await field.inputValue()).toMatch(/^live\.prt1\.[0-9A-Za-z]{36}$/);
      expect(await ask.count()).toBe(0);
    });
  });
});
