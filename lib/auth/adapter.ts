import { createHash, randomBytes } from "node:crypto";
import type { Adapter, AdapterUser } from "next-auth/adapters";
import type { Db } from "@/db";
import type { User } from "@/db/schema";
import { findUserByEmail } from "@/db/queries/users";
import {
  findAuthUser,
  insertAuthUser,
  insertVerificationToken,
  markEmailVerified,
  takeVerificationToken,
  updateUserName,
} from "@/db/queries/auth";

/** A token for a mailed link: 32 random bytes, base64url. */
export const newToken = () => randomBytes(32).toString("base64url");

/** What is stored of a token: its SHA-256, hex. */
export const hashToken = (token: string) => createHash("sha256").update(token).digest("hex");

/** How long a mailed sign-in link works; a sign-up left unconfirmed that long loses its password. */
export const SIGN_IN_LINK_SECONDS = 30 * 60;

const toAdapterUser = (u: User): AdapterUser => ({
  id: String(u.id),
  email: u.email,
  name: u.name,
  emailVerified: u.email_verified ? new Date(u.email_verified) : null,
});

const userId = (id: string) => {
  const n = Number(id);
  return Number.isInteger(n) && n > 0 ? n : undefined;
};

/**
 * next-auth adapter over our own tables, with only what the e-mail and credentials providers
 * need under JWT sessions: users and single-use verification tokens. There are no OAuth
 * providers, so there are no linked accounts, and no database sessions.
 */
export function kyselyAdapter(db: () => Promise<Db>): Adapter {
  return {
    async createUser(user: Omit<AdapterUser, "id">) {
      const created = await insertAuthUser(await db(), {
        email: user.email,
        name: user.name ?? null,
        emailVerified: user.emailVerified?.toISOString() ?? null,
      });
      return toAdapterUser(created);
    },

    async getUser(id) {
      const n = userId(id);
      const u = n === undefined ? undefined : await findAuthUser(await db(), n);
      return u ? toAdapterUser(u) : null;
    },

    async getUserByEmail(email) {
      const u = await findUserByEmail(await db(), email);
      return u ? toAdapterUser(u) : null;
    },

    getUserByAccount: async () => null,

    // next-auth calls this to record that an address was proved by a link; addresses themselves never change here.
    async updateUser({ id, name, emailVerified }) {
      const n = userId(id);
      if (n === undefined) throw new Error(`no user ${id}`);
      const d = await db();
      if (name !== undefined) await updateUserName(d, n, name ?? null);
      const pendingSince = new Date(Date.now() - SIGN_IN_LINK_SECONDS * 1000).toISOString();
      const u = emailVerified ? await markEmailVerified(d, n, pendingSince) : await findAuthUser(d, n);
      if (!u) throw new Error(`no user ${id}`);
      return toAdapterUser(u);
    },

    linkAccount() {
      throw new Error("Paritas has no OAuth providers; there are no accounts to link.");
    },

    // next-auth hands over its own hash of the mailed token; we store only a SHA-256 of that in turn.
    async createVerificationToken(t) {
      await insertVerificationToken(await db(), {
        identifier: t.identifier.toLowerCase(),
        tokenHash: hashToken(t.token),
        purpose: "sign-in",
        expiresAt: t.expires.toISOString(),
      });
      return t;
    },

    async useVerificationToken({ identifier, token }) {
      // The address comes from the link's query string; a link without one is not ours.
      if (!identifier) return null;
      const row = await takeVerificationToken(await db(), { identifier: identifier.toLowerCase(), tokenHash: hashToken(token), purpose: "sign-in" });
      return row ? { identifier: row.identifier, token, expires: new Date(row.expires_at) } : null;
    },
  };
}
