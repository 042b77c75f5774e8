import bcrypt from "bcryptjs";
import { z } from "zod";

/** Shortest password accepted; bcrypt ignores everything after 72 bytes, so longer ones are refused rather than silently cut. */
export const MIN_PASSWORD_LENGTH = 10;

export const passwordSchema = z
  .string()
  .min(MIN_PASSWORD_LENGTH, `Use at least ${MIN_PASSWORD_LENGTH} characters.`)
  .refine((p) => !bcrypt.truncates(p), "Use at most 72 bytes; longer passwords would be cut short.");

/** bcrypt cost: 10 in production; tests may lower it with PARITAS_BCRYPT_COST to keep the suite fast. */
export function bcryptCost(): number {
  if (process.env.NODE_ENV === "production") return 10;
  const cost = Number(process.env.PARITAS_BCRYPT_COST ?? 10);
  return Number.isInteger(cost) && cost >= 4 && cost <= 15 ? cost : 10;
}

export const hashPassword = (password: string) => bcrypt.hash(password, bcryptCost());

// A hash of nothing anybody knows, compared against when there is no real hash, so unknown
// addresses take the same time as wrong passwords.
let dummy: Promise<string> | undefined;
const dummyHash = () => (dummy ??= bcrypt.hash("paritas: no such account", bcryptCost()));

/** True when `password` matches `hash`; a missing hash costs one comparison and is false. */
export async function verifyPassword(password: string, hash: string | null): Promise<boolean> {
  const matches = await bcrypt.compare(password, hash ?? (await dummyHash()));
  return hash !== null && matches;
}
