import { randomUUID } from "node:crypto";
import { rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import fc from "fast-check";
import { afterAll } from "vitest";
import { closeDb } from "@/db";
import { resetRateLimits } from "@/lib/api/rate-limit";
import { closePools } from "@/lib/jobs/pool";

// Property tests draw the same cases on every run and machine (a failure names its seed and path).
fc.configureGlobal({ seed: 20261201 });

// Each test file gets its own fresh database file and rate-limit counters.
const file = join(tmpdir(), `paritas-test-${randomUUID()}.db`);
process.env.PARITAS_DB_FILE = file;
await closeDb();
resetRateLimits();

afterAll(async () => {
  await closePools();
  await closeDb();
  for (const suffix of ["", "-wal", "-shm"]) rmSync(file + suffix, { force: true });
});
