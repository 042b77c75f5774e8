import { rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { NextRequest } from "next/server";
import { migrate, openDb } from "@/db";
import { insertUser } from "@/db/queries/users";
import { generateKey } from "@/lib/api/keys";
import { redactSecrets } from "@/lib/api/redact";
import { newNonce, pageCsp } from "@/lib/api/security-headers";
import { readSession, sessionCookie } from "@/lib/auth/session";
import { readSessionToken } from "@/lib/auth/session-token";

const perCall = async (n: number, f: () => unknown) => {
  const t = performance.now();
  for (let i = 0; i < n; i++) await f();
  return ((performance.now() - t) / n) * 1000;
};

/**
 * What the hardening costs per request, in process on a scratch database: (1) reading a session with the
 * user's epoch checked in the database (every console route and, now, every console page in proxy.ts)
 * against the cookie alone; (2) redacting a logged failure line against copying it; (3) a page's nonce and
 * policy. Each against its baseline measured in the same run.
 */
export async function runSecurityBench(): Promise<void> {
  const file = join(tmpdir(), `paritas-bench-security-${process.pid}.db`);
  const db = openDb(file);
  await migrate(db);
  const user = await insertUser(db, { email: "bench@bench.example" });
  const cookie = await sessionCookie({ userId: user.id, email: "bench@bench.example" });
  const req = new NextRequest("http://127.0.0.1/console/bench", { headers: { cookie } });
  const n = 2_000;
  await perCall(200, () => readSession(req, db)); // warm-up
  const tokenOnly = await perCall(n, () => readSessionToken(req));
  const withEpoch = await perCall(n, () => readSession(req, db));
  console.log(`\nsession check per request (${n} calls): cookie alone ${tokenOnly.toFixed(0)} µs; with the epoch lookup ${withEpoch.toFixed(0)} µs (${(withEpoch / tokenOnly).toFixed(2)}×, +${(withEpoch - tokenOnly).toFixed(0)} µs)`);

  const { key } = generateKey("live");
  const line = `[req_0123456789abcdef01234567] unexpected failure: Error: upstream refused (Authorization: Bearer ${key})\n    at handler (lib/api/http.ts:120:11)\n`.repeat(4);
  const m = 20_000;
  let sink = 0;
  const copy = await perCall(m, () => (sink += (" " + line).slice(1).length));
  const redact = await perCall(m, () => (sink += redactSecrets(line).length));
  console.log(`redacting a ${line.length}-character failure log line: ${redact.toFixed(2)} µs against copying it ${copy.toFixed(2)} µs (${(redact / copy).toFixed(1)}×)`);

  const csp = await perCall(m, () => (sink += pageCsp(newNonce()).length));
  console.log(`a page's nonce and Content-Security-Policy: ${csp.toFixed(2)} µs`);

  void sink; // read once, so that the loops' results count as used
  await db.destroy();
  for (const f of [file, `${file}-wal`, `${file}-shm`]) rmSync(f, { force: true });
}
