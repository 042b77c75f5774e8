/** The landing page lists every endpoint the API serves (the browser test checks its planned marks against the server). */
import { describe, expect, test } from "vitest";
import { LANDING_ENDPOINTS } from "@/app/landing";
import { endpoints } from "@/lib/api/registry";

describe("landing page", () => {
  test("lists every endpoint the API serves", () => {
    const listed = new Set(LANDING_ENDPOINTS.map(([m, p]) => `${m} ${p}`));
    for (const e of endpoints) expect(listed, `${e.method} ${e.path}`).toContain(`${e.method} ${e.path}`);
  });
});
