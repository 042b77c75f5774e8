import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { openDb } from "@/db";
import { bumpSessionEpoch } from "@/db/queries/sessions";
import { findUserByEmail } from "@/db/queries/users";
import { signInWithPassword, startE2E, type E2E } from "./harness";

/**
 * On the production server, a console page asked for without a session is redirected by the server
 * (proxy.ts) before anything renders; the pages outside the console, and the dev mailbox, are not.
 */
let e2e: E2E;
beforeAll(async () => {
  e2e = await startE2E();
});
afterAll(async () => {
  await e2e?.stop();
});

const get = (path: string, cookie?: string) => fetch(`${e2e.baseUrl}${path}`, { redirect: "manual", headers: cookie ? { cookie } : {} });

describe("signed-out console visits", () => {
  it.each(["/console", "/console/brinewatch", "/console/brinewatch/keys?show=all", "/console/invite/abc123"])("%s → 307 to /signin?callbackUrl=<the page>, no page body", async (path) => {
    const res = await get(path);
    expect(res.status).toBe(307);
    const to = new URL(res.headers.get("location")!, e2e.baseUrl);
    expect(to.pathname).toBe("/signin");
    expect(to.searchParams.get("callbackUrl")).toBe(path);
    expect(await res.text()).not.toContain("Sign-in required");
  });

  it.each(["/", "/signin", "/docs", "/problems"])("%s is served as it is (200)", async (path) => {
    expect((await get(path)).status).toBe(200);
  });

  it("the dev mailbox is not sent to sign-in (it must open before anyone can)", async () => {
    const res = await get("/console/dev/mailbox");
    expect(res.status).not.toBe(307);
  });

  it("a session ended elsewhere (a password reset or a removal raises the user's epoch) goes to sign-in too, with its way back", async () => {
    const s = await e2e.session();
    try {
      // The demo's developer (db/seed): signed in for real, so the cookie is the server's own.
      await signInWithPassword(e2e, s.page, "teo.quillan@brinewatch.example", "tide-pool-2026");
      const cookie = await s.cookieHeader();
      expect((await get("/console/brinewatch/keys", cookie)).status).toBe(200);
      const db = openDb(e2e.dbFile);
      try {
        await bumpSessionEpoch(db, (await findUserByEmail(db, "teo.quillan@brinewatch.example"))!.id);
      } finally {
        await db.destroy();
      }
      const res = await get("/console/brinewatch/keys", cookie);
      expect(res.status).toBe(307);
      const to = new URL(res.headers.get("location")!, e2e.baseUrl);
      expect([to.pathname, to.searchParams.get("callbackUrl")]).toEqual(["/signin", "/console/brinewatch/keys"]);
    } finally {
      await s.close();
    }
  });
});
