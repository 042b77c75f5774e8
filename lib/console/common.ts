import type { Role } from "@/db/schema";
import { ApiError } from "@/lib/api/errors";

/** A signed-in user acting in one org, with the role memberships gives them there. */
export interface Caller {
  id: number;
  email: string;
  role: Role;
}

/** The audit log's actor string for a console user. */
export const actorOf = (caller: { id: number }) => `user:${caller.id}`;

/** A 422 problem for one field, for rules a schema cannot state (they depend on the database or on each other). */
export const invalidField = (pointer: string, message: string) =>
  new ApiError("validation-failed", `${pointer}: ${message}`, { errors: [{ pointer, message }] });

export const HOUR_MS = 3_600_000;
export const DAY_MS = 24 * HOUR_MS;
