import { decode, encode } from "next-auth/jwt";

/** Cookie names next-auth uses for its JWT session (the __Secure- one over HTTPS). */
export const SESSION_COOKIES = ["__Secure-next-auth.session-token", "next-auth.session-token"] as const;

/** PARITAS_AUTH_SECRET signs sessions; development and tests fall back to a fixed value, production must set it. */
export function authSecret(): string {
  const s = process.env.PARITAS_AUTH_SECRET ?? process.env.NEXTAUTH_SECRET;
  if (s) return s;
  if (process.env.NODE_ENV === "production") throw new Error("PARITAS_AUTH_SECRET must be set in production");
  return "paritas-development-secret-not-for-production";
}

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

/** The signed-in user of a request, from next-auth's JWT session cookie; null when there is none or it is invalid. */
export async function readSession(req: Request): Promise<SessionUser | null> {
  const header = req.headers.get("cookie");
  for (const name of SESSION_COOKIES) {
    const token = cookieValue(header, name);
    if (!token) continue;
    try {
      const jwt = await decode({ token, secret: authSecret() });
      const userId = Number(jwt?.sub);
      if (jwt && Number.isInteger(userId) && userId > 0 && typeof jwt.email === "string") return { userId, email: jwt.email };
    } catch {
      return null;
    }
  }
  return null;
}

/** A session cookie for a user, as next-auth would set it (tests and scripts). */
export async function sessionCookie(user: SessionUser, maxAgeSeconds = 3600): Promise<string> {
  const token = await encode({ token: { sub: String(user.userId), email: user.email }, secret: authSecret(), maxAge: maxAgeSeconds });
  return `next-auth.session-token=${token}`;
}
