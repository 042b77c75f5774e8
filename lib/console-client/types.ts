/**
 * Shapes of the console's JSON routes (app/api/console/*), as the contract states them.
 * Timestamps are ISO 8601 strings; days are YYYY-MM-DD (UTC).
 */

export type Role = "owner" | "developer" | "billing";
export const ROLES: readonly Role[] = ["owner", "developer", "billing"];

export interface OrgSummary {
  slug: string;
  name: string;
  plan: string;
  role: Role;
}

export interface Me {
  user: { id: number; email: string; name: string | null };
  orgs: OrgSummary[];
}

export interface EndpointExample {
  summary: string;
  value: unknown;
}

export interface EndpointInfo {
  id: string;
  method: "GET" | "POST" | "DELETE";
  /** The full path, including /api/v1. */
  path: string;
  scope: string;
  tag?: string;
  summary: string;
  description: string;
  examples: Record<string, EndpointExample>;
  /** JSON Schema (2020-12) of the request body, or of the query parameters of a GET. */
  inputSchema: Record<string, unknown>;
}

export interface Member {
  userId: number;
  email: string;
  name: string | null;
  role: Role;
  joinedAt: string;
}

export interface Invitation {
  id: number;
  email: string;
  role: Role;
  expiresAt: string;
  invitedBy: { id: number; email: string } | null;
}

export interface MembersPayload {
  members: Member[];
  invitations: Invitation[];
}

// The key row is the server's own type (type-only import: nothing of the server reaches the bundle).
export type { KeyMode } from "@/db/schema";
export type { ConsoleKeyState as KeyState, KeyRecord } from "@/lib/console/keys";
import type { KeyMode } from "@/db/schema";
import type { KeyRecord } from "@/lib/console/keys";

export interface NewKeyInput {
  name: string;
  scopes: string[];
  mode: KeyMode;
  expiresAt?: string | null;
}

export interface IssuedKey {
  /** The plaintext key: shown once, never stored by the console. */
  key: string;
  record: KeyRecord;
}

export interface RotatedKey extends IssuedKey {
  previous: { id: number; expiresAt: string };
}

export interface TryKey {
  key: string;
  expiresAt: string;
}

export interface UsageSums {
  calls: number;
  units: number;
  errors: number;
}

export interface UsageReport {
  from: string;
  to: string;
  totals: { calls: number; units: number; errors?: number };
  daily: ({ day: string } & UsageSums)[];
  byEndpoint: ({ endpoint: string } & UsageSums)[];
  byKey: { keyId: number | null; prefix: string | null; name: string | null; calls: number; units: number; errors?: number }[];
}

export type AuditActor =
  | { kind: "user"; id?: string; userId?: number; email?: string }
  | { kind: "cli" | "system"; id?: string; userId?: undefined; email?: undefined };

export interface AuditEntry {
  id: number;
  at: string;
  actor: AuditActor;
  action: string;
  targetType: string | null;
  targetId: number | string | null;
  details: unknown;
}

export interface AuditPage {
  entries: AuditEntry[];
  nextCursor: string | null;
}

export interface AcceptedInvitation {
  org: { slug: string; name: string };
  role: Role;
}

/** Scopes a console user can give a key (lib/api/scopes.ts), with what each allows. */
export const PUBLIC_SCOPES = [
  { id: "compute", label: "compute", help: "Call the math endpoints: codes, encode, decode, distance, channels, capacity, links." },
  { id: "usage:read", label: "usage:read", help: "Read the organisation's metered usage." },
] as const;
