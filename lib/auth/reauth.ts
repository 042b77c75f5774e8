import { ApiError } from "@/lib/api/errors";
import { reauthWindowSeconds, recentlyConfirmed, type SessionToken } from "./session-token";

/** The window in words for problem details: whole minutes when it is some, else seconds. */
function windowInWords(): string {
  const s = reauthWindowSeconds();
  return s >= 60 && s % 60 === 0 ? `${s / 60} minutes` : `${s} seconds`;
}

/**
 * Refuses (403 reauth-required) unless the session (as withSession decoded it) confirmed its password
 * within the window. Routes call it after their role check and before changing anything, and only for the
 * sensitive case, which may depend on the body (a live key, not a test key; another member, not oneself).
 */
export function requireRecentConfirmation(ctx: { token: SessionToken }): void {
  if (!recentlyConfirmed(ctx.token)) {
    throw new ApiError("reauth-required", `This needs your password entered within the last ${windowInWords()}. Confirm it at POST /api/console/auth/confirm and send the request again.`);
  }
}
