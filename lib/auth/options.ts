import type { NextAuthOptions, User } from "next-auth";
import CredentialsProvider from "next-auth/providers/credentials";
import EmailProvider from "next-auth/providers/email";
import { getDb } from "@/db";
import { findSessionUser } from "@/db/queries/sessions";
import { findUserByEmail } from "@/db/queries/users";
import { mailFrom, sendMail } from "@/lib/mail/send";
import { signInLinkMail } from "@/lib/mail/templates";
import { kyselyAdapter, SIGN_IN_LINK_SECONDS } from "./adapter";
import { clearLoginFailures, clientIp, loginLocked, recordLoginFailure, take } from "./brute-force";
import { verifyPassword } from "./passwords";
import { authSecret, secureCookies, SESSION_LIFETIME_SECONDS } from "./session-token";

/** The error code /signin shows when password sign-in is paused after too many failures. */
export const LOCKED = "locked";

/**
 * The origin that mailed links point at: NEXTAUTH_URL when set (always in production), so a
 * forged Host header cannot send someone's link to another site; in development the request's own.
 */
export function publicOrigin(req: Request): string {
  const configured = process.env.NEXTAUTH_URL;
  if (configured) return new URL(configured).origin;
  if (process.env.NODE_ENV === "production") throw new Error("NEXTAUTH_URL must be set in production");
  return new URL(req.url).origin;
}

/** The e-mail provider's delivery: our own message, through our own mail transport. */
export async function sendSignInLink({ identifier, url }: { identifier: string; url: string }): Promise<void> {
  await sendMail({ to: identifier, ...signInLinkMail({ url, validForSeconds: SIGN_IN_LINK_SECONDS }) });
}

/**
 * Password sign-in. Unknown addresses, accounts without a password and unconfirmed sign-ups
 * all cost one bcrypt comparison and answer null, like a wrong password, so neither the answer
 * nor its timing tells whether an account exists. Too many failures throw LOCKED for any address.
 */
export async function authorizeCredentials(credentials: Record<string, string> | undefined, headers: Headers | Record<string, unknown>): Promise<User | null> {
  const address = credentials?.email?.trim().toLowerCase() ?? "";
  const password = credentials?.password ?? "";
  if (!address || !password) return null;
  const ip = clientIp(headers);
  if (await loginLocked(address, ip)) throw new Error(LOCKED);
  const user = await findUserByEmail(await getDb(), address);
  const matches = await verifyPassword(password, user?.password_hash ?? null);
  if (!user || !matches || !user.email_verified) {
    await recordLoginFailure(address, ip);
    return null;
  }
  await clearLoginFailures(address, ip);
  return { id: String(user.id), email: user.email, name: user.name };
}

/** next-auth options; built on demand so that the secret is read at request time, not at build time. */
export function authOptions(): NextAuthOptions {
  return {
    secret: authSecret(),
    adapter: kyselyAdapter(getDb),
    // Lifetime counted from sign-in; the idle timeout and the epoch are checked in lib/auth/session.ts.
    session: { strategy: "jwt", maxAge: SESSION_LIFETIME_SECONDS },
    useSecureCookies: secureCookies(),
    cookies: {
      // Lax, not Strict: a link into the console from a mail or another site must arrive signed in.
      sessionToken: {
        name: `${secureCookies() ? "__Secure-" : ""}next-auth.session-token`,
        options: { httpOnly: true, sameSite: "lax", path: "/", secure: secureCookies() },
      },
    },
    pages: { signIn: "/signin", verifyRequest: "/signin/check-mail", error: "/signin" },
    providers: [
      EmailProvider({ from: mailFrom(), maxAge: SIGN_IN_LINK_SECONDS, sendVerificationRequest: sendSignInLink }),
      CredentialsProvider({
        name: "password",
        credentials: { email: { label: "E-mail", type: "email" }, password: { label: "Password", type: "password" } },
        authorize: (credentials, req) => authorizeCredentials(credentials, req.headers ?? {}),
      }),
    ],
    callbacks: {
      // Links on request are rationed per address (a refusal shows as AccessDenied on /signin).
      signIn: async ({ user, email }) => (email?.verificationRequest ? take("link:address", user.email?.toLowerCase() ?? "") : true),
      // lib/auth/session-token.ts reads sub (the user id), email, epoch and signedInAt from this token.
      jwt: async ({ token, user }) => {
        if (user) {
          token.sub = String(user.id);
          token.email = user.email;
          token.epoch = (await findSessionUser(await getDb(), Number(user.id)))?.session_epoch ?? 0;
          token.signedInAt = Math.floor(Date.now() / 1000);
        }
        return token;
      },
    },
  };
}
