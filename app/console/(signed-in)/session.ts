import { cookies } from "next/headers";
import { getDb } from "@/db";
import { readSession, type SessionUser } from "@/lib/auth/session";

/**
 * The signed-in user of the page request, by the very rules the console routes use: the page's
 * cookies handed to readSession (lib/auth/session.ts) on a Request-like object, so the JWT cookie
 * names, the secret and the checks on `sub` and `email` live in one place.
 */
export async function pageSession(): Promise<SessionUser | null> {
  const jar = await cookies();
  const header = jar
    .getAll()
    .map((c) => `${c.name}=${encodeURIComponent(c.value)}`)
    .join("; ");
  return readSession(new Request("http://console.invalid/", { headers: { cookie: header } }), await getDb());
}
