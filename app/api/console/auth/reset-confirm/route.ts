import { z } from "zod";
import { inTransaction } from "@/db";
import { deleteVerificationTokens, setPassword, takeVerificationToken } from "@/db/queries/auth";
import { bumpSessionEpoch } from "@/db/queries/sessions";
import { findUserByEmail } from "@/db/queries/users";
import { ApiError } from "@/lib/api/errors";
import { methods } from "@/lib/api/methods";
import { hashToken } from "@/lib/auth/adapter";
import { consoleRoute, json, readJson, sameOrigin } from "@/lib/auth/guard";
import { hashPassword, passwordSchema } from "@/lib/auth/passwords";

const resetConfirm = z.strictObject({ token: z.string().min(1).max(200), password: passwordSchema });

/** POST /api/console/auth/reset-confirm {token, password} → 200 and every session of the account ended; the link works once. */
const confirmReset = consoleRoute(
  sameOrigin(async (req, { db }) => {
    const input = await readJson(req, resetConfirm);
    // bcrypt runs before the transaction, so that it does not hold the database.
    const passwordHash = await hashPassword(input.password);
    const changed = await inTransaction(db, async (tx) => {
      const link = await takeVerificationToken(tx, { tokenHash: hashToken(input.token), purpose: "password-reset" });
      const user = link && (await findUserByEmail(tx, link.identifier));
      if (!link || !user) return false;
      await setPassword(tx, user.id, passwordHash);
      // Every session of the account ends, this browser's too: whoever knew the old password is out, and all sign in with the new one.
      await bumpSessionEpoch(tx, user.id);
      // Any older links for the address stop working with this one.
      await deleteVerificationTokens(tx, link.identifier, "password-reset");
      return true;
    });
    if (!changed) throw new ApiError("reset-link-invalid", "This link has expired or has been used already; a link works once, within an hour.");
    return json({ next: "sign-in", detail: "The new password is set. Sign in with it." });
  }),
);

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ POST: confirmReset });
