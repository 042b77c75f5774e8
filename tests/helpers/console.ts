import { randomBytes } from "node:crypto";
import { vi } from "vitest";
import { getDb, type Db } from "@/db";
import { insertInvitation } from "@/db/queries/invitations";
import { insertJob } from "@/db/queries/jobs";
import { insertOrg } from "@/db/queries/orgs";
import { insertMembership, insertUser } from "@/db/queries/users";
import type { Org, Role } from "@/db/schema";
import { createKey } from "@/lib/api/key-service";
import { allScopes } from "@/lib/api/scopes";
import { sessionCookie } from "@/lib/auth/session";
import { hashInvitationToken } from "@/lib/console/invitations";
import { sendMail, type Mail } from "@/lib/mail/send";
import { api } from "./api";

/**
 * The origin createApp's requests carry in their URL. Test files mock "@/lib/mail/send" with
 *   vi.mock(import("@/lib/mail/send"), async (orig) => ({ ...(await orig()), sendMail: vi.fn(async () => {}) }));
 * and read what was sent with sentMails().
 */
export const SAME_ORIGIN = "http://localhost";
export const EVIL_ORIGIN = "http://evil.example";

export type Method = "GET" | "POST" | "PATCH" | "DELETE";

export interface Person {
  id: number;
  email: string;
  cookie: string;
}

let counter = 0;
const unique = () => `${process.pid}-${++counter}`;

export async function makePerson(db: Db, label: string): Promise<Person> {
  const email = `${label}-${unique()}@console.example`;
  const user = await insertUser(db, { email, name: label });
  return { id: user.id, email, cookie: await sessionCookie({ userId: user.id, email }) };
}

export async function addMember(db: Db, org: Org, label: string, role: Role): Promise<Person> {
  const p = await makePerson(db, label);
  await insertMembership(db, { orgId: org.id, userId: p.id, role });
  return p;
}

/** A pending invitation with a token the test knows (the service only mails it). */
export async function invite(db: Db, org: Org, email: string, role: Role, expiresAt = new Date(Date.now() + 86_400_000).toISOString()) {
  const token = randomBytes(32).toString("base64url");
  const row = await insertInvitation(db, {
    org_id: org.id,
    email,
    role,
    token_hash: hashInvitationToken(token),
    invited_by_user_id: null,
    created_at: new Date().toISOString(),
    expires_at: expiresAt,
    accepted_at: null,
    revoked_at: null,
  });
  return { id: row.id, token };
}

/** A simulation job row as the API queues it (one (7,4) Hamming point on a BSC), queued or already done. */
async function simulationJobRow(db: Db, org: Org, status: "queued" | "done") {
  const id = `sim-${randomBytes(8).toString("hex")}`;
  const now = new Date().toISOString();
  const input = { code: { family: "hamming", r: 3 }, channel: { type: "bsc" }, points: [0.01], stop: { maxBits: 4000 }, confidence: 0.95, gapSkipping: true, seed: 1 };
  await insertJob(db, { id, org_id: org.id, api_key_id: null, kind: "simulation", input: JSON.stringify(input), status, created_at: now, updated_at: now, finished_at: status === "done" ? now : null });
  return id;
}

const key = (db: Db, org: Org, by: Person | null, name: string) =>
  createKey(db, { orgId: org.id, name, mode: "test", scopes: allScopes, createdByUserId: by?.id ?? null }, by ? `user:${by.id}` : "cli");

/**
 * An org with two owners (so an owner may leave), a developer, a billing member and a spare developer
 * to act on; a key of each of owner, developer and spare; a pending invitation. Beside it, an org none
 * of them belongs to, with its own member, key and invitation, and an invitation there for each of
 * owner, developer and billing (so each can accept one).
 */
export async function makeConsoleOrg() {
  const db = await getDb();
  // The largest plan, so the console suites never meet an allowance or a job budget (the billing suites choose theirs).
  const org = await insertOrg(db, { slug: `console-org-${unique()}`, name: "Console org", plan: "lighthouse" });
  const owner = await addMember(db, org, "owner", "owner");
  const coOwner = await addMember(db, org, "co-owner", "owner");
  const developer = await addMember(db, org, "developer", "developer");
  const billing = await addMember(db, org, "billing", "billing");
  const spare = await addMember(db, org, "spare", "developer");
  const keys = {
    owner: await key(db, org, owner, "owner key"),
    developer: await key(db, org, developer, "developer key"),
    spare: await key(db, org, spare, "spare key"),
  };
  const invitation = await invite(db, org, `invitee-${unique()}@console.example`, "developer");
  const simulations = { queued: await simulationJobRow(db, org, "queued"), done: await simulationJobRow(db, org, "done") };

  const other = await insertOrg(db, { slug: `other-${unique()}`, name: "Another org", plan: "lighthouse" });
  const otherOwner = await addMember(db, other, "other-owner", "owner");
  const otherKey = await key(db, other, otherOwner, "other key");
  const otherInvitation = await invite(db, other, `other-invitee-${unique()}@console.example`, "developer");
  const otherSimulation = await simulationJobRow(db, other, "queued");
  const byRole = { owner, developer, billing };
  // Keyed by user id: an invitation to the other org for each of owner, developer and billing.
  const invitationsElsewhere = new Map<number, { id: number; token: string }>();
  for (const p of Object.values(byRole)) invitationsElsewhere.set(p.id, await invite(db, other, p.email, "developer"));
  return { db, org, owner, coOwner, developer, billing, spare, keys, invitation, simulations, other, otherOwner, otherKey, otherInvitation, otherSimulation, byRole, invitationsElsewhere };
}

export type ConsoleFixture = Awaited<ReturnType<typeof makeConsoleOrg>>;

export interface CallOptions {
  cookie?: string;
  body?: unknown;
  /** Origin header; null sends none. Mutations default to the same origin, reads to none. */
  origin?: string | null;
  headers?: Record<string, string>;
}

/** One console request through the real route modules. */
export function consoleCall(method: Method, path: string, o: CallOptions = {}) {
  const client = api();
  let req = method === "GET" ? client.get(path) : method === "POST" ? client.post(path) : method === "PATCH" ? client.patch(path) : client.delete(path);
  const origin = o.origin === undefined ? (method === "GET" ? null : SAME_ORIGIN) : o.origin;
  if (origin !== null) req = req.set("origin", origin);
  if (o.cookie) req = req.set("cookie", o.cookie);
  for (const [k, v] of Object.entries(o.headers ?? {})) req = req.set(k, v);
  if (o.body !== undefined) req = req.set("content-type", "application/json").send(JSON.stringify(o.body));
  return req;
}

/** Mails handed to the (mocked) sendMail so far. */
export const sentMails = (): Mail[] => vi.mocked(sendMail).mock.calls.map((c) => c[0]);

/** The invitation link in the last mail to `to`. */
export function inviteLinkTo(to: string): { link: string; token: string } {
  const mail = sentMails().filter((m) => m.to === to).at(-1);
  const link = mail?.text.match(/https?:\/\/\S+\/console\/invite\/([A-Za-z0-9_-]+)/);
  if (!link) throw new Error(`no invitation mail to ${to}`);
  return { link: link[0], token: link[1]! };
}
