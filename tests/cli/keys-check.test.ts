import { execFile } from "node:child_process";
import { existsSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";

/**
 * `keys check` against keys built here from the README's grammar with a bitwise CRC-32 written from its
 * definition (reflected polynomial 0xEDB88320, init and xor-out 0xFFFFFFFF), not with the project's code.
 */
function crc32Reference(text: string): number {
  let crc = 0xffffffff;
  for (const byte of Buffer.from(text, "latin1")) {
    crc ^= byte;
    for (let i = 0; i < 8; i++) crc = crc & 1 ? (crc >>> 1) ^ 0xedb88320 : crc >>> 1;
  }
  return (crc ^ 0xffffffff) >>> 0;
}
const DIGITS = "0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz";
const base62 = (n: number) => Array.from({ length: 6 }, (_, i) => DIGITS[Math.floor(n / 62 ** (5 - i)) % 62]).join("");
const makeKey = (mode: "live" | "test", body: string) => `${mode}.prt1.${body}` + base62(crc32Reference(`${mode}.prt1.${body}`));

// A database path that must never be created: the check is offline.
const dbFile = join(tmpdir(), `paritas-keys-check-never-${process.pid}.db`);
interface Run {
  code: number;
  stdout: string;
  stderr: string;
}
const check = (arg: string, stdin?: string) =>
  new Promise<Run>((resolve) => {
    const child = execFile("npx", ["tsx", "scripts/keys.ts", "check", arg], { env: { ...process.env, PARITAS_DB_FILE: dbFile } }, (err, stdout, stderr) =>
      resolve({ code: err ? Number(err.code) : 0, stdout, stderr }),
    );
    child.stdin!.end(stdin ?? "");
  });

const BODY = "Zq81mW0pLx4TfR7cYb2NvK9sHd3GjE";
const live = makeKey("live", BODY);
const test = makeKey("test", BODY);

describe("keys check", () => {
  it("the reference CRC-32 gives the catalogue check value for 123456789 (CRC-32/ISO-HDLC: 0xCBF43926)", () => {
    expect(crc32Reference("123456789")).toBe(0xcbf43926);
  });

  it("a well-formed live key: exit 0, mode, format and matching checksum, only the visible prefix printed, no database", async () => {
    const r = await check(live);
    expect(r.code).toBe(0);
    expect(r.stdout).toBe(`live.prt1.Zq81… live key, format prt1, checksum matches\n`);
    expect(r.stdout + r.stderr).not.toContain(BODY.slice(4));
    expect(existsSync(dbFile)).toBe(false);
  }, 60_000);

  it("a test key, one mistyped character, a flipped mode and a wrong shape: 0, then 1 with the reason", async () => {
    expect((await check(test)).stdout).toContain("test key, format prt1, checksum matches");
    const typo = live.slice(0, 20) + (live[20] === "a" ? "b" : "a") + live.slice(21);
    const flipped = "test" + live.slice(4);
    for (const bad of [typo, flipped]) {
      const r = await check(bad);
      expect(r.code).toBe(1);
      expect(r.stdout).toContain("format prt1, checksum does not match");
      expect(r.stdout).not.toContain(bad.slice(14));
    }
    const r = await check("live.prt1.short");
    expect([r.code, r.stdout]).toEqual([1, "not a Paritas key (wrong shape)\n"]);
    expect(r.stdout).not.toContain("short");
  }, 60_000);

  it("legacy prt_ keys are recognised (checksum over the 32 random characters)", async () => {
    const body = "a1B2c3D4e5F6g7H8i9J0kLmNoPqRsTuV";
    const r = await check(`prt_test_${body}${base62(crc32Reference(body))}`);
    expect([r.code, r.stdout]).toEqual([0, "prt_test_a1B2c… test key, format legacy prt_, checksum matches\n"]);
  }, 60_000);

  it('"-" reads one candidate a line from stdin: a line each, exit 0 only when every one is a key', async () => {
    const good = await check("-", `${live}\n${test}\n`);
    expect(good.code).toBe(0);
    expect(good.stdout.split("\n").filter(Boolean)).toEqual([
      "line 1: live.prt1.Zq81… live key, format prt1, checksum matches",
      "line 2: test.prt1.Zq81… test key, format prt1, checksum matches",
    ]);
    const mixed = await check("-", `${live}\r\n\nnot-a-key\n`);
    expect(mixed.code).toBe(1);
    expect(mixed.stdout.split("\n").filter(Boolean)).toEqual(["line 1: live.prt1.Zq81… live key, format prt1, checksum matches", "line 2: not a Paritas key (wrong shape)"]);
    expect((await check("-", "")).code).toBe(1);
  }, 60_000);
});
