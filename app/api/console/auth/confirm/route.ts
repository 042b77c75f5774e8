import { z } from "zod";
import { findUserByEmail } from "@/db/queries/users";
import { ApiError } from "@/lib/api/errors";
import { methods } from "@/lib/api/methods";
import { clearLoginFailures, clientIp, loginLockSeconds, recordLoginFailure } from "@/lib/auth/brute-force";
import { consoleRoute, json, readJson, sameOrigin, withSession } from "@/lib/auth/guard";
import { verifyPassword } from "@/lib/auth/passwords";
import { confirmedCookie, reauthWindowSeconds } from "@/lib/auth/session-token";

const confirmInput = z.strictObject({ password: z.string().min(1).max(200) });

const wrongField = (message: string) => new ApiError("validation-failed", `/password: ${message}`, { errors: [{ pointer: "/password", message }] });

/**
 * POST /api/console/auth/confirm {password} → 200 and the session cookie re-issued with its
 * confirmation set to now, which lets the sensitive actions through for reauthWindowSeconds().
 * Nothing about an organisation changes, so nothing is audited.
 */
const confirm = consoleRoute(
  sameOrigin(
    withSession(async (req, { db, user: signedIn, token }) => {
      const { password } = await readJson(req, confirmInput);
      const user = await findUserByEmail(db, signedIn.email);
      // An account that signs in by e-mail link has no password to confirm; a new sign-in is a confirmation too.
      if (!user?.password_hash) throw wrongField("This account has no password. Confirm with a sign-in link to your address instead: a fresh sign-in counts as a confirmation.");
      // The same failure counters as password sign-in, so guessing here is no cheaper than guessing there.
      const ip = clientIp(req.headers);
      const wait = await loginLockSeconds(user.email, ip);
      if (wait > 0) {
        throw new ApiError("rate-limited", `Too many wrong passwords lately. Try again in ${wait} s, or confirm with a sign-in link to your address instead.`, { headers: { "retry-after": String(wait) } });
      }
      if (!(await verifyPassword(password, user.password_hash))) {
        await recordLoginFailure(user.email, ip);
        throw wrongField("That is not this account's password.");
      }
      await clearLoginFailures(user.email, ip);
      const cookie = await confirmedCookie(token);
      if (!cookie) throw new ApiError("signed-out", "The session has reached its lifetime. Sign in again.");
      const res = json({ confirmed: true, validForSeconds: reauthWindowSeconds() });
      res.headers.append("set-cookie", cookie);
      return res;
    }),
  ),
);

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ POST: confirm });
