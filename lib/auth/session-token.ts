import { decode, encode } from "next-auth/jwt";

/**
 * The session cookie itself, without the database: its lifetime, idle timeout and confirmation
 * (lib/auth/session.ts adds the per-user epoch check that proxy.ts and the console routes make).
 */

/** Cookie names next-auth uses for its JWT session (the __Secure- one over HTTPS). */
export const SESSION_COOKIES = ["__Secure-next-auth.session-token", "next-auth.session-token"] as const;

/** A session ends this long after sign-in, however busy it is. */
export const SESSION_LIFETIME_SECONDS = 24 * 60 * 60;
/** A session unused for this long is refused; each use renews the cookie (see renewalCookie). */
export const SESSION_IDLE_SECONDS = 30 * 60;
/** A used session's cookie is re-issued once its last issue is this old, not on every request. */
const RENEW_AFTER_SECONDS = 60;
/**
 * Creating or rotating a live key, transferring ownership and removing another member need the password
 * entered this recently (or a sign-in this recent); PARITAS_REAUTH_WINDOW_SECONDS overrides it for tests.
 */
export const REAUTH_WINDOW_SECONDS = 15 * 60;

export function reauthWindowSeconds(): number {
  const configured = Number(process.env.PARITAS_REAUTH_WINDOW_SECONDS);
  return Number.isInteger(configured) && configured >= 0 ? configured : REAUTH_WINDOW_SECONDS;
}

/** PARITAS_AUTH_SECRET signs sessions; development and tests fall back to a fixed value, production must set it. */
export function authSecret(): string {
  const s = process.env.PARITAS_AUTH_SECRET ?? process.env.NEXTAUTH_SECRET;
  if (s) return s;
  if (process.env.NODE_ENV === "production") throw new Error("PARITAS_AUTH_SECRET must be set in production");
  return "paritas-development-secret-not-for-production";
}

/** Cookies are Secure whenever the public origin is https (next-auth then also uses the __Secure- name). */
export const secureCookies = () => process.env.NEXTAUTH_URL?.startsWith("https://") ?? false;

function cookieValue(header: string | null, name: string): string | undefined {
  for (const part of header?.split(";") ?? []) {
    const i = part.indexOf("=");
    if (i > 0 && part.slice(0, i).trim() === name) return decodeURIComponent(part.slice(i + 1).trim());
  }
  return undefined;
}

export interface SessionUser {
  userId: number;
  email: string;
}

/** A decoded, unexpired, not idle session token. */
export interface SessionToken extends SessionUser {
  /** The user's session epoch when the session was issued (0 in tokens from before epochs existed). */
  epoch: number;
  /** Seconds since 1970 of the sign-in; kept across renewals so the lifetime is counted from it. */
  signedInAt: number;
  /** Seconds since 1970 of the token's last issue: the session's last use, give or take RENEW_AFTER_SECONDS. */
  issuedAt: number;
  /** Seconds since 1970 of the last password confirmation; a sign-in counts as one. Kept across renewals. */
  confirmedAt: number;
  cookieName: (typeof SESSION_COOKIES)[number];
}

const nowSeconds = () => Math.floor(Date.now() / 1000);

/** The session token of a request; null when there is none, it is forged or expired, past its lifetime, or idle too long. */
export async function readSessionToken(req: Request): Promise<SessionToken | null> {
  const header = req.headers.get("cookie");
  for (const cookieName of SESSION_COOKIES) {
    const token = cookieValue(header, cookieName);
    if (!token) continue;
    try {
      const jwt = await decode({ token, secret: authSecret() });
      const userId = Number(jwt?.sub);
      if (!jwt || !Number.isInteger(userId) || userId <= 0 || typeof jwt.email !== "string" || typeof jwt.iat !== "number") return null;
      const issuedAt = jwt.iat;
      const signedInAt = typeof jwt.signedInAt === "number" ? jwt.signedInAt : issuedAt;
      const now = nowSeconds();
      if (now - issuedAt > SESSION_IDLE_SECONDS || now - signedInAt > SESSION_LIFETIME_SECONDS) return null;
      const confirmedAt = typeof jwt.confirmedAt === "number" ? jwt.confirmedAt : signedInAt;
      return { userId, email: jwt.email, epoch: typeof jwt.epoch === "number" ? jwt.epoch : 0, signedInAt, issuedAt, confirmedAt, cookieName };
    } catch {
      return null;
    }
  }
  return null;
}

/** The Set-Cookie value of the session re-issued now, with the given confirmation time; null past its lifetime. */
async function reissue(s: SessionToken, confirmedAt: number): Promise<string | null> {
  const maxAge = SESSION_LIFETIME_SECONDS - (nowSeconds() - s.signedInAt);
  if (maxAge <= 0) return null;
  const token = await encode({ token: { sub: String(s.userId), email: s.email, epoch: s.epoch, signedInAt: s.signedInAt, confirmedAt }, secret: authSecret(), maxAge });
  const secure = s.cookieName.startsWith("__Secure-") || secureCookies();
  return `${s.cookieName}=${token}; Path=/; Max-Age=${maxAge}; HttpOnly; SameSite=Lax${secure ? "; Secure" : ""}`;
}

/**
 * The Set-Cookie value that re-issues a used session, moving its idle deadline; null while the
 * current cookie is fresh enough. Same name and attributes as next-auth's own cookie.
 */
export async function renewalCookie(s: SessionToken): Promise<string | null> {
  if (nowSeconds() - s.issuedAt < RENEW_AFTER_SECONDS) return null;
  return reissue(s, s.confirmedAt);
}

/** The Set-Cookie value of the session with its password confirmed just now. */
export const confirmedCookie = (s: SessionToken) => reissue(s, nowSeconds());

/** True when the session's last confirmation is within the window (reauthWindowSeconds). */
export const recentlyConfirmed = (s: SessionToken) => nowSeconds() - s.confirmedAt <= reauthWindowSeconds();

/**
 * A session cookie for a user, as next-auth would set it at sign-in (tests and scripts); the sign-in
 * counts as a confirmation unless `confirmedAgoSeconds` moves the confirmation back.
 */
export async function sessionCookie(user: SessionUser, maxAgeSeconds = 3600, epoch = 0, confirmedAgoSeconds = 0): Promise<string> {
  const signedInAt = nowSeconds();
  const token = await encode({ token: { sub: String(user.userId), email: user.email, epoch, signedInAt, confirmedAt: signedInAt - confirmedAgoSeconds }, secret: authSecret(), maxAge: maxAgeSeconds });
  return `next-auth.session-token=${token}`;
}
