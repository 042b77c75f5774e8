import { execFile } from "node:child_process";
import { randomUUID } from "node:crypto";
import { rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { promisify } from "node:util";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, migrate, openDb, type Db } from "@/db";
import { listAudit } from "@/db/queries/audit";
import { insertOrg } from "@/db/queries/orgs";
import { hashKey, isWellFormedKey } from "@/lib/api/keys";

const run = promisify(execFile);
const file = join(tmpdir(), `paritas-cli-${randomUUID()}.db`);
const cli = (...args: string[]) => run("npx", ["tsx", "scripts/keys.ts", ...args], { env: { ...process.env, PARITAS_DB_FILE: file } });

let db: Db;
let orgId: number;

beforeAll(async () => {
  db = openDb(file);
  await migrate(db);
  orgId = (await insertOrg(db, { slug: "cli-org", name: "CLI org" })).id;
});

afterAll(async () => {
  await db.destroy();
  await closeDb();
  for (const s of ["", "-wal", "-shm"]) rmSync(file + s, { force: true });
});

describe("keys command", () => {
  it("create prints only the key, which is stored as a hash with the given scopes and mode", async () => {
    const { stdout } = await cli("create", "--org", "cli-org", "--name", "ci", "--scopes", "compute", "--test");
    const key = stdout.trim();
    expect(stdout.split("\n").filter(Boolean)).toHaveLength(1);
    expect(isWellFormedKey(key)).toBe(true);
    expect(key.startsWith("test.prt1.")).toBe(true);
    const row = await db.selectFrom("api_keys").selectAll().where("key_hash", "=", hashKey(key)).executeTakeFirstOrThrow();
    expect([row.name, row.scopes, row.mode]).toEqual(["ci", "compute", "test"]);
  }, 60_000);

  it("list shows keys without secrets; revoke by prefix sets revoked_at and audits", async () => {
    const { stdout: created } = await cli("create", "--org", "cli-org", "--name", "to-revoke");
    const key = created.trim();
    const { stdout: listed } = await cli("list", "--org", "cli-org", "--json");
    const rows = JSON.parse(listed) as { prefix: string; state: string; name: string }[];
    expect(listed).not.toContain(key);
    const mine = rows.find((r) => r.name === "to-revoke")!;
    expect(mine.state).toBe("active");
    await cli("revoke", "--org", "cli-org", mine.prefix);
    const row = await db.selectFrom("api_keys").selectAll().where("key_hash", "=", hashKey(key)).executeTakeFirstOrThrow();
    expect(row.revoked_at).not.toBeNull();
    const actions = (await listAudit(db, orgId)).filter((a) => a.target_id === String(row.id)).map((a) => a.action);
    expect(actions).toEqual(["key.created", "key.revoked"]);
  }, 60_000);

  it("refuses an unknown org and an unknown scope with exit code 2", async () => {
    await expect(cli("create", "--org", "nope")).rejects.toMatchObject({ code: 2 });
    await expect(cli("create", "--org", "cli-org", "--scopes", "everything")).rejects.toMatchObject({ code: 2 });
  }, 60_000);
});
