import { createHash, randomInt, timingSafeEqual } from "node:crypto";
import { crc32 } from "node:zlib";
import type { KeyMode } from "@/db/schema";

/**
 * Key format (version 1), mode first so it reads at a glance:
 *
 *   key   = mode "." "prt1" "." body check
 *   mode  = "live" / "test"
 *   body  = 30 base62      ; random, 30·log2(62) ≈ 178.6 bits
 *   check = 6 base62       ; CRC-32 of everything before it, base62, most significant digit first
 *
 * The checksum covers the mode and version too, so flipping "test" to "live" is caught. CRC-32
 * detects every single-character change (a burst shorter than 32 bits), and 62^6 > 2^32 keeps
 * distinct CRCs distinct. A scanner finds keys with KEY_SCAN_PATTERN and confirms them with the
 * checksum, offline.
 */
const ALPHABET = "0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz";
export const KEY_VERSION = "prt1";
export const KEY_BODY_LEN = 30;
const CHECK_LEN = 6;
export const KEY_PATTERN = /^(live|test)\.prt1\.([0-9A-Za-z]{30})([0-9A-Za-z]{6})$/;
/** For scanning text: matches candidate keys anywhere; confirm each with isWellFormedKey. */
export const KEY_SCAN_PATTERN = /(?<![0-9A-Za-z.])(?:live|test)\.prt1\.[0-9A-Za-z]{36}(?![0-9A-Za-z])/g;
/** Characters kept visible in lists: mode, version and the first four random characters. */
const VISIBLE_LEN = "live.prt1.".length + 4;

/**
 * The format issued before version 1: `prt_<mode>_<32 base62><6 base62 of CRC-32 of the 32>`.
 * Such keys keep authenticating until they are rotated or revoked; none are issued any more.
 */
export const LEGACY_PATTERN = /^prt_(live|test)_([0-9A-Za-z]{32})([0-9A-Za-z]{6})$/;

/**
 * Key-shaped text anywhere, in either format and without the scan pattern's boundary guards: for cutting keys out
 * of logs and answers (lib/api/redact.ts), where matching too much is safe and too little is not.
 */
export const KEY_SHAPED = /(?:live|test)\.prt1\.[0-9A-Za-z]{36}|prt_(?:live|test)_[0-9A-Za-z]{38}/g;

function base62(n: number, width: number): string {
  let s = "";
  for (let i = 0; i < width; i++) {
    s = ALPHABET[n % 62] + s;
    n = Math.floor(n / 62);
  }
  return s;
}

const checksum = (text: string) => base62(crc32(text), CHECK_LEN);

/** The part of a key shown in lists and stored in the prefix column. */
export const visiblePrefix = (key: string) => key.slice(0, VISIBLE_LEN);

export function generateKey(mode: KeyMode): { key: string; prefix: string; hash: string } {
  let body = "";
  for (let i = 0; i < KEY_BODY_LEN; i++) body += ALPHABET[randomInt(62)];
  const unchecked = `${mode}.${KEY_VERSION}.${body}`;
  const key = unchecked + checksum(unchecked);
  return { key, prefix: visiblePrefix(key), hash: hashKey(key) };
}

export const hashKey = (key: string) => createHash("sha256").update(key).digest("hex");

/** Well-formed and its checksum matches, in the current format or the legacy one. */
export function isWellFormedKey(key: string): boolean {
  if (KEY_PATTERN.test(key)) return checksum(key.slice(0, -CHECK_LEN)) === key.slice(-CHECK_LEN);
  const legacy = LEGACY_PATTERN.exec(key);
  return !!legacy && checksum(legacy[2]!) === legacy[3];
}

export function hashesEqual(a: string, b: string): boolean {
  const x = Buffer.from(a, "hex");
  const y = Buffer.from(b, "hex");
  return x.length === y.length && timingSafeEqual(x, y);
}
