/** TanStack Query keys of the console, in one place so that mutations invalidate the right lists. */
export const queryKeys = {
  me: ["console", "me"] as const,
  endpoints: ["console", "endpoints"] as const,
  org: (org: string) => ["console", "org", org] as const,
  members: (org: string) => ["console", "org", org, "members"] as const,
  keys: (org: string) => ["console", "org", org, "keys"] as const,
  usage: (org: string, from: string, to: string) => ["console", "org", org, "usage", from, to] as const,
  audit: (org: string, filters: { actor?: string; action?: string; cursor?: string; limit?: number }) =>
    ["console", "org", org, "audit", filters] as const,
  simulations: (org: string, filters: { cursor?: string; limit?: number }) => ["console", "org", org, "simulations", filters] as const,
  simulation: (org: string, id: string) => ["console", "org", org, "simulation", id] as const,
  claims: (org: string, filters: { label?: string; verdict?: string; cursor?: string; limit?: number }) => ["console", "org", org, "claims", filters] as const,
};
