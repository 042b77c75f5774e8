import { FREE_PLAN } from "@/lib/billing/plans";
import type { Db } from "@/db";
import { nowIso } from "@/db";

export const findOrgBySlug = (db: Db, slug: string) =>
  db.selectFrom("orgs").selectAll().where("slug", "=", slug).executeTakeFirst();

export const findOrgById = (db: Db, id: number) =>
  db.selectFrom("orgs").selectAll().where("id", "=", id).executeTakeFirst();

export async function insertOrg(db: Db, org: { slug: string; name: string; plan?: string }) {
  return db
    .insertInto("orgs")
    .values({ slug: org.slug, name: org.name, plan: org.plan ?? FREE_PLAN, created_at: nowIso() })
    .returningAll()
    .executeTakeFirstOrThrow();
}
