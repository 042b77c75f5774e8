import type { Db } from "@/db";
import { findSessionUser } from "@/db/queries/sessions";
import { readSessionToken, type SessionToken, type SessionUser } from "./session-token";

export { authSecret, renewalCookie, SESSION_COOKIES, SESSION_IDLE_SECONDS, SESSION_LIFETIME_SECONDS, sessionCookie } from "./session-token";
export type { SessionToken, SessionUser } from "./session-token";

export interface Session extends SessionUser {
  name: string | null;
  token: SessionToken;
}

/**
 * The signed-in user of a request: a valid, unexpired, not idle session token (session-token.ts)
 * whose epoch is still the user's — a password reset or a removal raises it, ending older sessions.
 * One primary-key lookup (proxy.ts, every console page and route); a user who no longer exists has no session.
 */
export async function readSession(req: Request, db: Db): Promise<Session | null> {
  const token = await readSessionToken(req);
  if (!token) return null;
  const user = await findSessionUser(db, token.userId);
  if (!user || user.session_epoch !== token.epoch) return null;
  return { userId: user.id, email: user.email, name: user.name, token };
}
