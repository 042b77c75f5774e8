import { createHash } from "node:crypto";
import { crc32 } from "node:zlib";
import { describe, expect, it } from "vitest";
import { generateKey, hashKey, isWellFormedKey, KEY_PATTERN } from "@/lib/api/keys";
import { createKey } from "@/lib/api/key-service";
import { listAudit } from "@/db/queries/audit";
import { getDb } from "@/db";
import { insertOrg } from "@/db/queries/orgs";

describe("API key format", () => {
  it("has a test/live prefix, at least 160 random bits and a valid checksum", () => {
    for (const mode of ["live", "test"] as const) {
      const { key, prefix, hash } = generateKey(mode);
      expect(key.startsWith(`prt_${mode}_`)).toBe(true);
      const m = KEY_PATTERN.exec(key)!;
      // 32 base62 characters: 32·log2(62) bits of entropy.
      expect(m[2]!.length * Math.log2(62)).toBeGreaterThanOrEqual(160);
      expect(prefix).toBe(key.slice(0, prefix.length));
      // SHA-256 computed independently with node:crypto.
      expect(hash).toBe(createHash("sha256").update(key).digest("hex"));
      expect(isWellFormedKey(key)).toBe(true);
    }
  });

  it("checksum is CRC-32 of the random part in base62 (checked with node:zlib)", () => {
    const { key } = generateKey("live");
    const m = KEY_PATTERN.exec(key)!;
    const alphabet = "0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz";
    const decoded = [...m[3]!].reduce((acc, c) => acc * 62 + alphabet.indexOf(c), 0);
    expect(decoded).toBe(crc32(m[2]!) % 62 ** 6);
  });

  it("rejects a single mistyped character through the checksum", () => {
    const { key } = generateKey("test");
    const i = 12;
    const typo = key.slice(0, i) + (key[i] === "a" ? "b" : "a") + key.slice(i + 1);
    expect(isWellFormedKey(typo)).toBe(false);
    expect(isWellFormedKey("prt_prod_" + key.slice(9))).toBe(false);
    expect(isWellFormedKey("")).toBe(false);
  });

  it("keys are distinct across many draws", () => {
    const seen = new Set(Array.from({ length: 2000 }, () => generateKey("test").key));
    expect(seen.size).toBe(2000);
  });
});

describe("createKey", () => {
  it("stores only the hash and the visible prefix, and writes the audit row", async () => {
    const db = await getDb();
    const org = await insertOrg(db, { slug: "keys-unit", name: "Keys" });
    const { key, record } = await createKey(db, { orgId: org.id, name: "k", mode: "live", scopes: ["compute"] }, "cli");
    const row = await db.selectFrom("api_keys").selectAll().where("id", "=", record.id).executeTakeFirstOrThrow();
    expect(Object.values(row)).not.toContain(key);
    expect(row.key_hash).toBe(hashKey(key));
    expect(key.startsWith(row.prefix)).toBe(true);
    const audit = await listAudit(db, org.id);
    expect(audit.map((a) => [a.action, a.target_id, a.actor])).toEqual([["key.created", String(record.id), "cli"]]);
    expect(JSON.stringify(audit)).not.toContain(key);
  });
});
