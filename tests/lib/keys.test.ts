import { createHash } from "node:crypto";
import { describe, expect, it } from "vitest";
import { generateKey, hashKey, isWellFormedKey, KEY_BODY_LEN, KEY_PATTERN, KEY_SCAN_PATTERN, visiblePrefix } from "@/lib/api/keys";
import { createKey } from "@/lib/api/key-service";
import { listAudit } from "@/db/queries/audit";
import { getDb } from "@/db";
import { insertOrg } from "@/db/queries/orgs";

/** CRC-32/ISO-HDLC, bit by bit (reflected, polynomial 0xEDB88320): a reference independent of node:zlib. */
function crc32Reference(text: string): number {
  let c = 0xffffffff;
  for (const byte of Buffer.from(text)) {
    c ^= byte;
    for (let k = 0; k < 8; k++) c = c & 1 ? (c >>> 1) ^ 0xedb88320 : c >>> 1;
  }
  return (c ^ 0xffffffff) >>> 0;
}

const ALPHABET = "0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz";
const fromBase62 = (s: string) => [...s].reduce((acc, c) => acc * 62 + ALPHABET.indexOf(c), 0);
/** The grammar as the README writes it, kept apart from the module's own pattern. */
const README_REGEX = /^(live|test)\.prt1\.[0-9A-Za-z]{36}$/;

describe("API key format", () => {
  it("the reference CRC gives the published check value (CRC-32 of \"123456789\" = 0xCBF43926, Williams' CRC catalogue)", () => {
    expect(crc32Reference("123456789")).toBe(0xcbf43926);
  });

  it("reads its mode first, carries at least 160 random bits and a valid checksum", () => {
    for (const mode of ["live", "test"] as const) {
      const { key, prefix, hash } = generateKey(mode);
      expect(key.startsWith(`${mode}.prt1.`)).toBe(true);
      expect(key).toMatch(README_REGEX);
      const m = KEY_PATTERN.exec(key)!;
      // Alphabet of 62 and 30 random characters: 30·log2(62) ≈ 178.6 bits.
      expect(new Set(m[2]!).size).toBeGreaterThan(1);
      expect(KEY_BODY_LEN * Math.log2(ALPHABET.length)).toBeGreaterThanOrEqual(160);
      expect(m[2]!.length).toBe(KEY_BODY_LEN);
      expect(prefix).toBe(`${mode}.prt1.${m[2]!.slice(0, 4)}`);
      expect(prefix).toBe(visiblePrefix(key));
      // SHA-256 computed independently with node:crypto.
      expect(hash).toBe(createHash("sha256").update(key).digest("hex"));
      expect(isWellFormedKey(key)).toBe(true);
    }
  });

  it("checksum is CRC-32 of everything before it, as 6 base62 digits (checked against the bitwise reference)", () => {
    for (let i = 0; i < 50; i++) {
      const { key } = generateKey(i % 2 ? "live" : "test");
      expect(fromBase62(key.slice(-6))).toBe(crc32Reference(key.slice(0, -6)));
    }
  });

  it("rejects every one-character change, including a flipped mode", () => {
    const { key } = generateKey("test");
    const m = KEY_PATTERN.exec(key)!;
    // Each position after the fixed "test.prt1." changed to each other base62 character.
    for (let i = "test.prt1.".length; i < key.length; i++) {
      for (const c of ALPHABET) {
        if (c === key[i]) continue;
        expect(isWellFormedKey(key.slice(0, i) + c + key.slice(i + 1))).toBe(false);
      }
    }
    expect(isWellFormedKey(`live.prt1.${m[2]}${m[3]}`)).toBe(false);
    expect(isWellFormedKey(key.replace("prt1", "prt2"))).toBe(false);
    expect(isWellFormedKey(key.slice(0, -1))).toBe(false);
    expect(isWellFormedKey("")).toBe(false);
  });

  it("a scanner finds keys in text with the regular expression and confirms them by the checksum", () => {
    const a = generateKey("live").key;
    const b = generateKey("test").key;
    const typo = b.slice(0, 20) + (b[20] === "a" ? "b" : "a") + b.slice(21);
    const text = `export PARITAS_KEY=${a}\nold=${typo} "${b}", x${a}y`;
    const found = [...text.matchAll(KEY_SCAN_PATTERN)].map((m) => m[0]);
    // The key glued between letters is not a candidate: a key has clear edges.
    expect(found).toEqual([a, typo, b]);
    expect(found.filter(isWellFormedKey)).toEqual([a, b]);
  });

  it("still accepts keys in the legacy format (prt_<mode>_<32 base62><6 base62 of CRC-32 of the 32>), and only with a valid checksum", () => {
    let body = "";
    for (let i = 0; i < 32; i++) body += ALPHABET[(i * 7 + 3) % 62];
    const legacy = (check: number) => {
      let s = "";
      for (let i = 0, n = check; i < 6; i++, n = Math.floor(n / 62)) s = ALPHABET[n % 62] + s;
      return `prt_live_${body}${s}`;
    };
    expect(isWellFormedKey(legacy(crc32Reference(body)))).toBe(true);
    expect(isWellFormedKey(legacy(crc32Reference(body) ^ 1))).toBe(false);
    // A legacy key never matches the scanner's pattern for the current format.
    expect([...legacy(crc32Reference(body)).matchAll(KEY_SCAN_PATTERN)]).toEqual([]);
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
