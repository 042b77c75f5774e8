import { z } from "zod";
import type { Db } from "@/db";
import { listAuditPage } from "@/db/queries/audit";
import { findUsersByIds } from "@/db/queries/members";
import type { AuditEntry, Org, Role } from "@/db/schema";
import { cursorParam, decodeCursor, encodeCursor, limitParam } from "@/lib/api/pagination";
import { formatMoney, isPlanId, PLANS } from "@/lib/billing/plans";
import { invalidField } from "./common";

export const auditQuery = z.strictObject({
  actor: z
    .string()
    .regex(/^(user:\d+|[a-z]+)$/, 'An actor id as listed in entries: "user:<id>", "cli", "system", …')
    .optional(),
  action: z
    .string()
    .max(64)
    .regex(/^[a-z_]+(\.[a-z_]+)*$/, 'An action such as "key.rotated".')
    .optional(),
  limit: limitParam(200, 50),
  cursor: cursorParam,
});

const cursorShape = z.object({ id: z.number().int().positive() });

/**
 * Who acted. `id` is the raw actor string, the value the `actor` filter takes; `name` is what every
 * sentence calls them. People are "user"; the operator CLI is "cli"; the product's own scripts
 * (seeding, benchmarks) are "system".
 */
export type AuditActor = { kind: "user"; id: string; userId: number; name: string; email?: string } | { kind: "cli" | "system"; id: string; name: string };

/**
 * One piece of an entry's sentence: plain words, a name or key prefix (with a link to the page
 * that shows it, while it is still there), or a moment the reader's browser formats in their time zone.
 */
export type SentencePart = string | { text: string; href?: string; style?: "code" | "email" } | { at: string };

const userActor = /^user:(\d+)$/;

/** What the sentences need to know beyond the entry itself, looked up once per page. */
interface Context {
  org: Pick<Org, "slug" | "name">;
  now: string;
  users: Map<number, { name: string | null; email: string }>;
  members: Set<number>;
  keys: Map<number, { name: string; prefix: string; revoked_at: string | null }>;
  invitations: Map<number, string>;
}

interface Row {
  actor: AuditActor;
  action: string;
  targetType: string;
  targetId: string;
  at: string;
  details: Record<string, unknown>;
}

const str = (v: unknown): string | undefined => (typeof v === "string" && v !== "" ? v : undefined);
const ROLE_WORDS: Record<Role, string> = { owner: "an owner", developer: "a developer", billing: "a billing admin" };
const roleWords = (v: unknown) => (typeof v === "string" && v in ROLE_WORDS ? ROLE_WORDS[v as Role] : "a member");
/** The role's name alone: "billing admin". */
const roleName = (v: unknown) => roleWords(v).replace(/^an? /, "");

function actorOf(actor: string, users: Context["users"]): AuditActor {
  const m = userActor.exec(actor);
  if (m) {
    const userId = Number(m[1]);
    const u = users.get(userId);
    return u ? { kind: "user", id: actor, userId, name: u.name ?? u.email, email: u.email } : { kind: "user", id: actor, userId, name: `a former member (#${userId})` };
  }
  return actor === "cli" ? { kind: "cli", id: actor, name: "the operator CLI" } : { kind: "system", id: actor, name: "the system" };
}

/** A person: their name (or address) linked to the people page while they still belong to the org. */
function person(c: Context, userId: number | undefined, fallbackEmail?: string): SentencePart {
  const u = userId === undefined ? undefined : c.users.get(userId);
  const href = userId !== undefined && c.members.has(userId) ? `/console/${c.org.slug}/members` : undefined;
  if (u?.name) return { text: u.name, ...(href ? { href } : {}) };
  const email = u?.email ?? fallbackEmail;
  if (email) return { text: email, style: "email", ...(href ? { href } : {}) };
  return userId === undefined ? "someone" : `a former member (#${userId})`;
}

function subject(c: Context, a: AuditActor): SentencePart {
  if (a.kind === "user") return person(c, a.userId, a.email);
  return a.name.charAt(0).toUpperCase() + a.name.slice(1);
}

/** “name” (live.prt1.Ab12…), the prefix linked to the keys page. */
function key(c: Context, id: number, details: Record<string, unknown>): SentencePart[] {
  const k = c.keys.get(id);
  const name = k?.name ?? str(details.name);
  const prefix = k?.prefix ?? str(details.prefix);
  const ref: SentencePart = prefix ? { text: `${prefix}…`, style: "code", ...(k ? { href: `/console/${c.org.slug}/keys` } : {}) } : `#${id}`;
  return name ? [`“${name}” (`, ref, ")"] : [ref];
}

/** A simulation's id as code, linked to its page. */
const simulation = (c: Context, id: string): SentencePart => ({ text: id, style: "code", href: `/console/${c.org.slug}/simulations/${id}` });

/** The overlap as it stands now: still running, over, or cut short by a later revocation (which has its own entry). */
function oldKeyTense(old: { revoked_at: string | null } | undefined, ends: string, now: string) {
  if (old?.revoked_at && old.revoked_at < ends) return "was to work";
  return ends <= now ? "worked" : "works";
}

const list = (xs: string[]) => (xs.length <= 1 ? xs.join("") : `${xs.slice(0, -1).join(", ")} and ${xs.at(-1)}`);

type Describe = (c: Context, e: Row, who: SentencePart) => SentencePart[];

const planName = (v: unknown) => (typeof v === "string" && isPlanId(v) ? PLANS[v].name : "another plan");
const moneyOf = (v: unknown) => (typeof v === "number" && Number.isInteger(v) ? formatMoney(v) : "an amount");
const PLAN_CHANGE_REASONS: Record<string, string> = {
  checkout: " after a payment through checkout",
  requested: ", as asked",
  "grace-ended": " because the grace period after a failed payment ended",
  "subscription-ended": " because the subscription ended at the billing provider",
};

/** One sentence per action the product writes (lib/api/key-service.ts, lib/console/*, db/seed/demo.ts). */
export const SENTENCES: Record<string, Describe> = {
  "org.created": (c, e, who) => [who, ` created the organisation ${str(e.details.name) ?? c.org.name}.`],
  "key.created": (c, e, who) => {
    const mode = str(e.details.mode);
    const scopes = Array.isArray(e.details.scopes) ? e.details.scopes.filter((s): s is string => typeof s === "string") : [];
    const ends = str(e.details.expiresAt);
    return [
      who,
      ` created the ${mode ? `${mode} ` : ""}key `,
      ...key(c, Number(e.targetId), e.details),
      scopes.length ? ` with ${scopes.length === 1 ? "the scope" : "the scopes"} ${list(scopes)}` : "",
      ...(ends ? [`, to work until `, { at: ends }] : []),
      ".",
    ];
  },
  "key.rotated": (c, e, who) => {
    const newId = typeof e.details.newKeyId === "number" ? e.details.newKeyId : undefined;
    const successor = newId !== undefined ? c.keys.get(newId) : undefined;
    const newPrefix = successor?.prefix ?? str(e.details.newPrefix);
    const ends = str(e.details.oldKeyEndsAt);
    return [
      who,
      " rotated the key ",
      ...key(c, Number(e.targetId), e.details),
      ...(newPrefix ? [" to ", { text: `${newPrefix}…`, style: "code" as const, ...(successor ? { href: `/console/${c.org.slug}/keys` } : {}) }] : []),
      ...(!ends ? ["."] : ends <= e.at ? ["; the old key stopped at once."] : [`; the old key ${oldKeyTense(c.keys.get(Number(e.targetId)), ends, c.now)} until `, { at: ends }, "."]),
    ];
  },
  "bench.credential_issued": (_c, e, who) => {
    const scopes = Array.isArray(e.details.scopes) ? e.details.scopes.filter((x): x is string => typeof x === "string") : [];
    return [
      who,
      ` received a bench credential: a test key${scopes.length ? ` for ${list(scopes)}` : ""} that the console's bench renews hourly while they use it. It is not listed among the keys, and it ends when they leave or lose the bench.`,
    ];
  },
  "simulation.started": (c, e, who) => {
    const points = typeof e.details.points === "number" ? e.details.points : undefined;
    return [who, " started the simulation ", simulation(c, e.targetId), points ? ` (${points} ${points === 1 ? "point" : "points"}).` : "."];
  },
  "simulation.cancelled": (c, e, who) => [
    who,
    " cancelled the simulation ",
    simulation(c, e.targetId),
    e.details.was === "queued" ? " before it started." : "; it stopped within a second, keeping the chunks it had finished.",
  ],
  "billing.checkout_started": (_c, e, who) => [who, ` opened a checkout to move to ${planName(e.details.plan)}; the plan changes when the payment is confirmed.`],
  "billing.plan_changed": (_c, e, who) => [who, ` moved the organisation from ${planName(e.details.from)} to ${planName(e.details.to)}`, PLAN_CHANGE_REASONS[str(e.details.reason) ?? ""] ?? "", "."],
  "billing.payment_failed": (_c, e, who) => {
    const grace = str(e.details.graceUntil);
    return [who, " recorded a failed payment of ", moneyOf(e.details.amount), ` for invoice ${e.targetId}`, ...(grace ? ["; the plan stays until ", { at: grace }, " unless it is paid"] : []), "."];
  },
  "billing.payment_recovered": (_c, e, who) => [who, " recorded the payment of ", moneyOf(e.details.amount), ` for invoice ${e.targetId}; the grace period ended.`],
  "key.revoked": (c, e, who) => [who, " revoked the key ", ...key(c, Number(e.targetId), e.details), "; it stopped working at once."],
  "member.invited": (_c, e, who) => {
    const replaced = Array.isArray(e.details.replaced) && e.details.replaced.length > 0;
    const email = str(e.details.email);
    return [who, " invited ", email ? { text: email, style: "email" } : "someone", ` to join as ${roleWords(e.details.role)}`, replaced ? ", replacing the earlier invitation." : "."];
  },
  "invitation.revoked": (c, e, who) => {
    const email = c.invitations.get(Number(e.targetId));
    return [who, " withdrew the invitation", ...(email ? [" to ", { text: email, style: "email" as const }] : []), "."];
  },
  "member.joined": (_c, e, who) => [who, ` joined as ${roleWords(e.details.role)}.`],
  "member.role_changed": (c, e, who) => [who, " changed the role of ", person(c, Number(e.targetId), str(e.details.email)), ` from ${roleName(e.details.from)} to ${roleName(e.details.to)}.`],
  "member.removed": (c, e, who) => {
    const revoked = e.details.keysRevoked === true;
    if (e.details.left === true) return [who, ` left the organisation${revoked ? " and revoked every working key they had created" : ""}.`];
    return [who, " removed ", person(c, Number(e.targetId), str(e.details.email)), ` (${roleName(e.details.role)})`, revoked ? " and revoked every working key they had created." : "; the keys they created keep working."];
  },
  "org.ownership_transferred": (c, e, who) => [
    who,
    " handed ownership to ",
    person(c, Number(e.targetId), str(e.details.email)),
    `${e.actor.kind === "user" ? ` and became ${roleWords("developer")}` : ""}.`,
  ],
};

/** The sentence for an action this code does not know (written by a newer version, say): still who, what and on which object. */
const fallback: Describe = (_c, e, who) => [who, " recorded ", { text: e.action, style: "code" }, ` on ${e.targetType.replace(/_/g, " ")} ${e.targetId}.`];

export function describeEntry(c: Context, e: Row): SentencePart[] {
  const parts = (SENTENCES[e.action] ?? fallback)(c, e, subject(c, e.actor));
  return parts.filter((p) => p !== "");
}

const asRecord = (v: unknown): Record<string, unknown> => (typeof v === "object" && v !== null && !Array.isArray(v) ? (v as Record<string, unknown>) : {});
const numericIds = (xs: unknown[]) => [...new Set(xs.map(Number).filter((n) => Number.isInteger(n) && n > 0))];

/** One page of the org's audit log, newest first, each entry with its actor named and its sentence written. */
export async function listAuditEntries(db: Db, org: Pick<Org, "id" | "slug" | "name">, q: z.output<typeof auditQuery>, now = new Date()) {
  const after = q.cursor === undefined ? undefined : decodeCursor(q.cursor, cursorShape);
  if (q.cursor !== undefined && !after) throw invalidField("/cursor", "The cursor is not one this list returned.");
  const rows: AuditEntry[] = await listAuditPage(db, { orgId: org.id, actor: q.actor, action: q.action, beforeId: after?.id, limit: q.limit + 1 });
  const page = rows.slice(0, q.limit).map((r) => ({ row: r, details: asRecord(JSON.parse(r.details)) }));

  const userIds = numericIds(page.flatMap(({ row }) => [userActor.exec(row.actor)?.[1], row.target_type === "user" ? row.target_id : undefined]));
  const keyIds = numericIds(page.flatMap(({ row, details }) => (row.target_type === "api_key" ? [row.target_id, details.newKeyId] : [])));
  const invitationIds = numericIds(page.flatMap(({ row }) => (row.target_type === "invitation" ? [row.target_id] : [])));
  const [users, members, keys, invitations] = await Promise.all([
    findUsersByIds(db, userIds),
    userIds.length ? db.selectFrom("memberships").select("user_id").where("org_id", "=", org.id).where("user_id", "in", userIds).execute() : [],
    keyIds.length ? db.selectFrom("api_keys").select(["id", "name", "prefix", "revoked_at"]).where("org_id", "=", org.id).where("id", "in", keyIds).execute() : [],
    invitationIds.length ? db.selectFrom("invitations").select(["id", "email"]).where("org_id", "=", org.id).where("id", "in", invitationIds).execute() : [],
  ]);
  const c: Context = {
    org,
    now: now.toISOString(),
    users: new Map(users.map((u) => [u.id, u])),
    members: new Set(members.map((m) => m.user_id)),
    keys: new Map(keys.map((k) => [k.id, k])),
    invitations: new Map(invitations.map((i) => [i.id, i.email])),
  };
  const last = page.at(-1);
  return {
    entries: page.map(({ row, details }) => {
      const e: Row = { actor: actorOf(row.actor, c.users), action: row.action, targetType: row.target_type, targetId: row.target_id, at: row.created_at, details };
      return { id: row.id, ...e, sentence: describeEntry(c, e) };
    }),
    nextCursor: rows.length > q.limit && last ? encodeCursor({ id: last.row.id }) : null,
  };
}
