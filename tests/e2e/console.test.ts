/**
 * The console in a real browser: headless Chromium against `next start` on a seeded demo
 * database, with mail going to the fake SMTP server. One server for the whole file; each test
 * is one flow in its own browser context. Screenshots land in tests/e2e/screenshots/.
 */
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { readFile } from "node:fs/promises";
import { DEMO_ORG, DEMO_PASSWORD, DEMO_USERS } from "@/db/seed/demo";
import { CSV_HEADER } from "@/lib/console/usage";
import { waitForMessage } from "@/fakes/mailbox";
import { capture, DESKTOP, layoutProblems, linkIn, PHONE, SCREENSHOT_DIR, settle, signInWithLink, signInWithPassword, startE2E, type E2E, type Session, inSession as inBrowser, type SessionOptions } from "./harness";

const [OWNER, DEVELOPER, BILLING] = DEMO_USERS as unknown as [(typeof DEMO_USERS)[number], (typeof DEMO_USERS)[number], (typeof DEMO_USERS)[number]];
const ORG = DEMO_ORG.slug;

let e2e: E2E;

beforeAll(async () => {
  e2e = await startE2E();
}, 15 * 60_000);

afterAll(async () => {
  await e2e?.stop();
}, 30_000);

const inSession = (fn: (s: Session) => Promise<void>, opts?: SessionOptions) => inBrowser(e2e, fn, opts);

const callCapacity = (key: string) =>
  fetch(`${e2e.baseUrl}/api/v1/capacity`, {
    method: "POST",
    headers: { authorization: `Bearer ${key}`, "content-type": "application/json" },
    body: JSON.stringify({ channel: "bsc", p: 0.11 }),
  });

const sectionLink = (s: Session, name: string) => s.page.getByRole("navigation", { name: "Console sections" }).getByRole("link", { name: new RegExp(`^${name}\\b`) });

/** The number in column `column` (1-based) of the row of `table` that mentions `text`. */
async function cellNumber(s: Session, table: string, text: string, column: number): Promise<number> {
  const row = s.page.getByRole("table", { name: table }).getByRole("row").filter({ hasText: text }).first();
  await row.waitFor();
  const cell = row.locator("th, td").nth(column - 1);
  return Number((await cell.innerText()).replace(/[^\d]/g, ""));
}

/** Every console page, with the level-1 heading it opens on (roles that may not open a section get a note under the same heading). */
const PAGES = [
  { name: "summary", path: `/console/${ORG}`, heading: DEMO_ORG.name },
  { name: "bench", path: `/console/${ORG}/try`, heading: "Try the endpoints" },
  { name: "keys", path: `/console/${ORG}/keys`, heading: "API keys" },
  { name: "meter", path: `/console/${ORG}/usage`, heading: "Usage" },
  { name: "people", path: `/console/${ORG}/members`, heading: "Members and roles" },
  { name: "ledger", path: `/console/${ORG}/audit`, heading: "Activity ledger" },
  { name: "mailbox", path: "/console/dev/mailbox", heading: "Mailbox" },
] as const;

/** Where the console's section navigation starts, in page coordinates (null on pages outside the signed-in frame). */
const navTop = (s: Session) =>
  s.page.evaluate(() => {
    const nav = document.querySelector('nav[aria-label="Console sections"]');
    return nav ? Math.round(nav.getBoundingClientRect().top + window.scrollY) : null;
  });

describe("console in a browser", { timeout: 90_000 }, () => {
  test("signs in with an e-mail link read from the mailbox and lands in the console", async () => {
    await inSession(async (s) => {
      const { page } = s;
      const { link, checkMailScrollY } = await signInWithLink(e2e, page, DEVELOPER.email, { screenshotAs: "signin", checkMailScreenshotAs: "check-mail" });
      expect(checkMailScrollY).toBe(0); // the page after the form opens at its top, site header in view
      await page.waitForURL(`${e2e.baseUrl}/console/${ORG}`);
      await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe(DEMO_ORG.name);
      await sectionLink(s, "Keys").waitFor();
      await expect.poll(() => page.getByText(DEVELOPER.email).first().isVisible()).toBe(true);
      await settle(page);
      await capture(page, "summary");

      expect(await s.cookieHeader()).toContain("next-auth.session-token=");

      // The link works once: a second visit lands on /signin with next-auth's Verification error.
      await page.goto(link);
      await page.waitForURL((u) => u.pathname === "/signin" && u.searchParams.get("error") === "Verification");
      await page.getByRole("alert").filter({ hasText: "has expired or has been used already" }).waitFor();

      // The development mailbox shows the message the link came in.
      await page.goto(`${e2e.baseUrl}/console/dev/mailbox`);
      await page.getByText("Your Paritas sign-in link").first().waitFor();
      await settle(page);
      await capture(page, "dev-mailbox");
    });
  });

  test("creates a key, calls the API with it, sees the usage, rotates it with an overlap and revokes the new one", async () => {
    await inSession(async (s) => {
      const { page, context } = s;
      await context.grantPermissions(["clipboard-read", "clipboard-write"], { origin: e2e.baseUrl });
      await signInWithLink(e2e, page, DEVELOPER.email);
      await sectionLink(s, "Keys").click();
      await page.waitForURL(`${e2e.baseUrl}/console/${ORG}/keys`);
      await page.getByRole("heading", { name: "API keys", level: 1 }).waitFor();
      await settle(page);
      await capture(page, "keys");

      // Create: the dialog shows the key once; copy it with the page's own button.
      await page.getByRole("button", { name: "Create a key" }).first().click();
      const create = page.getByRole("dialog", { name: "Create a key" });
      await create.getByLabel("Name").fill("e2e capacity probe");
      await create.getByRole("button", { name: "Create key" }).click();
      const shown = page.getByRole("dialog", { name: "Your new key" });
      const field = shown.getByLabel("The new key");
      await field.waitFor();
      const key = await field.inputValue();
      expect(key).toMatch(/^test\.prt1\.[0-9A-Za-z]{36}$/);
      await shown.getByRole("button", { name: "Copy key" }).click();
      await shown.getByRole("button", { name: "Copied" }).waitFor();
      expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(key);
      await capture(page, "key-created");
      await shown.getByLabel("I have stored the key somewhere safe.").check();
      await shown.getByRole("button", { name: "Done — hide the key" }).click();
      await shown.waitFor({ state: "hidden" });
      expect(await page.content()).not.toContain(key);

      const res = await callCapacity(key);
      expect(res.status).toBe(200);
      const body = (await res.json()) as { capacity: { value: number } };
      expect(body.capacity.value).toBeCloseTo(0.5, 3);

      // The call shows on the meter: by endpoint, and against the new key.
      await sectionLink(s, "Meter").click();
      await page.waitForURL(`${e2e.baseUrl}/console/${ORG}/usage`);
      await page.getByRole("heading", { name: "Usage", level: 1 }).waitFor();
      expect(await cellNumber(s, "Usage by endpoint", "capacity", 2)).toBeGreaterThanOrEqual(1);
      expect(await cellNumber(s, "Usage by key", "e2e capacity probe", 2)).toBe(1);
      await settle(page);
      await capture(page, "usage");

      // One word for calls answered 400 or more, the API's: "errors" in the tables, the totals and the CSV; the y-axis names its unit.
      expect(await page.locator("main, body").first().innerText()).not.toMatch(/refused/i);
      const endpointHeads = (await page.getByRole("table", { name: "Usage by endpoint" }).getByRole("columnheader").allTextContents()).map((t) => t.trim().toLowerCase());
      expect(endpointHeads).toEqual(["endpoint", "calls", "units", "errors"]);
      await page.getByText("Errors", { exact: true }).first().waitFor();
      await page.locator("svg text").filter({ hasText: /^compute units per day$/ }).waitFor();
      await page.locator("code").filter({ hasText: CSV_HEADER }).first().waitFor();
      // …the names of the fields of a row of GET /api/v1/usage, as the published OpenAPI document gives them.
      const spec = JSON.stringify(await (await fetch(`${e2e.baseUrl}/api/v1/openapi.json`)).json());
      for (const field of ["calls", "units", "errors"]) {
        expect(CSV_HEADER.split(",")).toContain(field);
        expect(spec).toContain(`"${field}":{"type":"integer"`);
      }

      // The CSV export is the same period's cells: the documented header, and the new key's one call on today's row.
      const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name: "Export CSV" }).click()]);
      const csv = await readFile((await download.path())!, "utf8");
      const [header, ...lines] = csv.trim().split(/\r?\n/);
      expect(header).toBe(CSV_HEADER);
      const today = new Date().toISOString().slice(0, 10);
      expect(lines.filter((l) => l.startsWith(`${today},capacity,${key.slice(0, 14)},`))).toEqual([`${today},capacity,${key.slice(0, 14)},1,1,0`]);
      await page.getByRole("heading", { name: "By endpoint" }).scrollIntoViewIfNeeded();
      await capture(page, "usage-tables");

      // Rotate with a one-hour overlap: old and new keys both work inside the window.
      await sectionLink(s, "Keys").click();
      const prefix = key.slice(0, 14);
      await page.getByRole("button", { name: `Rotate e2e capacity probe (${prefix})` }).first().click();
      const rotate = page.getByRole("dialog", { name: "Rotate e2e capacity probe" });
      await rotate.getByLabel("Overlap", { exact: true }).fill("1");
      await capture(page, "key-rotate");
      await rotate.getByRole("button", { name: "Rotate key" }).click();
      const replacement = page.getByRole("dialog", { name: "The replacement key" });
      const newKey = await replacement.getByLabel("The new key").inputValue();
      expect(newKey).toMatch(/^test\.prt1\./);
      expect(newKey).not.toBe(key);
      await replacement.getByText(/keeps working until/).waitFor();
      await replacement.getByLabel("I have stored the key somewhere safe.").check();
      await replacement.getByRole("button", { name: "Done — hide the key" }).click();
      await replacement.waitFor({ state: "hidden" });

      expect((await callCapacity(key)).status).toBe(200);
      expect((await callCapacity(newKey)).status).toBe(200);

      // The list shows the old key in its overlap and the new one as its replacement.
      const newPrefix = newKey.slice(0, 14);
      await page.getByText(`replaces ${prefix}…`).first().waitFor();
      await settle(page);
      await capture(page, "keys-rotated");

      // Revoke the new key: it answers 401 from then on; the old one keeps its overlap.
      await page.getByRole("button", { name: `Revoke e2e capacity probe (${newPrefix})` }).first().click();
      const revoke = page.getByRole("dialog", { name: "Revoke e2e capacity probe?" });
      await revoke.getByRole("button", { name: "Revoke key" }).click();
      await revoke.waitFor({ state: "hidden" });
      const revoked = await callCapacity(newKey);
      expect(revoked.status).toBe(401);
      expect(revoked.headers.get("content-type")).toContain("application/problem+json");
      expect((await callCapacity(key)).status).toBe(200);
    });
  });

  test("a sign-in form sent before its script runs keeps the password out of the address", async () => {
    const secret = "not-in-any-url-7731";
    await inSession(
      async (s) => {
        const { page } = s;
        await page.goto(`${e2e.baseUrl}/signin`);
        await page.getByLabel("E-mail", { exact: true }).fill(OWNER.email);
        await page.locator('input[name="password"]').fill(secret);
        const navigations: { method: string; url: string }[] = [];
        page.on("request", (r) => {
          if (r.isNavigationRequest()) navigations.push({ method: r.method(), url: r.url() });
        });
        const [answer] = await Promise.all([page.waitForNavigation(), page.getByRole("button", { name: "Sign in", exact: true }).click()]);
        expect(answer?.status()).toBe(200); // the sign-in page again, as for any visitor without script
        expect(navigations.map((n) => n.method)).toEqual(["POST"]);
        expect(navigations.every((n) => !n.url.includes(secret))).toBe(true);
        expect(page.url()).not.toContain(secret);
        // Without script nobody is signed in, and nothing on the server broke.
        expect((await s.context.cookies(e2e.baseUrl)).some((c) => c.name === "next-auth.session-token")).toBe(false);
        expect((await fetch(`${e2e.baseUrl}/api/health`)).status).toBe(200);
      },
      { javaScriptEnabled: false },
    );
  });

  test("a billing admin signed in with the password sees no keys", async () => {
    await inSession(async (s) => {
      const { page } = s;
      await signInWithPassword(e2e, page, BILLING.email, DEMO_PASSWORD);
      await page.waitForURL(`${e2e.baseUrl}/console/${ORG}`);
      await sectionLink(s, "Meter").waitFor();
      expect(await sectionLink(s, "Keys").count()).toBe(0);
      expect(await page.getByRole("link", { name: /^Keys\b/ }).count()).toBe(0);

      await page.goto(`${e2e.baseUrl}/console/${ORG}/keys`);
      await page.getByText("Keys are not available to the billing role").waitFor();
      expect(await page.getByRole("button", { name: "Create a key" }).count()).toBe(0);
      await settle(page);
      await capture(page, "keys-billing-refused");

      const cookie = await s.cookieHeader();
      const res = await fetch(`${e2e.baseUrl}/api/console/orgs/${ORG}/keys`, { headers: { cookie } });
      expect(res.status).toBe(403);
      expect(res.headers.get("content-type")).toContain("application/problem+json");
      // The same cookies do open what billing may see.
      expect((await fetch(`${e2e.baseUrl}/api/console/orgs/${ORG}/usage`, { headers: { cookie } })).status).toBe(200);
    });
  });

  test("the bench runs an endpoint from its generated form and shows the status, curl and TypeScript", async () => {
    await inSession(async (s) => {
      const { page } = s;
      await signInWithLink(e2e, page, DEVELOPER.email);
      await sectionLink(s, "Bench").click();
      await page.waitForURL(`${e2e.baseUrl}/console/${ORG}/try`);
      await page.getByRole("navigation", { name: "Endpoints" }).getByRole("button", { name: "POST /capacity" }).click();
      await page.getByRole("heading", { name: "POST /api/v1/capacity" }).waitFor();

      const form = page.getByRole("form", { name: "Request" });
      await form.getByLabel(/^channel/).selectOption("bsc");
      await form.getByLabel(/^p\s*number/).fill("0.11");
      await settle(page);
      await capture(page, "try");
      await form.getByRole("button", { name: "Run with a test key" }).click();

      const result = page.getByRole("region", { name: "Response", exact: true });
      await result.getByText(/^200\b/).first().waitFor();
      await expect.poll(() => page.getByLabel("response", { exact: true }).innerText()).toContain('"bits per channel use"');
      const curl = await page.getByLabel("curl", { exact: true }).innerText();
      expect(curl).toContain(`curl -sS -X POST '${e2e.baseUrl}/api/v1/capacity'`);
      expect(curl).toContain('"channel":"bsc"');
      expect(curl).toContain("$PARITAS_KEY");
      const ts = await page.getByLabel("TypeScript", { exact: true }).innerText();
      expect(ts).toContain('paritas.POST("/capacity"');
      expect(ts).toContain("createParitasClient");
      await result.scrollIntoViewIfNeeded();
      await capture(page, "try-result");
    });
  });

  test.each([
    ["desktop", DESKTOP],
    ["phone", PHONE],
  ] as const)(
    "at %s width the bench picks a code by family and parameters, keeps its JSON in step, and marks the corrected positions of a decode",
    async (_w, viewport) => {
      await inSession(
        async (s) => {
          const { page } = s;
          await signInWithPassword(e2e, page, DEVELOPER.email, DEMO_PASSWORD);
          await page.goto(`${e2e.baseUrl}/console/${ORG}/try`);
          await page.getByRole("heading", { level: 1, name: "Try the endpoints" }).waitFor();
          if (viewport === PHONE) await page.getByLabel("Endpoint", { exact: true }).selectOption({ label: "POST /decode" });
          else await page.getByRole("navigation", { name: "Endpoints" }).getByRole("button", { name: "POST /decode" }).click();
          await page.getByRole("heading", { name: "POST /api/v1/decode" }).waitFor();

          const form = page.getByRole("form", { name: "Request" });
          const code = form.getByRole("group", { name: /^code/ });
          // BCH (15,7), t = 2 (m = 4): the family first, then its parameters, each labelled with its limits.
          await code.getByLabel(/^family/).selectOption("bch");
          await code.getByLabel(/^m\s*integer/).fill("4");
          await code.getByLabel(/^t\s*integer/).fill("2");
          expect(await code.getByText(/Range: 3 to 16\./).count()).toBe(1);
          expect(await code.innerText()).not.toContain("9007199254740991");
          // The JSON follows the fields…
          await code.getByText("Edit code as JSON").click();
          const json = code.getByLabel("code as JSON");
          expect(JSON.parse(await json.inputValue())).toEqual({ family: "bch", m: 4, t: 2 });
          // …JSON that does not parse is reported and left as typed…
          await json.fill('{ "family": "bch", "m": 4, "t": ');
          await code.getByRole("status").filter({ hasText: "The JSON does not parse" }).waitFor();
          expect(await json.inputValue()).toBe('{ "family": "bch", "m": 4, "t": ');
          // …the fields follow the JSON once it does, and the JSON the fields.
          await json.fill('{ "family": "bch", "m": 4, "t": 3 }');
          await expect.poll(() => code.getByLabel(/^t\s*integer/).inputValue()).toBe("3");
          expect(await code.getByRole("status").count()).toBe(0);
          await code.getByLabel(/^t\s*integer/).fill("2");
          expect(JSON.parse(await json.inputValue())).toEqual({ family: "bch", m: 4, t: 2 });

          // The zero codeword with errors at positions 2 and 5.
          await form.getByLabel(/^words/).fill('["001001000000000"]');
          // A t too large for m = 4 passes the browser's check; the server's problem shows at t itself.
          const t = code.getByLabel(/^t\s*integer/);
          await t.fill("9");
          await form.getByRole("button", { name: "Run with a test key" }).click();
          await expect.poll(() => t.getAttribute("aria-invalid")).toBe("true");
          expect(await t.evaluate((el) => document.getElementById(el.getAttribute("aria-describedby")!.split(" ").pop()!)!.textContent)).toMatch(/^Server: .*t can be at most 7/);
          await t.fill("2");
          await form.getByRole("button", { name: "Run with a test key" }).click();
          const decoded = page.getByRole("region", { name: /^Decoded words/ });
          await decoded.waitFor();
          expect(await decoded.getByText("corrected positions: 2, 5").count()).toBe(1);
          const word = decoded.locator('[data-decoded-word="0"]');
          // Marked in the received and the corrected rows alike, by a box and an underline, not by colour alone.
          const marked = await word.locator("[data-corrected]").evaluateAll((els) =>
            // Only the layout shown at this width (narrow screens get shorter column groups).
            els.filter((el) => el.getClientRects().length > 0).map((el) => {
              const st = getComputedStyle(el);
              return { p: Number(el.getAttribute("data-position")), text: el.textContent, underline: st.textDecorationLine, outline: st.outlineStyle };
            }),
          );
          expect(marked.map((m) => m.p)).toEqual([2, 5, 2, 5]);
          expect(marked.map((m) => m.text)).toEqual(["1", "1", "0", "0"]);
          for (const m of marked) {
            expect(m.underline).toContain("underline");
            expect(m.outline).not.toBe("none");
          }
          await settle(page);
          expect(await layoutProblems(page)).toEqual([]);
          await decoded.scrollIntoViewIfNeeded();
          await capture(page, `try-decode-${viewport.width}`);
          await code.scrollIntoViewIfNeeded();
          await capture(page, `try-code-picker-${viewport.width}`);

          // Symbols of GF(16) with erasures: the erased positions are told apart from the corrected ones, and still fit.
          await page.getByLabel("Start from an example").selectOption("rsErasures");
          // A long example name is cut in the select and shown whole beneath it.
          await page.getByText("Example: Reed–Solomon (15,9) over GF(16) with two erasures and one error").waitFor();
          await expect.poll(() => code.getByLabel(/^family/).inputValue()).toBe("rs");
          await form.getByRole("button", { name: "Run with a test key" }).click();
          const rs = page.getByRole("region", { name: /^Decoded words · Reed–Solomon/ });
          await rs.waitFor();
          expect(await rs.getByText("corrected positions: 0, 1, 4").count()).toBe(1);
          expect(await rs.getByText(/erased positions: 0, 1/).count()).toBe(1);
          await settle(page);
          expect(await layoutProblems(page)).toEqual([]);
        },
        { viewport },
      );
    },
  );

  test("an owner invites a new address, which signs up by link and joins", async () => {
    const invitee = "kai.moreau@tidewater.example";
    let inviteLink = "";
    await inSession(async (s) => {
      const { page } = s;
      await signInWithLink(e2e, page, OWNER.email);
      await sectionLink(s, "People").click();
      await page.waitForURL(`${e2e.baseUrl}/console/${ORG}/members`);
      const invite = page.getByRole("region", { name: "Invite someone" });
      await invite.getByLabel("E-mail").fill(invitee);
      await invite.getByLabel("Role").selectOption("developer");
      const since = new Date();
      await invite.getByRole("button", { name: "Send invitation" }).click();
      await invite.getByText(`Invitation sent to ${invitee}`).waitFor();
      await page.getByRole("table", { name: "Pending invitations" }).getByRole("row").filter({ hasText: invitee }).waitFor();
      await settle(page);
      await capture(page, "members");
      const mail = await waitForMessage(e2e.mailboxDir, invitee, { since, timeoutMs: 10_000 });
      expect(mail.subject).toBe(`Join ${DEMO_ORG.name} on Paritas`);
      inviteLink = linkIn(mail.text, `${e2e.baseUrl}/console/invite/`);
    });

    await inSession(async (s) => {
      const { page } = s;
      // Signed out, the invitation sends the visitor to /signin and brings them back after.
      await page.goto(inviteLink);
      await page.waitForURL((u) => u.pathname === "/signin" && (u.searchParams.get("callbackUrl") ?? "").includes("/console/invite/"));
      await signInWithLink(e2e, page, invitee, { fromCurrentPage: true });
      await page.waitForURL(inviteLink);
      await page.getByRole("button", { name: "Accept the invitation" }).waitFor();
      await expect.poll(() => page.getByText(invitee).first().isVisible()).toBe(true);
      await settle(page);
      await capture(page, "invite");
      await page.getByRole("button", { name: "Accept the invitation" }).click();
      await page.getByText(`You are now a member of ${DEMO_ORG.name}`).waitFor();
      await page.getByRole("link", { name: `Open ${DEMO_ORG.name}` }).click();
      await page.waitForURL(`${e2e.baseUrl}/console/${ORG}`);
      await sectionLink(s, "Keys").waitFor();
    });

    await inSession(async (s) => {
      const { page } = s;
      await signInWithPassword(e2e, page, OWNER.email, DEMO_PASSWORD);
      await page.goto(`${e2e.baseUrl}/console/${ORG}/members`);
      await page.getByRole("table", { name: `Members of ${DEMO_ORG.name}` }).getByRole("row").filter({ hasText: invitee }).waitFor();
      await sectionLink(s, "Ledger").click();
      await page.waitForURL(`${e2e.baseUrl}/console/${ORG}/audit`);
      const ledger = page.getByRole("table", { name: /^Ledger entries/ });
      await ledger.getByRole("row").filter({ hasText: "member.joined" }).first().waitFor();
      await ledger.getByRole("row").filter({ hasText: "member.invited" }).first().waitFor();
      await settle(page);
      // Addresses in the ledger wrap only before "@" or a dot of the domain, never inside a name.
      const wraps = await ledger.locator("tbody tr td:nth-child(2), tbody tr td:nth-child(4)").evaluateAll((cells) =>
        cells.flatMap((cell) => {
          const text = cell.textContent ?? "";
          if (!text.includes("@")) return [];
          const walker = document.createTreeWalker(cell, NodeFilter.SHOW_TEXT);
          const chars: { ch: string; top: number }[] = [];
          for (let n = walker.nextNode(); n; n = walker.nextNode()) {
            for (let i = 0; i < (n.textContent ?? "").length; i++) {
              const r = document.createRange();
              r.setStart(n, i);
              r.setEnd(n, i + 1);
              const rect = r.getClientRects()[0];
              if (rect) chars.push({ ch: n.textContent![i]!, top: Math.round(rect.top) });
            }
          }
          return chars.filter((c, i) => i > 0 && c.top > chars[i - 1]!.top).map((c) => `${text}: line starts at "${c.ch}"`);
        }),
      );
      expect(wraps.filter((w) => !/"[@.]"$/.test(w))).toEqual([]);
      await capture(page, "audit");

      // Removing the new member: the dialog offers to revoke their keys, ticked by default.
      await sectionLink(s, "People").click();
      const members = page.getByRole("table", { name: `Members of ${DEMO_ORG.name}` });
      await members.getByRole("button", { name: `Remove ${invitee}` }).click();
      const dialog = page.getByRole("dialog", { name: /^Remove .*\?$/ });
      expect(await dialog.getByLabel(/Also revoke every key they created/).isChecked()).toBe(true);
      await capture(page, "member-remove");
      await dialog.getByRole("button", { name: "Remove from the organisation" }).click();
      await dialog.waitFor({ state: "hidden" });
      await members.getByRole("row").filter({ hasText: invitee }).waitFor({ state: "detached" });
    });
  });

  test("the public pages and the other sign-in pages pass the same checks, and the 404 page answers 404", async () => {
    await inSession(async (s) => {
      const { page } = s;
      for (const [path, heading, name] of [
        ["/", /Channel-coding math/, "landing"],
        ["/problems", "Problem types", "problems"],
        ["/problems/validation-failed", /./, "problem-type"],
        ["/signup", "Create an account", "signup"],
        ["/reset", "Reset your password", "reset"],
      ] as const) {
        const res = await page.goto(`${e2e.baseUrl}${path}`);
        expect(res?.status(), path).toBe(200);
        await page.getByRole("heading", { level: 1, name: heading }).first().waitFor();
        await capture(page, name);
      }
      // The landing page's endpoint list against the server: a row marked planned is not served (404), every other row is (401 without a key).
      await page.goto(`${e2e.baseUrl}/`);
      const rows = await page.getByRole("table", { name: "Paritas API endpoints under /api/v1" }).locator("tbody tr td:first-child").allInnerTexts();
      expect(rows.length).toBeGreaterThan(5);
      for (const row of rows) {
        const [method, path] = row.trim().split(/\s+/);
        const res = await fetch(`${e2e.baseUrl}/api/v1${path}`, { method, headers: { "content-type": "application/json" }, body: method === "GET" ? undefined : "{}" });
        expect(res.status, row).toBe(row.includes("planned") ? 404 : 401);
      }
      const missing = await page.goto(`${e2e.baseUrl}/no-such-page`);
      expect(missing?.status()).toBe(404);
      await capture(page, "not-found");
    });
  });

  describe.each([
    ["owner", OWNER],
    ["developer", DEVELOPER],
    ["billing", BILLING],
  ] as const)("every console page fits the window for the %s role", (role, user) => {
    test.each([
      ["desktop", DESKTOP],
      ["phone", PHONE],
    ] as const)("at %s width: nothing scrolls sideways or is cut, every control is inside the window, the section navigation stays at the top", async (_w, viewport) => {
      await inSession(
        async (s) => {
          const { page } = s;
          await signInWithPassword(e2e, page, user.email, DEMO_PASSWORD);
          const found: string[] = [];
          const tops = new Map<string, number | null>();
          for (const p of PAGES) {
            await page.goto(`${e2e.baseUrl}${p.path}`);
            await page.getByRole("heading", { level: 1, name: p.heading }).waitFor();
            await settle(page);
            found.push(...(await layoutProblems(page)).map((x) => `${p.name}: ${x}`));
            tops.set(p.name, await navTop(s));
            // Whole pages, git-ignored (*.tmp.png): for looking at, not for the record.
            await page.screenshot({ path: `${SCREENSHOT_DIR}/${role}-${p.name}-${viewport.width}.tmp.png`, fullPage: true, animations: "disabled", caret: "hide" });
          }
          expect(found).toEqual([]);
          // The same place on every page of the frame, and within the first screen (the bench's endpoint list comes after it).
          const home = tops.get("summary")!;
          expect(home).toBeLessThan(viewport.height / 2);
          for (const p of PAGES) if (p.name !== "mailbox") expect(tops.get(p.name), p.name).toBe(home);
        },
        { viewport },
      );
    });
  });

  test.each([
    ["desktop", DESKTOP],
    ["phone", PHONE],
  ] as const)("at %s width the bench, opened from the sections and with another endpoint chosen, keeps the section navigation where the summary has it, above the endpoint list", async (_w, viewport) => {
    await inSession(
      async (s) => {
        const { page } = s;
        await signInWithPassword(e2e, page, DEVELOPER.email, DEMO_PASSWORD);
        await page.waitForURL(`${e2e.baseUrl}/console/${ORG}`);
        await settle(page);
        const inView = () => page.evaluate(() => Math.round(document.querySelector('nav[aria-label="Console sections"]')!.getBoundingClientRect().top));
        const home = await inView();
        expect(home).toBeGreaterThanOrEqual(0);
        expect(home).toBeLessThan(viewport.height / 2);
        if (viewport === PHONE) await page.getByRole("button", { name: /^Sections/ }).click();
        await sectionLink(s, "Bench").click();
        await page.getByRole("heading", { level: 1, name: "Try the endpoints" }).waitFor();
        await settle(page);
        expect(await inView()).toBe(home);
        const picker = viewport === PHONE ? page.getByLabel("Endpoint", { exact: true }) : page.getByRole("navigation", { name: "Endpoints" });
        const pickerTop = (await picker.boundingBox())!.y;
        expect(pickerTop).toBeGreaterThan(home);
        if (viewport === PHONE) await picker.selectOption({ label: "POST /capacity" });
        else await picker.getByRole("button", { name: "POST /capacity" }).click();
        await page.getByRole("heading", { name: "POST /api/v1/capacity" }).waitFor();
        expect(await inView()).toBe(home);
      },
      { viewport },
    );
  });

  test("the keys page fits a phone screen", async () => {
    await inSession(
      async (s) => {
        const { page } = s;
        await signInWithPassword(e2e, page, OWNER.email, DEMO_PASSWORD);
        await page.goto(`${e2e.baseUrl}/console/${ORG}/keys`);
        await page.getByRole("heading", { name: "API keys", level: 1 }).waitFor();
        await page.getByRole("list", { name: `API keys of ${ORG}` }).waitFor();
        expect(await page.getByRole("table").count()).toBe(0); // the table gives way to cards
        await settle(page);
        const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
        expect(overflow).toBeLessThanOrEqual(0);
        await capture(page, "keys-390");
      },
      { viewport: PHONE },
    );
  });
});
