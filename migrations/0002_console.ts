import { type Kysely, sql } from "kysely";

// Sign-in, invitations and key rotation. Never edit after landing.

export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable("users").addColumn("password_hash", "text").execute();
  await db.schema.alterTable("users").addColumn("email_verified", "text").execute();

  await db.schema
    .createTable("verification_tokens")
    .addColumn("identifier", "text", (c) => c.notNull())
    .addColumn("token_hash", "text", (c) => c.notNull())
    .addColumn("purpose", "text", (c) => c.notNull().check(sql`purpose in ('sign-in', 'password-reset')`))
    .addColumn("expires_at", "text", (c) => c.notNull())
    .addPrimaryKeyConstraint("verification_tokens_pk", ["identifier", "token_hash"])
    .execute();

  await db.schema
    .createTable("invitations")
    .addColumn("id", "integer", (c) => c.primaryKey().autoIncrement())
    .addColumn("org_id", "integer", (c) => c.notNull().references("orgs.id").onDelete("cascade"))
    .addColumn("email", "text", (c) => c.notNull())
    .addColumn("role", "text", (c) => c.notNull().check(sql`role in ('owner', 'developer', 'billing')`))
    .addColumn("token_hash", "text", (c) => c.notNull().unique())
    .addColumn("invited_by_user_id", "integer", (c) => c.references("users.id").onDelete("set null"))
    .addColumn("created_at", "text", (c) => c.notNull())
    .addColumn("expires_at", "text", (c) => c.notNull())
    .addColumn("accepted_at", "text")
    .addColumn("revoked_at", "text")
    .execute();
  await db.schema.createIndex("invitations_org").on("invitations").column("org_id").execute();

  // Rotation: the new key names the key it replaced; the old key's expires_at ends the overlap.
  await db.schema.alterTable("api_keys").addColumn("rotated_from_key_id", "integer", (c) => c.references("api_keys.id").onDelete("set null")).execute();
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable("api_keys").dropColumn("rotated_from_key_id").execute();
  await db.schema.dropTable("invitations").execute();
  await db.schema.dropTable("verification_tokens").execute();
  await db.schema.alterTable("users").dropColumn("email_verified").execute();
  await db.schema.alterTable("users").dropColumn("password_hash").execute();
}
