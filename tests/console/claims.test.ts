/**
 * GET /api/console/orgs/{org}/claims: the Claims page's data. Claims are made through the public API
 * (POST /api/v1/claims), so each item must be what GET /api/v1/claims/{id} answers; the verdicts themselves
 * are checked against outside references in tests/api/claims.test.ts.
 */
import { beforeAll, describe, expect, it, vi } from "vitest";
import { insertClaim } from "@/db/queries/claims";
import { expectFieldError, getQuery, postJson } from "../helpers/api";
import { consoleCall, makeConsoleOrg, type ConsoleFixture } from "../helpers/console";

vi.mock(import("@/lib/mail/send"), async (orig) => ({ ...(await orig()), sendMail: vi.fn(async () => {}) }));

let fx: ConsoleFixture;
let path: string;
/** Claim ids in the order they were made (oldest first), and their labels. */
const made: { id: string; label: string; verdict: string }[] = [];
const T0 = Date.parse("2026-11-02T08:00:00.000Z");

const CLAIMS = [
  // 0 errors in 3·10⁹ bits: the 95 % upper bound ≈ 3/N = 1e-9 (rule of three) ≤ 1e-9 → supported.
  { label: "fw-1.0", verdict: "supported", body: { target: { metric: "ber", atMost: 1e-9 }, evidence: { mode: "measured", trials: 3e9, errors: 0 } } },
  // 2 errors in 5·10⁹ bits: the interval straddles 1e-9 → inconclusive (tests/api/claims.test.ts).
  { label: "fw-1.0", verdict: "inconclusive", body: { target: { metric: "ber", atMost: 1e-9 }, evidence: { mode: "measured", trials: 5e9, errors: 2 } } },
  // Hamming (7,4) on BSC p = 1e-3: FER = 1 − (1−p)^7 − 7p(1−p)^6 ≈ 2.09e-5 > 1e-5 → refuted.
  { label: "fw-1.1", verdict: "refuted", body: { target: { metric: "fer", atMost: 1e-5 }, evidence: { mode: "analytic", code: { family: "hamming", r: 3 }, channel: { type: "bsc", p: 1e-3 } } } },
  // 50 errors in 10⁶ bits: observed 5e-5, far above 1e-5 → refuted.
  { label: "fw-1.1", verdict: "refuted", body: { target: { metric: "ber", atMost: 1e-5 }, evidence: { mode: "measured", trials: 1e6, errors: 50 } } },
  // 0 errors in 10¹⁰ bits: upper bound ≈ 3e-10 ≤ 1e-9 (fibre preset) → supported.
  { label: "fw-1.2", verdict: "supported", body: { target: { preset: "fibre" }, evidence: { mode: "measured", trials: 1e10, errors: 0 } } },
] as const;

const get = (query = "", cookie = fx.owner.cookie) => consoleCall("GET", `${path}${query}`, { cookie });

beforeAll(async () => {
  fx = await makeConsoleOrg();
  path = `/api/console/orgs/${fx.org.slug}/claims`;
  const auth = `Bearer ${fx.keys.owner.key}`;
  for (const [i, c] of CLAIMS.entries()) {
    const res = await postJson("/api/v1/claims", { label: c.label, ...c.body }, auth);
    expect(res.status, res.text).toBe(201);
    expect(res.body.verdict).toBe(c.verdict);
    // Minutes apart, so "newest first" has one answer.
    const at = new Date(T0 + i * 60_000).toISOString();
    await fx.db.updateTable("claims").set({ created_at: at, decided_at: at }).where("id", "=", res.body.id).execute();
    made.push({ id: res.body.id, label: c.label, verdict: c.verdict });
  }
  // Another org's claim, under a label this org also uses.
  expect((await postJson("/api/v1/claims", { label: "fw-1.0", ...CLAIMS[0].body }, `Bearer ${fx.otherKey.key}`)).status).toBe(201);
});

describe("the claims list", () => {
  it("is the same for owners, developers and billing admins", async () => {
    const bodies = [];
    for (const p of [fx.owner, fx.developer, fx.billing]) {
      const res = await get("", p.cookie);
      expect(res.status, res.text).toBe(200);
      bodies.push(res.body);
    }
    expect(bodies[1]).toEqual(bodies[0]);
    expect(bodies[2]).toEqual(bodies[0]);
  });

  it("lists the org's claims newest first, each exactly as GET /api/v1/claims/{id} presents it, with no job behind a decided claim", async () => {
    const res = await get();
    expect(res.body.claims.map((c: { id: string }) => c.id)).toEqual(made.map((m) => m.id).reverse());
    expect(res.body.nextCursor).toBeNull();
    for (const c of res.body.claims) {
      const { jobId, ...claim } = c;
      expect(jobId).toBeNull();
      const api = await getQuery(`/api/v1/claims/${c.id}`, {}, `Bearer ${fx.keys.developer.key}`);
      expect(api.status).toBe(200);
      expect(claim).toEqual(api.body);
    }
  });

  it("lists each label once, most recently claimed first, with its latest verdict and counts per verdict", async () => {
    const res = await get();
    expect(res.body.labels).toEqual([
      { label: "fw-1.2", latestAt: new Date(T0 + 4 * 60_000).toISOString(), latestVerdict: "supported", total: 1, counts: { supported: 1, refuted: 0, inconclusive: 0, pending: 0 } },
      { label: "fw-1.1", latestAt: new Date(T0 + 3 * 60_000).toISOString(), latestVerdict: "refuted", total: 2, counts: { supported: 0, refuted: 2, inconclusive: 0, pending: 0 } },
      { label: "fw-1.0", latestAt: new Date(T0 + 1 * 60_000).toISOString(), latestVerdict: "inconclusive", total: 2, counts: { supported: 1, refuted: 0, inconclusive: 1, pending: 0 } },
    ]);
  });

  it("filters by label, by verdict, and by both", async () => {
    const ids = async (q: string) => ((await get(q)).body.claims as { id: string }[]).map((c) => c.id);
    const expected = (f: (m: (typeof made)[number]) => boolean) => made.filter(f).map((m) => m.id).reverse();
    expect(await ids("?label=fw-1.0")).toEqual(expected((m) => m.label === "fw-1.0"));
    expect(await ids("?verdict=supported")).toEqual(expected((m) => m.verdict === "supported"));
    expect(await ids("?label=fw-1.1&verdict=refuted")).toEqual(expected((m) => m.label === "fw-1.1"));
    expect(await ids("?label=fw-1.1&verdict=supported")).toEqual([]);
    expect(await ids("?label=no-such-label")).toEqual([]);
    // A label with characters that need escaping in a URL is matched as written.
    expect(await ids(`?label=${encodeURIComponent("fw-1.0 ")}`)).toEqual([]);
  });

  it("pages with a cursor: every claim once, in order, and the filters hold on later pages", async () => {
    const seen: string[] = [];
    let cursor: string | null = null;
    let pages = 0;
    do {
      const res = await get(`?limit=2${cursor ? `&cursor=${cursor}` : ""}`);
      expect(res.status, res.text).toBe(200);
      expect(res.body.claims.length).toBeLessThanOrEqual(2);
      seen.push(...res.body.claims.map((c: { id: string }) => c.id));
      cursor = res.body.nextCursor;
      pages++;
    } while (cursor && pages < 10);
    expect(pages).toBe(3);
    expect(seen).toEqual(made.map((m) => m.id).reverse());

    const first = await get("?verdict=refuted&limit=1");
    expect(first.body.claims.map((c: { id: string }) => c.id)).toEqual([made[3]!.id]);
    const second = await get(`?verdict=refuted&limit=1&cursor=${first.body.nextCursor}`);
    expect(second.body.claims.map((c: { id: string }) => c.id)).toEqual([made[2]!.id]);
    expect(second.body.nextCursor).toBeNull();
  });

  it("shows a pending claim's label as pending, and counts it", async () => {
    const at = new Date(T0 + 10 * 60_000).toISOString();
    const other = await makeConsoleOrg();
    await insertClaim(other.db, {
      id: "clm-pendingpending01",
      org_id: other.org.id,
      api_key_id: null,
      label: "fw-2.0",
      mode: "simulated",
      verdict: "pending",
      request: JSON.stringify({ label: "fw-2.0" }),
      outcome: null,
      job_id: null,
      created_at: at,
      decided_at: null,
    });
    const res = await consoleCall("GET", `/api/console/orgs/${other.org.slug}/claims?verdict=supported`, { cookie: other.owner.cookie });
    expect(res.status, res.text).toBe(200);
    expect(res.body.claims).toEqual([]);
    expect(res.body.labels).toEqual([{ label: "fw-2.0", latestAt: at, latestVerdict: "pending", total: 1, counts: { supported: 0, refuted: 0, inconclusive: 0, pending: 1 } }]);
  });

  it("shows a simulated claim pending with its simulation while the job waits, and decided once the job has ended, as the API then answers", async () => {
    const other = await makeConsoleOrg();
    const auth = `Bearer ${other.keys.developer.key}`;
    const made = await postJson("/api/v1/claims", { label: "fw-3.0", target: { metric: "ber", atMost: 1e-4 }, evidence: { mode: "simulated", channel: { type: "bsc" }, at: 1e-3, seed: 5 } }, auth);
    expect(made.status, made.text).toBe(202);
    const list = () => consoleCall("GET", `/api/console/orgs/${other.org.slug}/claims`, { cookie: other.billing.cookie });
    // No runner in this test: the job stays queued.
    const pending = await list();
    expect(pending.body.claims).toHaveLength(1);
    const job = pending.body.claims[0].jobId as string;
    expect(job).toMatch(/^sim-/);
    expect(pending.body.claims[0]).toMatchObject({ verdict: "pending", rate: null, interval: null, simulation: `/simulations/${job}` });
    expect(pending.body.labels[0]).toMatchObject({ label: "fw-3.0", latestVerdict: "pending", counts: { pending: 1 } });

    // The job is cancelled before it ran a chunk: the claim is decided (inconclusive: no evidence) on the console's next read.
    await other.db.updateTable("jobs").set({ status: "cancelled", reason: "cancelled by the test", finished_at: new Date().toISOString() }).where("id", "=", job).execute();
    const after = await list();
    expect(after.body.claims[0].verdict).toBe("inconclusive");
    expect(after.body.labels[0]).toMatchObject({ latestVerdict: "inconclusive", counts: { pending: 0, inconclusive: 1 } });
    const { jobId, ...claim } = after.body.claims[0];
    expect(jobId).toBe(job);
    expect(claim).toEqual((await getQuery(`/api/v1/claims/${made.body.id}`, {}, auth)).body);
  });

  it("refuses a bad verdict, a bad limit and a cursor it did not write with field pointers", async () => {
    expectFieldError(await get("?verdict=maybe"), "/verdict");
    expectFieldError(await get("?limit=0"), "/limit");
    expectFieldError(await get("?limit=101"), "/limit");
    expectFieldError(await get("?cursor=bm90LWEtY3Vyc29y"), "/cursor");
    expectFieldError(await get(`?label=${"x".repeat(121)}`), "/label");
  });
});
