import type { CrcParams } from "@/lib/core/codes/crc";

/**
 * The CRC as Williams (1993) first describes it, with no table: every message bit goes through
 * the register one shift at a time, in BigInt arithmetic for every width. Kept independent of the
 * shipped code on purpose.
 */
export function crcBitwise(p: CrcParams, data: Uint8Array): bigint {
  const w = BigInt(p.width);
  const top = 1n << (w - 1n);
  const mask = (1n << w) - 1n;
  let reg = p.init;
  for (const byte of data) {
    for (let j = 0; j < 8; j++) {
      const bit = p.refin ? (byte >> j) & 1 : (byte >> (7 - j)) & 1;
      const fb = (reg & top ? 1 : 0) ^ bit;
      reg = (reg << 1n) & mask;
      if (fb) reg ^= p.poly;
    }
  }
  if (p.refout) {
    let r = 0n;
    for (let i = 0n; i < w; i++) r |= ((reg >> i) & 1n) << (w - 1n - i);
    reg = r;
  }
  return reg ^ p.xorout;
}
