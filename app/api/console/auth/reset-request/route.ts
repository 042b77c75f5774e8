import { z } from "zod";
import type { Db } from "@/db";
import { insertVerificationToken } from "@/db/queries/auth";
import { findUserByEmail } from "@/db/queries/users";
import { methods } from "@/lib/api/methods";
import { hashToken, newToken } from "@/lib/auth/adapter";
import { clientIp, take, takeOrRefuse } from "@/lib/auth/brute-force";
import { consoleRoute, json, readJson, sameOrigin } from "@/lib/auth/guard";
import { publicOrigin } from "@/lib/auth/options";
import { sendMail } from "@/lib/mail/send";
import { passwordResetMail } from "@/lib/mail/templates";
import { logError } from "@/lib/api/redact";

const RESET_LINK_SECONDS = 60 * 60;

const resetRequest = z.strictObject({ email: z.email("Enter an e-mail address.").max(254) });

const RESET_REQUESTED = {
  next: "check-mail",
  detail: "If the address belongs to an account, a link to choose a new password is on its way. It works once, for one hour.",
} as const;

/** Mail a reset link to the address if it has an account; a few per address per hour at most. */
async function mailResetLink(db: Db, address: string, origin: string): Promise<void> {
  if (!(await take("reset:address", address))) return;
  const user = await findUserByEmail(db, address);
  if (!user) return;
  const token = newToken();
  await insertVerificationToken(db, {
    identifier: user.email,
    tokenHash: hashToken(token),
    purpose: "password-reset",
    expiresAt: new Date(Date.now() + RESET_LINK_SECONDS * 1000).toISOString(),
  });
  await sendMail({ to: user.email, ...passwordResetMail({ url: `${origin}/reset/${token}`, validForSeconds: RESET_LINK_SECONDS }) });
}

/** POST /api/console/auth/reset-request {email} → 202, the same body for every address. */
const requestReset = consoleRoute(
  sameOrigin(async (req, { db, requestId }) => {
    await takeOrRefuse("reset:ip", clientIp(req.headers));
    const { email } = await readJson(req, resetRequest);
    const origin = publicOrigin(req);
    // The work for a real account (a token, a mail) happens after the answer, so its timing gives nothing away.
    void mailResetLink(db, email.toLowerCase(), origin).catch((e: unknown) => logError(`[${requestId}] reset link not sent`, e));
    return json(RESET_REQUESTED, 202);
  }),
);

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ POST: requestReset });
