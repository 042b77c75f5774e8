/**
 * The Simulations section in a real browser, against the harness's server and job runner: the demo developer
 * starts a (7,4) Hamming sweep on AWGN from the form, watches its progress bar move, opens its result page, reads
 * the plot and exports it as CSV, SVG and PNG, then starts a slow uncoded one and cancels it. At 1280 and 390 px
 * nothing is wider than the window. Screenshots land in tests/e2e/screenshots/.
 */
import { readFile } from "node:fs/promises";
import type { Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { DEMO_ORG, DEMO_PASSWORD, DEMO_USERS } from "@/db/seed/demo";
import { capture, DESKTOP, hydrated, layoutProblems, PHONE, settle, signInWithPassword, startE2E, type E2E } from "./harness";

const ORG = DEMO_ORG.slug;
const DEVELOPER = DEMO_USERS.find((u) => u.role === "developer")!;
const POINTS = [2, 4, 6, 8];
let e2e: E2E;

beforeAll(async () => {
  e2e = await startE2E();
}, 15 * 60_000);

afterAll(async () => {
  await e2e?.stop();
}, 30_000);

/** Fill the New simulation form and start it; the id from the confirmation line. */
async function start(page: Page, o: { coded: boolean; channel: string; points: string; minBitErrors: string; maxBits: string; seed: string }): Promise<string> {
  const form = page.getByRole("form", { name: "New simulation" });
  await hydrated(form.getByRole("button", { name: "Start simulation" }));
  const coded = form.getByLabel(/^With a code/);
  if ((await coded.isChecked()) !== o.coded) await coded.click();
  await form.getByLabel("Channel").selectOption(o.channel);
  await form.getByLabel("Points").fill(o.points);
  await form.getByLabel("Bit errors seen").fill(o.minBitErrors);
  await form.getByLabel("Information bits at most").fill(o.maxBits);
  await form.getByLabel("Seed (optional)").fill(o.seed);
  await form.getByRole("button", { name: "Start simulation" }).click();
  const status = form.getByRole("status").filter({ hasText: /^Started sim-/ });
  await status.waitFor({ timeout: 30_000 });
  return /sim-[0-9a-z]{16}/.exec((await status.textContent())!)![0];
}

const progressOf = async (page: Page, id: string) => Number(await page.getByRole("progressbar", { name: `Progress of ${id}` }).first().getAttribute("aria-valuenow"));

describe("the Simulations section", { timeout: 300_000 }, () => {
  let sweep = "";

  test("at 1280 px: start a sweep, watch its progress move, read its plot, export CSV, SVG and PNG; start a slow one and cancel it", async () => {
    const s = await e2e.session({ viewport: DESKTOP });
    const { page } = s;
    try {
      await signInWithPassword(e2e, page, DEVELOPER.email, DEMO_PASSWORD);
      await page.goto(`${e2e.baseUrl}/console/${ORG}/simulations`);
      await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe("Error-rate simulations");
      expect(await page.getByRole("navigation", { name: "Console sections" }).getByRole("link", { name: /^Simulations\b/ }).getAttribute("aria-current")).toBe("page");

      // 6·10^7 information bits a point (about 15 million (7,4) frames): long enough to watch, short enough to wait for.
      sweep = await start(page, { coded: true, channel: "awgn-bpsk", points: POINTS.join(", "), minBitErrors: "", maxBits: "60000000", seed: "2026" });
      const seen = new Set<number>();
      await expect
        .poll(
          async () => {
            seen.add(await progressOf(page, sweep));
            return [...seen].filter((v) => v > 0 && v < 100).length;
          },
          { timeout: 120_000, interval: 200 },
        )
        .toBeGreaterThanOrEqual(2);
      await settle(page);
      await capture(page, "simulations-1280");
      expect(await layoutProblems(page)).toEqual([]);
      await expect.poll(() => progressOf(page, sweep), { timeout: 180_000, interval: 500 }).toBe(100);
      const row = page.getByRole("row").filter({ hasText: sweep });
      await expect.poll(() => row.innerText()).toMatch(/done/);

      // The result page, by the job id (as a claim links to it).
      await row.getByRole("link", { name: sweep }).click();
      await page.waitForURL((u) => u.pathname === `/console/${ORG}/simulations/${sweep}`);
      await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe(sweep);
      const plot = page.getByRole("img", { name: /^Bit and frame error rates against Eb\/N0/ });
      await plot.waitFor();
      // Four points, each with a BER circle and a FER square, an uncoded curve and the Shannon limit for R = 4/7.
      await expect.poll(() => plot.locator("path.recharts-symbols").count()).toBe(2 * POINTS.length);
      await plot.locator("svg text").filter({ hasText: "Shannon limit R = 4/7" }).waitFor();
      // (2^{8/7} − 1)/(8/7) = 1.0572 → 10·log10 = 0.24 dB (Shannon 1948, rate per real dimension; Python 3 math).
      expect(await page.getByText(/^0\.24 dB/).count()).toBeGreaterThan(0);
      const table = page.getByRole("table", { name: /Counts and error rates for each point/ });
      expect(await table.getByRole("row").count()).toBe(POINTS.length + 1);
      await settle(page);
      await plot.evaluate((el) => el.closest("section")!.scrollIntoView({ block: "start" }));
      await capture(page, "simulation-result-1280");
      expect(await layoutProblems(page)).toEqual([]);

      // CSV: one row a point, the same counts the console's own route answers.
      const [csvFile] = await Promise.all([page.waitForEvent("download"), page.getByRole("button", { name: "CSV" }).click()]);
      expect(csvFile.suggestedFilename()).toBe(`${sweep}.csv`);
      const [header, ...lines] = (await readFile((await csvFile.path())!, "utf8")).trim().split("\r\n");
      expect(header!.split(",").slice(0, 5)).toEqual(["point", "frames", "info_bits", "bit_errors", "frame_errors"]);
      const json = (await (await page.request.get(`${e2e.baseUrl}/api/console/orgs/${ORG}/simulations/${sweep}`)).json()) as {
        simulation: { points: { x: number; counts: { frames: number; infoBits: number; bitErrors: number; frameErrors: number } }[] };
      };
      expect(lines.map((l) => l.split(",").slice(0, 5).map(Number))).toEqual(json.simulation.points.map((p) => [p.x, p.counts.frames, p.counts.infoBits, p.counts.bitErrors, p.counts.frameErrors]));
      expect(json.simulation.points.every((p) => p.counts.infoBits === 6e7)).toBe(true);

      const [svgFile] = await Promise.all([page.waitForEvent("download"), page.getByRole("button", { name: "SVG" }).click()]);
      const svg = await readFile((await svgFile.path())!, "utf8");
      expect(svg).toMatch(/^<svg[^>]*xmlns="http:\/\/www\.w3\.org\/2000\/svg"/);
      expect(svg).toContain("Shannon limit");
      expect(svg).not.toContain("var(--");
      const [pngFile] = await Promise.all([page.waitForEvent("download"), page.getByRole("button", { name: "PNG" }).click()]);
      // The PNG signature (RFC 2083 §3.1).
      expect([...(await readFile((await pngFile.path())!)).subarray(0, 8)]).toEqual([137, 80, 78, 71, 13, 10, 26, 10]);

      // A slow one (uncoded, 10^12 bits at p = 0.4), cancelled from the list behind a confirmation.
      await page.goto(`${e2e.baseUrl}/console/${ORG}/simulations`);
      const slow = await start(page, { coded: false, channel: "bsc", points: "0.4", minBitErrors: "", maxBits: "1000000000000", seed: "5" });
      const slowRow = page.getByRole("row").filter({ hasText: slow });
      await expect.poll(() => slowRow.innerText(), { timeout: 60_000 }).toMatch(/running/);
      await slowRow.getByRole("button", { name: `Cancel ${slow}` }).click();
      const dialog = page.getByRole("dialog", { name: "Cancel this simulation?" });
      await dialog.waitFor();
      await dialog.getByRole("button", { name: "Cancel simulation" }).click();
      await expect.poll(() => slowRow.innerText(), { timeout: 30_000 }).toMatch(/cancelled/);
      expect(await slowRow.getByRole("button", { name: `Cancel ${slow}` }).count()).toBe(0);
      expect(await layoutProblems(page)).toEqual([]);

      // The demo's own simulation (db/seed/demo.ts): (7,4) Hamming on a BSC, p on a log axis, no Shannon limit there.
      const seeded = page.getByRole("row").filter({ hasText: /Hamming \(7,4\)[\s\S]*BSC/ });
      await seeded.getByRole("link").click();
      const bscPlot = page.getByRole("img", { name: /^Bit and frame error rates against crossover probability p/ });
      await expect.poll(() => bscPlot.locator("path.recharts-symbols").count(), { timeout: 30_000 }).toBe(8);
      expect(await bscPlot.locator("svg text").filter({ hasText: "Shannon limit" }).count()).toBe(0);
      await settle(page);
      await bscPlot.evaluate((el) => el.closest("section")!.scrollIntoView({ block: "start" }));
      await capture(page, "simulation-bsc-1280");
      expect(await layoutProblems(page)).toEqual([]);
    } finally {
      await s.close();
    }
  });

  test("at 390 px: the list and the result page fit the window", async () => {
    const s = await e2e.session({ viewport: PHONE });
    const { page } = s;
    try {
      await signInWithPassword(e2e, page, DEVELOPER.email, DEMO_PASSWORD);
      await page.goto(`${e2e.baseUrl}/console/${ORG}/simulations`);
      await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe("Error-rate simulations");
      await page.getByRole("progressbar", { name: `Progress of ${sweep}` }).waitFor();
      await settle(page);
      expect(await layoutProblems(page)).toEqual([]);
      await page.getByRole("heading", { name: "Simulations, newest first" }).evaluate((el) => el.scrollIntoView({ block: "start" }));
      await capture(page, "simulations-390");
      await page.goto(`${e2e.baseUrl}/console/${ORG}/simulations/${sweep}`);
      const plot = page.getByRole("img", { name: /^Bit and frame error rates/ });
      await plot.locator("path.recharts-symbols").first().waitFor();
      await settle(page);
      expect(await layoutProblems(page)).toEqual([]);
      // The plot scales to the phone's width.
      expect((await plot.boundingBox())!.width).toBeLessThanOrEqual(PHONE.width);
      await plot.evaluate((el) => el.closest("section")!.scrollIntoView({ block: "start" }));
      await capture(page, "simulation-result-390");
    } finally {
      await s.close();
    }
  });
});
