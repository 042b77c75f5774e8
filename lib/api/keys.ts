import { createHash, randomInt, timingSafeEqual } from "node:crypto";
import { crc32 } from "node:zlib";
import type { KeyMode } from "@/db/schema";

/**
 * Key format: `prt_<mode>_<32 random base62 chars><6 base62 chars of CRC-32 over the random part>`.
 * 32 base62 characters carry 32·log2(62) ≈ 190 bits. The checksum lets a secret scanner
 * recognise a real key offline, and lets us reject typos before touching the database.
 */
const ALPHABET = "0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz";
const BODY_LEN = 32;
const CHECK_LEN = 6;
export const KEY_PATTERN = /^prt_(live|test)_([0-9A-Za-z]{32})([0-9A-Za-z]{6})$/;
/** Characters of the key kept visible in lists: mode plus the first four random characters. */
const VISIBLE_LEN = "prt_live_".length + 4;

function base62(n: number, width: number): string {
  let s = "";
  for (let i = 0; i < width; i++) {
    s = ALPHABET[n % 62] + s;
    n = Math.floor(n / 62);
  }
  return s;
}

const checksum = (body: string) => base62(crc32(body), CHECK_LEN);

export function generateKey(mode: KeyMode): { key: string; prefix: string; hash: string } {
  let body = "";
  for (let i = 0; i < BODY_LEN; i++) body += ALPHABET[randomInt(62)];
  const key = `prt_${mode}_${body}${checksum(body)}`;
  return { key, prefix: key.slice(0, VISIBLE_LEN), hash: hashKey(key) };
}

export const hashKey = (key: string) => createHash("sha256").update(key).digest("hex");

/** Well-formed and its checksum matches. */
export function isWellFormedKey(key: string): boolean {
  const m = KEY_PATTERN.exec(key);
  return !!m && checksum(m[2]!) === m[3];
}

export function hashesEqual(a: string, b: string): boolean {
  const x = Buffer.from(a, "hex");
  const y = Buffer.from(b, "hex");
  return x.length === y.length && timingSafeEqual(x, y);
}
