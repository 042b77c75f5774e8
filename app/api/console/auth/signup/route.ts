import { z } from "zod";
import { inTransaction } from "@/db";
import { insertAuthUser, renewPendingSignUp } from "@/db/queries/auth";
import { findUserByEmail } from "@/db/queries/users";
import { methods } from "@/lib/api/methods";
import { clientIp, takeOrRefuse } from "@/lib/auth/brute-force";
import { consoleRoute, json, readJson, sameOrigin } from "@/lib/auth/guard";
import { hashPassword, passwordSchema } from "@/lib/auth/passwords";

const signUp = z.strictObject({
  name: z.string().trim().min(1, "Enter your name.").max(100, "Use at most 100 characters."),
  email: z.email("Enter an e-mail address.").max(254),
  password: passwordSchema,
});

/** The same answer for every address, new or taken: the address is confirmed by the e-mail link the page asks for next. */
const SIGN_UP_ACCEPTED = {
  next: "confirm-address",
  detail: "Confirm the address with the link we send to it; the password works from then on. An address that already has an account keeps it unchanged.",
} as const;

/**
 * POST /api/console/auth/signup {name, email, password} → 202. A new address gets an account
 * whose password works once the address is confirmed; a taken address is left as it is.
 */
const createAccount = consoleRoute(
  sameOrigin(async (req, { db }) => {
    await takeOrRefuse("signup:ip", clientIp(req.headers));
    const input = await readJson(req, signUp);
    // Hashed before the address is looked up, so new and taken addresses take the same time.
    const passwordHash = await hashPassword(input.password);
    await inTransaction(db, async (tx) => {
      const existing = await findUserByEmail(tx, input.email);
      if (!existing) await insertAuthUser(tx, { email: input.email, name: input.name, passwordHash });
      else if (!existing.email_verified) await renewPendingSignUp(tx, existing.id, { name: input.name, passwordHash });
    });
    return json(SIGN_UP_ACCEPTED, 202);
  }),
);

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ POST: createAccount });
