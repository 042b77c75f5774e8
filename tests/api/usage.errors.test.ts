import { beforeAll, describe, expect, it } from "vitest";
import { encodeCursor } from "@/lib/api/pagination";
import { expectFieldError, expectProblem, getQuery } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["usage:read"] }));
});

const call = (query: Record<string, string | number>) => getQuery("/api/v1/usage", query, auth);
const b64 = (s: string) => Buffer.from(s).toString("base64url");

describe("GET /usage: bad query parameters", () => {
  it.each([
    ["from not a date", { from: "yesterday" }, "/from", /YYYY-MM-DD/],
    ["from without zero padding", { from: "2026-1-1" }, "/from", /YYYY-MM-DD/],
    ["from with a time", { from: "2026-01-01T00:00:00Z" }, "/from", /YYYY-MM-DD/],
    ["from with month 13", { from: "2026-13-01" }, "/from", /calendar date/],
    ["from on 30 February", { from: "2026-02-30", to: "2026-03-05" }, "/from", /calendar date/],
    ["to on 31 April", { from: "2026-04-01", to: "2026-04-31" }, "/to", /calendar date/],
    ["to on 29 February of a common year", { to: "2025-02-29" }, "/to", /calendar date/],
    ["limit 0", { limit: 0 }, "/limit", undefined],
    ["limit over 500", { limit: 501 }, "/limit", undefined],
    ["limit not a number", { limit: "ten" }, "/limit", undefined],
    ["limit not an integer", { limit: "2.5" }, "/limit", undefined],
    ["an unknown parameter", { page: 2 }, "/page", undefined],
  ])("%s → 422 at the parameter", async (_name, query, pointer, message) => {
    expectFieldError(await call(query), pointer, message);
  });

  it("29 February of a leap year is a date", async () => {
    const res = await call({ from: "2028-02-29", to: "2028-02-29" });
    expect(res.status, res.text).toBe(200);
  });

  it("from after to → 422 at /from", async () => {
    expectFieldError(await call({ from: "2026-05-02", to: "2026-05-01" }), "/from", /after/);
  });

  it("a period of 401 days (over 400) → 422 at /from", async () => {
    // 2025-01-01 .. 2026-02-05 inclusive: 365 + 36 = 401 days, counted by hand.
    expectFieldError(await call({ from: "2025-01-01", to: "2026-02-05" }), "/from", /400 days/);
  });

  it("exactly 400 days is still accepted (2025-01-01 .. 2026-02-04)", async () => {
    expect((await call({ from: "2025-01-01", to: "2026-02-04" })).status).toBe(200);
  });

  it.each([
    ["garbage", "!!!not-a-cursor!!!"],
    ["base64 of text that is not JSON", b64("hello")],
    ["base64 of JSON of the wrong shape", b64(JSON.stringify({ page: 2 }))],
    ["base64 of JSON with the wrong types", b64(JSON.stringify({ day: 1, endpoint: null }))],
    ["base64 of a JSON array", b64("[1,2]")],
    ["an empty cursor", ""],
  ])("a cursor that is %s → 422 at /cursor", async (_name, cursor) => {
    expectFieldError(await call({ cursor }), "/cursor");
  });

  it("a cursor over 512 characters → 422 at /cursor", async () => {
    expectFieldError(await call({ cursor: encodeCursor({ day: "2026-01-01", endpoint: "x".repeat(600) }) }), "/cursor");
  });

  it("several bad parameters are all listed", async () => {
    const p = expectProblem(await call({ from: "x", limit: 0, extra: 1 }), 422, "validation-failed");
    expect(p.errors!.map((e) => e.pointer)).toEqual(expect.arrayContaining(["/from", "/limit", "/extra"]));
  });
});
