import { consoleFetch } from "./fetcher";
import type {
  AcceptedInvitation,
  AuditPage,
  ClaimsPage,
  ClaimVerdict,
  EndpointInfo,
  Invitation,
  IssuedKey,
  KeyRecord,
  Me,
  Member,
  MembersPayload,
  NewKeyInput,
  RemovedMember,
  Role,
  RotatedKey,
  SimulationDetail,
  SimulationItem,
  SimulationsPage,
  TryKey,
  UsageReport,
} from "./types";

export interface ClaimFilters {
  label?: string;
  verdict?: ClaimVerdict;
  cursor?: string;
  limit?: number;
}

/** Every console route the pages call, one function each. `org` is the org's slug. */

const orgPath = (org: string) => `/api/console/orgs/${encodeURIComponent(org)}`;

function query(params: Record<string, string | number | undefined>): string {
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v !== undefined && v !== "") q.set(k, String(v));
  const s = q.toString();
  return s ? `?${s}` : "";
}

export const consoleApi = {
  me: (signal?: AbortSignal) => consoleFetch<Me>("/api/console/me", { signal }),
  endpoints: (signal?: AbortSignal) => consoleFetch<{ endpoints: EndpointInfo[] }>("/api/console/endpoints", { signal }),

  members: (org: string, signal?: AbortSignal) => consoleFetch<MembersPayload>(`${orgPath(org)}/members`, { signal }),
  invite: (org: string, body: { email: string; role: Role }) =>
    consoleFetch<{ invitation: Omit<Invitation, "invitedBy"> }>(`${orgPath(org)}/invitations`, { method: "POST", body }),
  revokeInvitation: (org: string, id: number) => consoleFetch<unknown>(`${orgPath(org)}/invitations/${id}`, { method: "DELETE" }),
  changeRole: (org: string, userId: number, role: Role) =>
    consoleFetch<{ member: Member }>(`${orgPath(org)}/members/${userId}`, { method: "PATCH", body: { role } }),
  removeMember: (org: string, userId: number, opts: { revokeKeys?: boolean } = {}) =>
    consoleFetch<RemovedMember>(`${orgPath(org)}/members/${userId}${opts.revokeKeys ? "?revokeKeys=true" : ""}`, { method: "DELETE" }),
  transfer: (org: string, userId: number) => consoleFetch<unknown>(`${orgPath(org)}/transfer`, { method: "POST", body: { userId } }),
  acceptInvitation: (token: string) => consoleFetch<AcceptedInvitation>("/api/console/invitations/accept", { method: "POST", body: { token } }),

  keys: (org: string, signal?: AbortSignal) => consoleFetch<{ keys: KeyRecord[] }>(`${orgPath(org)}/keys`, { signal }),
  createKey: (org: string, body: NewKeyInput) => consoleFetch<IssuedKey>(`${orgPath(org)}/keys`, { method: "POST", body }),
  rotateKey: (org: string, id: number, overlapMinutes: number) =>
    consoleFetch<RotatedKey>(`${orgPath(org)}/keys/${id}/rotate`, { method: "POST", body: { overlapMinutes } }),
  revokeKey: (org: string, id: number) => consoleFetch<{ record: KeyRecord }>(`${orgPath(org)}/keys/${id}/revoke`, { method: "POST" }),
  tryKey: (org: string) => consoleFetch<TryKey>(`${orgPath(org)}/bench-credential`, { method: "POST" }),

  usage: (org: string, from: string, to: string, signal?: AbortSignal) => consoleFetch<UsageReport>(`${orgPath(org)}/usage${query({ from, to })}`, { signal }),
  usageCsvHref: (org: string, from: string, to: string) => `${orgPath(org)}/usage${query({ from, to, format: "csv" })}`,

  audit: (org: string, f: { actor?: string; action?: string; cursor?: string; limit?: number }, signal?: AbortSignal) =>
    consoleFetch<AuditPage>(`${orgPath(org)}/audit${query({ actor: f.actor, action: f.action, cursor: f.cursor, limit: f.limit })}`, { signal }),

  claims: (org: string, f: ClaimFilters, signal?: AbortSignal) =>
    consoleFetch<ClaimsPage>(`${orgPath(org)}/claims${query({ label: f.label, verdict: f.verdict, cursor: f.cursor, limit: f.limit })}`, { signal }),

  simulations: (org: string, f: { cursor?: string; limit?: number }, signal?: AbortSignal) =>
    consoleFetch<SimulationsPage>(`${orgPath(org)}/simulations${query({ cursor: f.cursor, limit: f.limit })}`, { signal }),
  simulation: (org: string, id: string, signal?: AbortSignal) => consoleFetch<{ simulation: SimulationDetail }>(`${orgPath(org)}/simulations/${encodeURIComponent(id)}`, { signal }),
  startSimulation: (org: string, body: Record<string, unknown>) => consoleFetch<{ simulation: SimulationItem }>(`${orgPath(org)}/simulations`, { method: "POST", body }),
  cancelSimulation: (org: string, id: string) => consoleFetch<{ simulation: SimulationItem }>(`${orgPath(org)}/simulations/${encodeURIComponent(id)}`, { method: "DELETE" }),
  /** The Server-Sent Events of one simulation, for an EventSource. */
  simulationEventsHref: (org: string, id: string) => `${orgPath(org)}/simulations/${encodeURIComponent(id)}/events`,
};
