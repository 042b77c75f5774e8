import { randomBytes } from "node:crypto";

// Lower-case base-32 without the look-alikes i, l, o, u: readable aloud, safe in a URL path and a file name.
const ALPHABET = "0123456789abcdefghjkmnpqrstvwxyz";

/** A public job id: `<kind prefix>-<16 base-32 characters>` (80 random bits), e.g. "sim-4k2m…". */
export function newJobId(prefix: string): string {
  const bytes = randomBytes(16);
  let s = "";
  for (let i = 0; i < 16; i++) s += ALPHABET[bytes[i]! & 31];
  return `${prefix}-${s}`;
}

export const JOB_ID_PATTERN = /^[a-z]{3}-[0-9a-hjkmnp-tv-z]{16}$/;
