import { sql } from "kysely";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { findIdempotencyRecord } from "@/db/queries/idempotency";
import { makeOrgWithKey } from "../helpers/fixtures";
import { startServerProcess, type ServerProcess } from "../helpers/server-process";

/**
 * Load and crash against a real server process (tests/helpers/serve.ts: the route modules, the database and the
 * worker pool, on node:http) sharing this file's database: concurrent calls are metered exactly, a SIGKILL in
 * the middle of a burst loses no answered call's usage row and leaves the database intact, and a request with
 * an Idempotency-Key killed mid-flight runs exactly once when retried after its lease.
 */

// Short limits so the test need not wait the production lease (15 s deadline + 15 s margin): lease 6 + 1 = 7 s.
const DEADLINE_MS = 6000;
const LEASE_MARGIN_MS = 1000;
const SERVER_ENV = {
  PARITAS_RATE_LIMIT_PER_MINUTE: "1000000",
  PARITAS_TASK_DEADLINE_MS: String(DEADLINE_MS),
  PARITAS_IDEMPOTENCY_LEASE_MARGIN_MS: String(LEASE_MARGIN_MS),
};
const BURST = 300;
const KILLED_BURST = 400;

type Ctx = Awaited<ReturnType<typeof makeOrgWithKey>>;
let ctx: Ctx;
const servers: ServerProcess[] = [];
const start = async () => {
  const s = await startServerProcess(SERVER_ENV);
  servers.push(s);
  return s;
};
beforeAll(async () => {
  ctx = await makeOrgWithKey();
});
afterAll(async () => {
  await Promise.all(servers.map((s) => s.kill9()));
});

const call = (s: ServerProcess, path: string, body: unknown, headers: Record<string, string> = {}) =>
  fetch(`${s.base}${path}`, {
    method: "POST",
    headers: { authorization: ctx.auth, "content-type": "application/json", ...headers },
    body: JSON.stringify(body),
  });

async function usageRows(requestIds: string[]) {
  return ctx.db.selectFrom("usage_events").select(["request_id", "status", "units", "endpoint"]).where("request_id", "in", requestIds).execute();
}

async function integrityCheck(): Promise<string[]> {
  const { rows } = await sql<{ integrity_check: string }>`pragma integrity_check`.execute(ctx.db);
  return rows.map((r) => r.integrity_check);
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

describe("a server process under load and SIGKILL", { timeout: 120_000 }, () => {
  it(`${BURST} concurrent calls → exactly ${BURST} usage rows, one per request id`, async () => {
    const s = await start();
    const ids = Array.from({ length: BURST }, (_, i) => `burst-${String(i).padStart(6, "0")}`);
    const answers = await Promise.all(ids.map((id) => call(s, "/api/v1/distance", { a: "1011", b: "1001" }, { "x-request-id": id })));
    expect(answers.map((r) => r.status)).toEqual(ids.map(() => 200));
    expect(answers.map((r) => r.headers.get("x-request-id"))).toEqual(ids);
    const rows = await usageRows(ids);
    expect(rows).toHaveLength(BURST);
    expect(new Set(rows.map((r) => r.request_id)).size).toBe(BURST);
    expect(rows.every((r) => r.status === 200 && r.units === 1 && r.endpoint === "distance")).toBe(true);
    await s.kill9();
  });

  it("SIGKILL mid-burst: the database passes integrity_check and every call that was answered has its usage row", async () => {
    const s = await start();
    const ids = Array.from({ length: KILLED_BURST }, (_, i) => `killed-${String(i).padStart(6, "0")}`);
    const answered: string[] = [];
    const statuses = new Set<number>();
    let killing: Promise<void> | undefined;
    await Promise.allSettled(
      ids.map(async (id) => {
        const res = await call(s, "/api/v1/distance", { a: "110", b: "011" }, { "x-request-id": id });
        statuses.add(res.status);
        answered.push(id);
        if (answered.length === KILLED_BURST / 4) killing = s.kill9();
      }),
    );
    await killing;
    expect([...statuses]).toEqual([200]);
    expect(s.child.signalCode).toBe("SIGKILL");
    // Killed in the middle: some calls were answered, some never were.
    expect(answered.length).toBeGreaterThanOrEqual(KILLED_BURST / 4);
    expect(answered.length).toBeLessThan(KILLED_BURST);

    expect(await integrityCheck()).toEqual(["ok"]);
    const rows = await usageRows(ids);
    const metered = new Set(rows.map((r) => r.request_id));
    expect(answered.filter((id) => !metered.has(id))).toEqual([]);
    expect(rows.length).toBe(metered.size);
    expect(rows.length).toBeLessThanOrEqual(KILLED_BURST);
  });

  it("a request with an Idempotency-Key killed mid-flight: 409 while its lease runs, then the retry runs exactly once", async () => {
    // BCH (63,24), t = 7: enumerating 2^24 codewords on the worker pool, about a second here; well inside the deadline.
    const body = { code: { family: "bch", m: 6, t: 7 } };
    const key = "crash-analyze-1";
    const first = await start();
    // The restarted server, up before the kill so that the test knows the lease still runs when it first retries.
    const restarted = await start();

    const inFlight = call(first, "/api/v1/codes/analyze", body, { "idempotency-key": key, "x-request-id": "crash-first-call" }).then(
      () => "answered",
      () => "no answer",
    );
    let rec = await findIdempotencyRecord(ctx.db, ctx.org.id, key);
    for (let i = 0; i < 500 && rec?.state !== "running"; i++) {
      await sleep(10);
      rec = await findIdempotencyRecord(ctx.db, ctx.org.id, key);
    }
    expect(rec?.state).toBe("running");
    await first.kill9();
    expect(await inFlight).toBe("no answer");
    rec = await findIdempotencyRecord(ctx.db, ctx.org.id, key);
    expect(rec?.state).toBe("running");
    const leaseEnd = Date.parse(rec!.lease_expires_at!);
    expect(leaseEnd - Date.parse(rec!.created_at)).toBe(DEADLINE_MS + LEASE_MARGIN_MS);

    const early = await call(restarted, "/api/v1/codes/analyze", body, { "idempotency-key": key, "x-request-id": "crash-retry-early" });
    expect(early.status).toBe(409);
    expect(Number(early.headers.get("retry-after"))).toBeGreaterThanOrEqual(1);
    expect(Number(early.headers.get("retry-after"))).toBeLessThanOrEqual(5);

    await sleep(Math.max(0, leaseEnd - Date.now()) + 100);
    // Two retries at once after the lease: one takes the record over and runs, the other waits (409) or gets the replay.
    const racing = ["crash-retry-a", "crash-retry-b"];
    const [a, b] = await Promise.all(racing.map((id) => call(restarted, "/api/v1/codes/analyze", body, { "idempotency-key": key, "x-request-id": id })));
    const ran = [a!, b!].filter((r) => r.status === 200 && r.headers.get("idempotency-replayed") === null);
    expect(ran).toHaveLength(1);
    const result = (await ran[0]!.json()) as { code: { name: string; minimumDistance: number } };
    // d = 15 for the primitive (63,24) BCH code: Lin & Costello, Error Control Coding (2nd ed.), table of binary primitive BCH codes.
    expect(result.code).toMatchObject({ name: "BCH (63,24)", minimumDistance: 15 });

    const later = await call(restarted, "/api/v1/codes/analyze", body, { "idempotency-key": key, "x-request-id": "crash-retry-later" });
    expect(later.status).toBe(200);
    expect(later.headers.get("idempotency-replayed")).toBe("true");

    const rows = await usageRows(["crash-first-call", "crash-retry-early", ...racing, "crash-retry-later"]);
    // The killed call was never answered and wrote no row; of the retries exactly one ran and was charged.
    expect(rows.map((r) => r.request_id)).not.toContain("crash-first-call");
    expect(rows.filter((r) => r.units > 0)).toHaveLength(1);
    expect(rows).toHaveLength(4);
    expect((await findIdempotencyRecord(ctx.db, ctx.org.id, key))?.state).toBe("done");
    expect(await integrityCheck()).toEqual(["ok"]);
  });
});
