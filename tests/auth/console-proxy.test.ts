import { NextRequest } from "next/server";
import { describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { bumpSessionEpoch } from "@/db/queries/sessions";
import proxy from "@/proxy";
import { makePerson } from "../helpers/console";

const at = (path: string, cookie?: string) => new NextRequest(`http://localhost:3000${path}`, { headers: cookie ? { cookie } : {} });

// Which paths reach the proxy (its matcher) is checked on the production server: tests/e2e/signed-out.test.ts.
describe("console pages redirect on the server without a session", () => {
  it.each(["/console", "/console/brinewatch", "/console/brinewatch/keys?show=all", "/console/invite/abc123?x=1"])("%s → 307 to /signin with the page as callbackUrl", async (path) => {
    const res = await proxy(at(path));
    expect(res.status).toBe(307);
    const to = new URL(res.headers.get("location")!);
    expect(to.pathname).toBe("/signin");
    expect(to.searchParams.get("callbackUrl")).toBe(path);
  });

  it("a valid session passes through; the same cookie once the user's sessions were ended is redirected", async () => {
    const db = await getDb();
    const person = await makePerson(db, "proxy");
    const res = await proxy(at("/console/brinewatch", person.cookie));
    expect(res.status).toBe(200);
    expect(res.headers.get("x-middleware-next")).toBe("1");
    // What a password reset or a removal from an organisation does to the person's other sessions.
    await bumpSessionEpoch(db, person.id);
    const ended = await proxy(at("/console/brinewatch/keys", person.cookie));
    expect(ended.status).toBe(307);
    expect(new URL(ended.headers.get("location")!).searchParams.get("callbackUrl")).toBe("/console/brinewatch/keys");
  });

  it("a forged session cookie is redirected like none", async () => {
    const res = await proxy(at("/console/brinewatch", "next-auth.session-token=not-a-token"));
    expect(res.status).toBe(307);
  });

});
