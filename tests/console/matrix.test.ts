import { encode } from "next-auth/jwt";
import { describe, expect, it, vi } from "vitest";
import type { Role } from "@/db/schema";
import { apiRoutes } from "@/lib/api/route-table";
import { sessionCookie } from "@/lib/auth/session";
import { expectProblem } from "../helpers/api";
import { billingStandInForThisFile } from "../helpers/billing";
import { EVIL_ORIGIN, consoleCall, makeConsoleOrg, type ConsoleFixture, type Method, type Person } from "../helpers/console";

vi.mock(import("@/lib/mail/send"), async (orig) => ({ ...(await orig()), sendMail: vi.fn(async () => {}) }));

/**
 * The role × action matrix: every console route, with what each role gets as the contract states it.
 * 403 is a role refusal; 404 means the caller may not even learn the object exists (a developer and
 * another member's key). Every row also runs without a session, with a broken or expired one, and, for
 * mutations, from another origin; org routes against an org the caller is not in.
 */
interface Row {
  method: Method;
  /** The route file's path under app/, params in brackets. */
  route: string;
  does: string;
  path: (fx: ConsoleFixture, as: Person) => string;
  body?: (fx: ConsoleFixture, as: Person) => unknown;
  expect: Record<Role, number>;
  /** The answer's media type when it is not JSON. */
  type?: RegExp;
  /** The same call aimed at an object of the other org, from inside the caller's own org (run as owner). */
  foreign?: (fx: ConsoleFixture) => { path: string; body?: unknown };
}

// The billing routes talk to the provider: its local stand-in answers them here.
billingStandInForThisFile();

const everyone = (s: number) => ({ owner: s, developer: s, billing: s });
const ownerOnly = (s: number) => ({ owner: s, developer: 403, billing: 403 });
const keyHolders = (s: number) => ({ owner: s, developer: s, billing: 403 });
const moneyRoles = (s: number) => ({ owner: s, developer: 403, billing: s });
const org = (fx: ConsoleFixture) => `/api/console/orgs/${fx.org.slug}`;
/** The key a role would manage as its own; billing has none, so it is pointed at the developer's. */
const ownKey = (fx: ConsoleFixture, as: Person) => (as.id === fx.owner.id ? fx.keys.owner : fx.keys.developer).record.id;

const rows: Row[] = [
  { method: "GET", route: "/api/console/me", does: "who am I", path: () => "/api/console/me", expect: everyone(200) },
  { method: "GET", route: "/api/console/endpoints", does: "public endpoint catalogue", path: () => "/api/console/endpoints", expect: everyone(200) },
  {
    method: "POST",
    route: "/api/console/invitations/accept",
    does: "accept an invitation to one's own address",
    path: () => "/api/console/invitations/accept",
    body: (fx, as) => ({ token: fx.invitationsElsewhere.get(as.id)!.token }),
    expect: everyone(200),
  },
  // Fixture people sign in by link and have no password: every role is told how to confirm instead (tests/console/reauth.test.ts covers passwords).
  {
    method: "POST",
    route: "/api/console/auth/confirm",
    does: "confirm one's password (none set: sign in again by link)",
    path: () => "/api/console/auth/confirm",
    body: () => ({ password: "not a fixture password" }),
    expect: everyone(422),
    type: /^application\/problem\+json/,
  },
  { method: "GET", route: "/api/console/orgs/[org]/members", does: "list members", path: (fx) => `${org(fx)}/members`, expect: everyone(200) },
  {
    method: "PATCH",
    route: "/api/console/orgs/[org]/members/[userId]",
    does: "change a member's role",
    path: (fx) => `${org(fx)}/members/${fx.spare.id}`,
    body: () => ({ role: "billing" }),
    expect: ownerOnly(200),
    foreign: (fx) => ({ path: `${org(fx)}/members/${fx.otherOwner.id}`, body: { role: "billing" } }),
  },
  {
    method: "DELETE",
    route: "/api/console/orgs/[org]/members/[userId]",
    does: "remove another member",
    path: (fx) => `${org(fx)}/members/${fx.spare.id}`,
    expect: ownerOnly(200),
    foreign: (fx) => ({ path: `${org(fx)}/members/${fx.otherOwner.id}` }),
  },
  { method: "DELETE", route: "/api/console/orgs/[org]/members/[userId]", does: "leave (remove oneself)", path: (fx, as) => `${org(fx)}/members/${as.id}`, expect: everyone(200) },
  {
    method: "POST",
    route: "/api/console/orgs/[org]/invitations",
    does: "invite",
    path: (fx) => `${org(fx)}/invitations`,
    body: () => ({ email: "new.person@console.example", role: "developer" }),
    expect: ownerOnly(201),
  },
  {
    method: "DELETE",
    route: "/api/console/orgs/[org]/invitations/[id]",
    does: "revoke an invitation",
    path: (fx) => `${org(fx)}/invitations/${fx.invitation.id}`,
    expect: ownerOnly(200),
    foreign: (fx) => ({ path: `${org(fx)}/invitations/${fx.otherInvitation.id}` }),
  },
  {
    method: "POST",
    route: "/api/console/orgs/[org]/transfer",
    does: "transfer ownership",
    path: (fx) => `${org(fx)}/transfer`,
    body: (fx) => ({ userId: fx.spare.id }),
    expect: ownerOnly(200),
    foreign: (fx) => ({ path: `${org(fx)}/transfer`, body: { userId: fx.otherOwner.id } }),
  },
  { method: "GET", route: "/api/console/orgs/[org]/keys", does: "list keys", path: (fx) => `${org(fx)}/keys`, expect: keyHolders(200) },
  {
    method: "POST",
    route: "/api/console/orgs/[org]/keys",
    does: "create a key",
    path: (fx) => `${org(fx)}/keys`,
    body: () => ({ name: "matrix key", scopes: ["compute"], mode: "test" }),
    expect: keyHolders(201),
  },
  {
    method: "POST",
    route: "/api/console/orgs/[org]/keys/[id]/rotate",
    does: "rotate one's own key",
    path: (fx, as) => `${org(fx)}/keys/${ownKey(fx, as)}/rotate`,
    body: () => ({ overlapHours: 24 }),
    expect: keyHolders(201),
    foreign: (fx) => ({ path: `${org(fx)}/keys/${fx.otherKey.record.id}/rotate`, body: { overlapHours: 24 } }),
  },
  {
    method: "POST",
    route: "/api/console/orgs/[org]/keys/[id]/rotate",
    does: "rotate another member's key",
    path: (fx) => `${org(fx)}/keys/${fx.keys.spare.record.id}/rotate`,
    body: () => ({ overlapHours: 24 }),
    expect: { owner: 201, developer: 404, billing: 403 },
  },
  {
    method: "POST",
    route: "/api/console/orgs/[org]/keys/[id]/revoke",
    does: "revoke one's own key",
    path: (fx, as) => `${org(fx)}/keys/${ownKey(fx, as)}/revoke`,
    expect: keyHolders(200),
    foreign: (fx) => ({ path: `${org(fx)}/keys/${fx.otherKey.record.id}/revoke` }),
  },
  {
    method: "POST",
    route: "/api/console/orgs/[org]/keys/[id]/revoke",
    does: "revoke another member's key",
    path: (fx) => `${org(fx)}/keys/${fx.keys.spare.record.id}/revoke`,
    expect: { owner: 200, developer: 404, billing: 403 },
  },
  { method: "POST", route: "/api/console/orgs/[org]/bench-credential", does: "renew their bench credential", path: (fx) => `${org(fx)}/bench-credential`, expect: keyHolders(201) },
  { method: "GET", route: "/api/console/orgs/[org]/usage", does: "read usage", path: (fx) => `${org(fx)}/usage`, expect: everyone(200) },
  { method: "GET", route: "/api/console/orgs/[org]/audit", does: "read the audit log", path: (fx) => `${org(fx)}/audit`, expect: ownerOnly(200) },
  { method: "GET", route: "/api/console/orgs/[org]/claims", does: "read the claims", path: (fx) => `${org(fx)}/claims`, expect: everyone(200) },
  { method: "GET", route: "/api/console/orgs/[org]/simulations", does: "list simulations", path: (fx) => `${org(fx)}/simulations`, expect: everyone(200) },
  {
    method: "POST",
    route: "/api/console/orgs/[org]/simulations",
    does: "start a simulation",
    path: (fx) => `${org(fx)}/simulations`,
    body: () => ({ code: { family: "hamming", r: 3 }, channel: { type: "bsc" }, points: [0.01], stop: { maxBits: 4000 }, seed: 3 }),
    expect: keyHolders(202),
  },
  {
    method: "GET",
    route: "/api/console/orgs/[org]/simulations/[id]",
    does: "read a simulation",
    path: (fx) => `${org(fx)}/simulations/${fx.simulations.done}`,
    expect: everyone(200),
    foreign: (fx) => ({ path: `${org(fx)}/simulations/${fx.otherSimulation}` }),
  },
  {
    method: "DELETE",
    route: "/api/console/orgs/[org]/simulations/[id]",
    does: "cancel a queued simulation",
    path: (fx) => `${org(fx)}/simulations/${fx.simulations.queued}`,
    expect: keyHolders(200),
    foreign: (fx) => ({ path: `${org(fx)}/simulations/${fx.otherSimulation}` }),
  },
  {
    method: "GET",
    route: "/api/console/orgs/[org]/simulations/[id]/events",
    does: "follow a simulation's events (a finished one: one end event)",
    path: (fx) => `${org(fx)}/simulations/${fx.simulations.done}/events`,
    expect: everyone(200),
    type: /^text\/event-stream/,
    foreign: (fx) => ({ path: `${org(fx)}/simulations/${fx.otherSimulation}/events` }),
  },
  { method: "GET", route: "/api/console/orgs/[org]/billing", does: "read the plan, the month's usage and payment state", path: (fx) => `${org(fx)}/billing`, expect: moneyRoles(200) },
  { method: "POST", route: "/api/console/orgs/[org]/billing/checkout", does: "start a checkout for another plan", path: (fx) => `${org(fx)}/billing/checkout`, body: () => ({ plan: "beacon" }), expect: moneyRoles(201) },
  { method: "POST", route: "/api/console/orgs/[org]/billing/downgrade", does: "move to the free plan", path: (fx) => `${org(fx)}/billing/downgrade`, expect: moneyRoles(200) },
  { method: "GET", route: "/api/console/orgs/[org]/billing/invoices", does: "list invoices", path: (fx) => `${org(fx)}/billing/invoices`, expect: moneyRoles(200) },
  // The fixture's org has no invoices: an allowed role learns that (404); a developer may not ask (403).
  { method: "GET", route: "/api/console/orgs/[org]/billing/invoices/[id]", does: "read an invoice", path: (fx) => `${org(fx)}/billing/invoices/invoice.none`, expect: moneyRoles(404) },
  { method: "GET", route: "/api/console/orgs/[org]/billing/invoices/[id]/document", does: "download an invoice", path: (fx) => `${org(fx)}/billing/invoices/invoice.none/document?format=pdf`, expect: moneyRoles(404) },
];

/** Console routes written and tested elsewhere: they work without a session, so a role matrix does not apply. */
const NOT_IN_MATRIX: Record<string, string> = {
  "GET /api/console/dev/mailbox": "development mailbox of the fake SMTP server",
  "POST /api/console/auth/signup": "sign-up, before there is a session",
  "POST /api/console/auth/reset-request": "password reset request, signed out",
  "POST /api/console/auth/reset-confirm": "password reset, signed out",
};

const ROLES: Role[] = ["owner", "developer", "billing"];
// Route modules export a handler for every method (the rest answer 405); what each serves is in the route table, which tests/api/methods.test.ts checks against them.
const served = Object.entries(apiRoutes)
  .filter(([route]) => route.startsWith("/api/console/"))
  .flatMap(([route, methods]) => methods.map((m) => `${m} ${route}`));
const routePattern = (route: string) => new RegExp(`^${route.replace(/\[[^\]]+\]/g, "[^/]+")}$`);

function send(row: Row, fx: ConsoleFixture, path: string, cookie: string | undefined, extra: { body?: unknown; origin?: string | null; headers?: Record<string, string> } = {}) {
  const body = "body" in extra ? extra.body : row.body?.(fx, fx.owner);
  return consoleCall(row.method, path, { cookie, body, origin: extra.origin, headers: extra.headers });
}

const auditCount = async (fx: ConsoleFixture) => (await fx.db.selectFrom("audit_log").select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow()).n;

function expectStatus(res: Awaited<ReturnType<typeof consoleCall>>, status: number, type = /^application\/json/) {
  if (status === 403) expectProblem(res, 403, "role-refused");
  else if (status === 404) expectProblem(res, 404, "not-found");
  else {
    expect(res.status, res.text).toBe(status);
    expect(res.headers["content-type"]).toMatch(type);
  }
}

describe("the matrix covers the console", () => {
  it("has a row for every method of every route file under app/api/console, and no row for a route that does not exist", () => {
    const inMatrix = new Set(rows.map((r) => `${r.method} ${r.route}`));
    expect(served.length).toBeGreaterThan(0);
    expect(served.filter((s) => !inMatrix.has(s) && !(s in NOT_IN_MATRIX))).toEqual([]);
    expect([...inMatrix].filter((r) => !served.includes(r))).toEqual([]);
  });

  it("addresses each row's route with its path", async () => {
    const fx = await makeConsoleOrg();
    for (const row of rows) for (const role of ROLES) expect(row.path(fx, fx.byRole[role]).split("?")[0]).toMatch(routePattern(row.route));
  });
});

describe.each(rows.map((r) => [`${r.method} ${r.route} (${r.does})`, r] as const))("%s", (_title, row) => {
  const mutation = row.method !== "GET";

  it.each(ROLES)("as %s: the contract's answer", async (role) => {
    const fx = await makeConsoleOrg();
    const as = fx.byRole[role];
    const before = await auditCount(fx);
    const res = await consoleCall(row.method, row.path(fx, as), { cookie: as.cookie, body: row.body?.(fx, as) });
    expectStatus(res, row.expect[role], row.type);
    // A refused change leaves no trace; an allowed one is audited.
    if (mutation) expect(await auditCount(fx)).toBe(row.expect[role] < 300 ? before + 1 : before);
  });

  it("401 without a session", async () => {
    const fx = await makeConsoleOrg();
    expectProblem(await send(row, fx, row.path(fx, fx.owner), undefined), 401, "signed-out");
  });

  it("401 with a garbage cookie, a token signed with another secret, and an expired session", async () => {
    const fx = await makeConsoleOrg();
    const before = await auditCount(fx);
    const forged = await encode({ token: { sub: String(fx.owner.id), email: fx.owner.email }, secret: "not-the-paritas-secret" });
    const expired = await sessionCookie({ userId: fx.owner.id, email: fx.owner.email }, -3600);
    for (const cookie of ["next-auth.session-token=garbage", `next-auth.session-token=${forged}`, expired]) {
      expectProblem(await send(row, fx, row.path(fx, fx.owner), cookie), 401, "signed-out");
    }
    expect(await auditCount(fx)).toBe(before);
  });

  if (row.route.includes("[org]")) {
    it("404 for an org the caller is not in, and for one that does not exist", async () => {
      const fx = await makeConsoleOrg();
      const path = row.path(fx, fx.owner);
      for (const slug of [fx.other.slug, "no-such-org"]) {
        expectProblem(await send(row, fx, path.replace(fx.org.slug, slug), fx.owner.cookie), 404, "not-found");
      }
    });
  }

  const foreign = row.foreign;
  if (foreign) {
    it("404 for another org's object addressed from the caller's own org", async () => {
      const fx = await makeConsoleOrg();
      const before = await auditCount(fx);
      const f = foreign(fx);
      expectProblem(await send(row, fx, f.path, fx.owner.cookie, { body: f.body }), 404, "not-found");
      expect(await auditCount(fx)).toBe(before);
    });
  }

  if (mutation) {
    it("403 for a cross-origin request, Origin null, a missing Origin and Sec-Fetch-Site: cross-site", async () => {
      const fx = await makeConsoleOrg();
      const before = await auditCount(fx);
      const path = row.path(fx, fx.owner);
      for (const attempt of [{ origin: EVIL_ORIGIN }, { origin: "null" }, { origin: null }, { origin: null, headers: { "sec-fetch-site": "cross-site" } }]) {
        expectProblem(await send(row, fx, path, fx.owner.cookie, attempt), 403, "cross-origin");
      }
      expect(await auditCount(fx)).toBe(before);
    });
  }
});
