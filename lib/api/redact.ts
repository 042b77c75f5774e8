import { inspect } from "node:util";
import { KEY_SHAPED, visiblePrefix } from "./keys";

/**
 * Secrets cut out of text before it reaches a log or an answer; the key shapes come from lib/api/keys.ts, the
 * others live here. Keys keep their visible prefix (as key lists show them), so a log line still says which key was involved.
 */

/** Credentials in header form, as a failing HTTP client may quote its request. */
const BEARER = /\b(Bearer|Basic)\s+[A-Za-z0-9._~+/=-]{8,}/gi;
/** A JWE in compact form: the session token next-auth sets (header.key.iv.ciphertext.tag, base64url). */
const COMPACT_JWE = /eyJ[\w-]+\.[\w-]*\.[\w-]+\.[\w-]+\.[\w-]+/g;
/** This process's own configured secrets, replaced wherever they appear verbatim. */
const CONFIGURED = ["PARITAS_AUTH_SECRET", "NEXTAUTH_SECRET", "PARITAS_BILLING_SECRET_KEY", "PARITAS_BILLING_WEBHOOK_SECRET"] as const;

/** Key-shaped text cut to its visible prefix: `live.prt1.Ab3x…`. */
export const redactKeys = (text: string) => text.replace(KEY_SHAPED, (key) => `${visiblePrefix(key)}…`);

/** Keys cut to their prefix; credentials, session tokens and the configured secrets replaced with `…`. */
export function redactSecrets(text: string): string {
  // Whole credentials first, so a key after "Bearer" goes entirely rather than down to its prefix.
  let out = redactKeys(text.replace(BEARER, "$1 …").replace(COMPACT_JWE, "eyJ…"));
  for (const name of CONFIGURED) {
    const value = process.env[name];
    // Very short values would blank out ordinary words; a real secret is never that short.
    if (value && value.length >= 8) out = out.split(value).join(`[${name}]`);
  }
  return out;
}

/**
 * console.error for the server's own failures, with secrets cut out of the message, the error's
 * properties and its stack (an SDK error may quote the request that carried a key).
 */
export function logError(context: string, err?: unknown): void {
  console.error(redactSecrets(err === undefined ? context : `${context}: ${err instanceof Error || typeof err === "object" ? inspect(err, { depth: 4 }) : String(err)}`));
}
