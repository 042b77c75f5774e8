/** Scopes a key can carry. A key gets all of them unless it is created with fewer. */
export const scopeCatalogue = {
  compute: "Call the math endpoints: codes, encode, decode, distance, channels, capacity, links.",
  "usage:read": "Read the organisation's metered usage.",
  claims: "State error-rate claims and read their verdicts and each label's history.",
} as const;

export type Scope = keyof typeof scopeCatalogue;
export const allScopes = Object.keys(scopeCatalogue) as Scope[];

export function parseScopes(list: string): Scope[] {
  const names = list.split(/[\s,]+/).filter(Boolean);
  const unknown = names.filter((n) => !(n in scopeCatalogue));
  if (unknown.length) throw new Error(`unknown scope ${unknown.join(", ")}; known scopes: ${allScopes.join(", ")}`);
  return [...new Set(names)] as Scope[];
}
