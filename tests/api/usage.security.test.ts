import { describe, expect, it } from "vitest";
import type { Db } from "@/db";
import { insertUsageEvent } from "@/db/queries/usage";
import { getQuery, postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";
import { authMatrix } from "../helpers/security";

// Missing, malformed, forged, revoked and expired keys; wrong scope (e.g. a compute-only key).
authMatrix({ method: "GET", path: "/api/v1/usage", input: {}, scope: "usage:read" });

let seq = 0;
const insert = (db: Db, orgId: number, keyId: number, at: string, endpoint: string, units: number) =>
  insertUsageEvent(db, {
    org_id: orgId,
    api_key_id: keyId,
    endpoint,
    method: "POST",
    status: 200,
    units,
    duration_ms: 1,
    request_id: `req_iso_${++seq}`,
    created_at: at,
    reported_at: null,
  });

describe("GET /usage: one organisation never sees another's usage", () => {
  it("two orgs with rows on the same days each see only their own", async () => {
    const a = await makeOrgWithKey({ scopes: ["usage:read"] });
    const b = await makeOrgWithKey({ scopes: ["usage:read"] });
    await insert(a.db, a.org.id, a.keyId, "2026-02-01T10:00:00.000Z", "distance", 3);
    await insert(a.db, a.org.id, a.keyId, "2026-02-02T10:00:00.000Z", "capacity", 5);
    await insert(b.db, b.org.id, b.keyId, "2026-02-01T11:00:00.000Z", "distance", 100);
    await insert(b.db, b.org.id, b.keyId, "2026-02-03T11:00:00.000Z", "links.ber", 200);

    const q = { from: "2026-02-01", to: "2026-02-28" };
    const ra = await getQuery("/api/v1/usage", q, a.auth);
    const rb = await getQuery("/api/v1/usage", q, b.auth);
    expect(ra.body.org).toBe(a.org.slug);
    expect(rb.body.org).toBe(b.org.slug);
    expect(ra.body.data).toEqual([
      { day: "2026-02-01", endpoint: "distance", calls: 1, units: 3, errors: 0 },
      { day: "2026-02-02", endpoint: "capacity", calls: 1, units: 5, errors: 0 },
    ]);
    expect(rb.body.data).toEqual([
      { day: "2026-02-01", endpoint: "distance", calls: 1, units: 100, errors: 0 },
      { day: "2026-02-03", endpoint: "links.ber", calls: 1, units: 200, errors: 0 },
    ]);
  });

  it("a cursor obtained by one org, replayed by another, still shows only the other org's rows", async () => {
    const a = await makeOrgWithKey({ scopes: ["usage:read"] });
    const b = await makeOrgWithKey({ scopes: ["usage:read"] });
    for (let d = 1; d <= 4; d++) await insert(a.db, a.org.id, a.keyId, `2026-02-0${d}T10:00:00.000Z`, "distance", 1);
    await insert(b.db, b.org.id, b.keyId, "2026-02-04T12:00:00.000Z", "distance", 9);
    const q = { from: "2026-02-01", to: "2026-02-28", limit: 1 };
    const first = await getQuery("/api/v1/usage", q, a.auth);
    expect(first.body.nextCursor).toBeTruthy();
    const cross = await getQuery("/api/v1/usage", { ...q, cursor: first.body.nextCursor }, b.auth);
    expect(cross.status).toBe(200);
    expect(cross.body.data).toEqual([{ day: "2026-02-04", endpoint: "distance", calls: 1, units: 9, errors: 0 }]);
  });

  it("calls made with one org's key are metered to that org only", async () => {
    const a = await makeOrgWithKey();
    const b = await makeOrgWithKey();
    for (let i = 0; i < 3; i++) expect((await postJson("/api/v1/distance", { a: "1", b: "0" }, a.auth)).status).toBe(200);
    const today = new Date().toISOString().slice(0, 10);
    const rb = await getQuery("/api/v1/usage", { from: today, to: today }, b.auth);
    expect(rb.body.data).toEqual([]);
    const ra = await getQuery("/api/v1/usage", { from: today, to: today }, a.auth);
    expect(ra.body.data).toEqual([{ day: today, endpoint: "distance", calls: 3, units: 3, errors: 0 }]);
  });
});
