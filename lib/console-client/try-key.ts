import { consoleApi } from "./api";
import type { TryKey } from "./types";

/** A credential closer than this to its expiry is renewed first: a request must not start with a key that dies mid-flight. */
const MARGIN_MS = 2 * 60_000;
const PREFIX = "paritas.console.bench.";
/**
 * Kept in localStorage, so every tab of the same person shares the one credential (the server
 * holds one per person and org, and a renewal ends the previous secret). The entry is named by org
 * and holder, so another person signing in on the same browser never picks it up.
 */
const storageKey = (org: string, holder: number) => `${PREFIX}${org}.${holder}`;

let whoAmI: Promise<number> | null = null;
const holderId = () => (whoAmI ??= consoleApi.me().then((m) => m.user.id));

function read(org: string, holder: number): TryKey | null {
  try {
    const raw = window.localStorage.getItem(storageKey(org, holder));
    if (!raw) return null;
    const v = JSON.parse(raw) as Partial<TryKey>;
    if (typeof v.key !== "string" || typeof v.expiresAt !== "string" || v.holder !== holder) return null;
    return Date.parse(v.expiresAt) - Date.now() > MARGIN_MS ? { key: v.key, expiresAt: v.expiresAt, holder } : null;
  } catch {
    return null;
  }
}

/**
 * The caller's bench credential for the org: the stored one while it lasts, else a renewal
 * (POST bench-credential). `stale` is a key the API refused: renew only if no other tab has already.
 */
export async function obtainTryKey(org: string, opts: { stale?: string } = {}): Promise<TryKey> {
  const holder = await holderId();
  const stored = read(org, holder);
  if (stored && stored.key !== opts.stale) return stored;
  const issued = await consoleApi.tryKey(org);
  try {
    window.localStorage.setItem(storageKey(org, issued.holder), JSON.stringify(issued));
  } catch {
    // Storage full or disabled: the credential still works for this run.
  }
  return issued;
}

/** Forget every stored bench credential in this browser (on sign-out). */
export function forgetBenchCredentials(): void {
  try {
    for (const k of Object.keys(window.localStorage)) if (k.startsWith(PREFIX)) window.localStorage.removeItem(k);
  } catch {
    // nothing stored
  }
}
