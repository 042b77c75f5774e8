"use client";

import { useQuery } from "@tanstack/react-query";
import { consoleApi } from "./api";
import { queryKeys } from "./query-keys";
import type { OrgSummary, Role } from "./types";

/** The signed-in user and their orgs (GET /api/console/me), shared by the shell and every page. */
export function useMe() {
  return useQuery({ queryKey: queryKeys.me, queryFn: ({ signal }) => consoleApi.me(signal), staleTime: 60_000 });
}

/** The org named by the URL as the user sees it in /me: undefined while loading, null when they are not a member. */
export function useOrg(slug: string): { org: OrgSummary | null | undefined; role: Role | undefined; me: ReturnType<typeof useMe> } {
  const me = useMe();
  const org = me.data ? (me.data.orgs.find((o) => o.slug === slug) ?? null) : undefined;
  return { org, role: org?.role, me };
}

/** Which console sections a role may open; the server checks the same on every route. */
export const SECTION_ROLES = {
  overview: ["owner", "developer", "billing"],
  keys: ["owner", "developer"],
  members: ["owner", "developer", "billing"],
  usage: ["owner", "developer", "billing"],
  audit: ["owner"],
  try: ["owner", "developer"],
  claims: ["owner", "developer", "billing"],
  simulations: ["owner", "developer", "billing"],
  billing: ["owner", "billing"],
} as const satisfies Record<string, readonly Role[]>;

export type Section = keyof typeof SECTION_ROLES;

export function mayOpen(section: Section, role: Role | undefined): boolean {
  return role !== undefined && (SECTION_ROLES[section] as readonly Role[]).includes(role);
}
