/**
 * Shapes of the console's JSON routes (app/api/console/*), as the contract states them.
 * Timestamps are ISO 8601 strings; days are YYYY-MM-DD (UTC).
 */

// Every shape below is the server's own, read off the function that produces it (type-only
// imports: nothing of the server reaches the bundle), so the two cannot drift apart.
import type { Role } from "@/db/schema";
import { allScopes, scopeCatalogue } from "@/lib/api/scopes";
import type { describeMe } from "@/lib/console/account";
import type { listAuditEntries } from "@/lib/console/audit";
import type { listOrgClaims } from "@/lib/console/claims";
import type { listOrgSimulations, orgSimulation } from "@/lib/console/simulations";
import type { acceptInvitation } from "@/lib/console/invitations";
import type { createOrgKey, issueBenchCredential, rotateOrgKey } from "@/lib/console/keys";
import type { listMembersOf, removeMember } from "@/lib/console/members";
import type { summarise } from "@/lib/console/usage";

export type { Role, KeyMode } from "@/db/schema";
export type { ConsoleKeyState as KeyState, KeyRecord } from "@/lib/console/keys";
export type { MemberView as Member } from "@/lib/console/members";
export type { AuditActor } from "@/lib/console/audit";
export type { EndpointInfo, EndpointExample } from "@/lib/console/account";

export const ROLES: readonly Role[] = ["owner", "developer", "billing"];

export type Me = Awaited<ReturnType<typeof describeMe>>;
export type OrgSummary = Me["orgs"][number];

export type MembersPayload = Awaited<ReturnType<typeof listMembersOf>>;
export type Invitation = MembersPayload["invitations"][number];
export type RemovedMember = Awaited<ReturnType<typeof removeMember>>;

/** What the create-key form sends (the route checks it with newKeyInput). */
export type { NewKeyInput } from "@/lib/console/keys";
/** The plaintext key is in `key`: shown once, never stored by the console. */
export type IssuedKey = Awaited<ReturnType<typeof createOrgKey>>;
export type RotatedKey = Awaited<ReturnType<typeof rotateOrgKey>>;
export type TryKey = Awaited<ReturnType<typeof issueBenchCredential>>;

export type UsageReport = ReturnType<typeof summarise>;
export type UsageSums = UsageReport["totals"];

export type AuditPage = Awaited<ReturnType<typeof listAuditEntries>>;
export type AuditEntry = AuditPage["entries"][number];

export type ClaimsPage = Awaited<ReturnType<typeof listOrgClaims>>;
/** A claim as GET /api/v1/claims/{id} presents it, with the simulation job behind it (null when none). */
export type ClaimItem = ClaimsPage["claims"][number];
export type ClaimLabel = ClaimsPage["labels"][number];

export type SimulationsPage = Awaited<ReturnType<typeof listOrgSimulations>>;
/** A simulation as the list shows it (GET /api/v1/simulations/{id}'s shape). */
export type SimulationItem = SimulationsPage["simulations"][number];
/** One simulation for its result page: the list's shape and the code's name, n and k. */
export type SimulationDetail = Awaited<ReturnType<typeof orgSimulation>>;
export type { ClaimVerdict } from "@/db/schema";

export type AcceptedInvitation = Awaited<ReturnType<typeof acceptInvitation>>;

/** Scopes a console user can give a key, with what each allows (from lib/api/scopes.ts, which is plain data). */
export const PUBLIC_SCOPES = allScopes.map((id) => ({ id, help: scopeCatalogue[id] }));
