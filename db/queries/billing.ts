import type { Db } from "@/db";
import type { BillingAccount } from "@/db/schema";

export const findBillingAccount = (db: Db, orgId: number) => db.selectFrom("billing_accounts").selectAll().where("org_id", "=", orgId).executeTakeFirst();

export const findAccountByCustomer = (db: Db, customerId: string) => db.selectFrom("billing_accounts").selectAll().where("customer_id", "=", customerId).executeTakeFirst();

/** Record the org's customer at the provider; a second call for the same org keeps the first. */
export async function insertBillingAccount(db: Db, orgId: number, customerId: string, at: string): Promise<BillingAccount> {
  await db.insertInto("billing_accounts").values({ org_id: orgId, customer_id: customerId, updated_at: at }).onConflict((oc) => oc.column("org_id").doNothing()).execute();
  return (await findBillingAccount(db, orgId))!;
}

export type AccountChange = Partial<Omit<BillingAccount, "org_id" | "customer_id">>;

export const updateBillingAccount = (db: Db, orgId: number, change: AccountChange & { updated_at: string }) =>
  db.updateTable("billing_accounts").set(change).where("org_id", "=", orgId).execute();

export const setOrgPlan = (db: Db, orgId: number, plan: string) => db.updateTable("orgs").set({ plan }).where("id", "=", orgId).execute();

/** Note a provider event as processed: true the first time, false for a repeated delivery. */
export async function recordBillingEvent(db: Db, e: { id: string; type: string; at: string; outcome: string }): Promise<boolean> {
  const r = await db.insertInto("billing_events").values({ event_id: e.id, type: e.type, received_at: e.at, outcome: e.outcome }).onConflict((oc) => oc.column("event_id").doNothing()).executeTakeFirst();
  return Number(r.numInsertedOrUpdatedRows ?? 0) > 0;
}

/** What processing a provider event did, if it was processed already. */
export const billingEventOutcome = async (db: Db, id: string) => (await db.selectFrom("billing_events").select("outcome").where("event_id", "=", id).executeTakeFirst())?.outcome;

/** Accounts whose grace period after a failed payment has passed. */
export const graceExpired = (db: Db, now: string) => db.selectFrom("billing_accounts").selectAll().where("grace_until", "is not", null).where("grace_until", "<=", now).execute();

/** The usage outbox: live rows with units, not yet accepted by the provider, oldest first. */
export const unreportedUsage = (db: Db, limit: number) =>
  db
    .selectFrom("usage_events")
    .select(["id", "org_id", "units", "created_at"])
    .where("reported_at", "is", null)
    .where("mode", "=", "live")
    .where("units", ">", 0)
    .orderBy("id")
    .limit(limit)
    .execute();

export const markUsageReported = (db: Db, id: number, at: string) => db.updateTable("usage_events").set({ reported_at: at }).where("id", "=", id).where("reported_at", "is", null).execute();
