import type { Db } from "@/db";
import type { ApiKeyUpdate, NewApiKey } from "@/db/schema";

export const insertApiKey = (db: Db, key: NewApiKey) =>
  db.insertInto("api_keys").values(key).returningAll().executeTakeFirstOrThrow();

/** The key with this hash, and its org's slug and plan. */
export const findApiKeyByHash = (db: Db, hash: string) =>
  db
    .selectFrom("api_keys")
    .innerJoin("orgs", "orgs.id", "api_keys.org_id")
    .selectAll("api_keys")
    .select(["orgs.slug as org_slug", "orgs.plan as org_plan"])
    .where("api_keys.key_hash", "=", hash)
    .executeTakeFirst();

export const findApiKeyById = (db: Db, orgId: number, id: number) =>
  db.selectFrom("api_keys").selectAll().where("org_id", "=", orgId).where("id", "=", id).executeTakeFirst();

export const findApiKeyByPrefix = (db: Db, orgId: number, prefix: string) =>
  db.selectFrom("api_keys").selectAll().where("org_id", "=", orgId).where("prefix", "=", prefix).execute();

export const listApiKeys = (db: Db, orgId: number) =>
  db.selectFrom("api_keys").selectAll().where("org_id", "=", orgId).orderBy("id").execute();

export const updateApiKey = (db: Db, orgId: number, id: number, patch: ApiKeyUpdate) =>
  db.updateTable("api_keys").set(patch).where("org_id", "=", orgId).where("id", "=", id).returningAll().executeTakeFirst();

export const touchApiKey = (db: Db, id: number, at: string) =>
  db.updateTable("api_keys").set({ last_used_at: at }).where("id", "=", id).execute();

/** Keys with their creator's e-mail and whether a rotation has replaced them (a newer key names them in rotated_from_key_id). */
const keysWithCreator = (db: Db, orgId: number) =>
  db
    .selectFrom("api_keys")
    .leftJoin("users", "users.id", "api_keys.created_by_user_id")
    .selectAll("api_keys")
    .select((eb) => [
      "users.email as created_by_email",
      eb.exists(eb.selectFrom("api_keys as successor").select("successor.id").whereRef("successor.rotated_from_key_id", "=", "api_keys.id")).as("replaced"),
    ])
    .where("api_keys.org_id", "=", orgId)
    .where("api_keys.purpose", "=", "api");

export type KeyWithCreator = NonNullable<Awaited<ReturnType<typeof findKeyWithCreator>>>;

/** The org's keys people manage (bench credentials are not among them), newest first; only those `createdBy` created when given. */
export const listKeysWithCreator = (db: Db, orgId: number, createdBy?: number) => {
  const q = keysWithCreator(db, orgId);
  return (createdBy === undefined ? q : q.where("api_keys.created_by_user_id", "=", createdBy)).orderBy("api_keys.id", "desc").execute();
};

export const findKeyWithCreator = (db: Db, orgId: number, id: number) => keysWithCreator(db, orgId).where("api_keys.id", "=", id).executeTakeFirst();

/** The bench credential `userId` holds in the org, if one was ever issued and not revoked. */
export const findBenchCredential = (db: Db, orgId: number, userId: number) =>
  db
    .selectFrom("api_keys")
    .selectAll()
    .where("org_id", "=", orgId)
    .where("created_by_user_id", "=", userId)
    .where("purpose", "=", "bench")
    .where("revoked_at", "is", null)
    .executeTakeFirst();

/** Revoke, at `at`, the bench credentials `userId` holds in the org; returns how many were working. */
export const revokeBenchCredentials = async (db: Db, orgId: number, userId: number, at: string) =>
  Number(
    (
      await db
        .updateTable("api_keys")
        .set({ revoked_at: at })
        .where("org_id", "=", orgId)
        .where("created_by_user_id", "=", userId)
        .where("purpose", "=", "bench")
        .where("revoked_at", "is", null)
        .executeTakeFirst()
    ).numUpdatedRows,
  );
