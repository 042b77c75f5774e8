import { consoleApi } from "./api";
import type { TryKey } from "./types";

/** A key closer than this to its expiry is not reused: a request must not start with a key that dies mid-flight. */
const MARGIN_MS = 2 * 60_000;
const storageKey = (org: string) => `paritas.console.try-key.${org}`;

function read(org: string): TryKey | null {
  try {
    const raw = window.sessionStorage.getItem(storageKey(org));
    if (!raw) return null;
    const v = JSON.parse(raw) as Partial<TryKey>;
    if (typeof v.key !== "string" || typeof v.expiresAt !== "string") return null;
    return Date.parse(v.expiresAt) - Date.now() > MARGIN_MS ? { key: v.key, expiresAt: v.expiresAt } : null;
  } catch {
    return null;
  }
}

/** The org's short-lived test key for the bench, from sessionStorage while it lasts, else a fresh one (POST try-key). */
export async function obtainTryKey(org: string, opts: { fresh?: boolean } = {}): Promise<TryKey> {
  if (!opts.fresh) {
    const cached = read(org);
    if (cached) return cached;
  }
  const issued = await consoleApi.tryKey(org);
  try {
    window.sessionStorage.setItem(storageKey(org), JSON.stringify(issued));
  } catch {
    // Storage full or disabled: the key still works for this run.
  }
  return issued;
}

export function peekTryKey(org: string): TryKey | null {
  return typeof window === "undefined" ? null : read(org);
}

export function forgetTryKey(org: string): void {
  try {
    window.sessionStorage.removeItem(storageKey(org));
  } catch {
    // nothing stored
  }
}
