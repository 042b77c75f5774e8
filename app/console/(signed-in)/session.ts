import { cookies } from "next/headers";
import { decode } from "next-auth/jwt";
import { authSecret, SESSION_COOKIES, type SessionUser } from "@/lib/auth/session";

/**
 * The signed-in user of the page request, with readSession's rules (lib/auth/session.ts): the
 * next-auth JWT session cookie, decoded with the auth secret, carrying a positive integer `sub`
 * and an e-mail; anything else is no session.
 */
export async function pageSession(): Promise<SessionUser | null> {
  const jar = await cookies();
  for (const name of SESSION_COOKIES) {
    const token = jar.get(name)?.value;
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
