/**
 * Bounds of a rotation's overlap, shared by the server's validation and the rotate dialog.
 * Up to a week: long enough to reach every system that holds a key, short enough that a
 * replaced key does not linger. Whole minutes, so the dialog's minutes, hours and days all fit.
 */
export const MAX_OVERLAP_MINUTES = 7 * 24 * 60;
export const MINUTE_MS = 60_000;

/** When an old key stops after a rotation at `now`: the overlap's end, or its own earlier expiry. */
export function oldKeyEndsAt(now: Date, overlapMinutes: number, expiresAt: string | null): string {
  const overlapEnd = new Date(now.getTime() + overlapMinutes * MINUTE_MS).toISOString();
  return expiresAt !== null && expiresAt < overlapEnd ? expiresAt : overlapEnd;
}
