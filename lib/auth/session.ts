import type { Db } from "@/db";
import { findSessionUser } from "@/db/queries/sessions";
import { readSessionToken, type SessionToken, type SessionUser } from "./session-token";

export { authSecret, renewalCookie, SESSION_COOKIES, SESSION_IDLE_SECONDS, SESSION_LIFETIME_SECONDS, sessionCookie } from "./session-token";
export type { SessionToken, SessionUser } from "./session-token";

export interface Session extends SessionUser {
  /** Null when only the token was checked (no database given). */
  name: string | null;
  token: SessionToken;
}

/**
 * The signed-in user of a request: a valid, unexpired, not idle session token (session-token.ts)
 * whose epoch is still the user's — a password reset or a removal raises it, ending older sessions.
 * With `db` (every console route and page, and proxy.ts) that costs one primary-key lookup and a user
 * who no longer exists has no session; without it only the token is checked.
 */
export async function readSession(req: Request, db?: Db): Promise<Session | null> {
  const token = await readSessionToken(req);
  if (!token) return null;
  if (!db) return { userId: token.userId, email: token.email, name: null, token };
  const user = await findSessionUser(db, token.userId);
  if (!user || user.session_epoch !== token.epoch) return null;
  return { userId: user.id, email: user.email, name: user.name, token };
}
