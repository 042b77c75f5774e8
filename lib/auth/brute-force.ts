import { RateLimiterMemory, RateLimiterRes } from "rate-limiter-flexible";
import { ApiError } from "@/lib/api/errors";

/**
 * Limits on guessing and on mail sent on request, in rate-limiter-flexible's memory store (one
 * Node process serves the console, like the API; scale-out moves these to its Redis store).
 * Counters are keyed by address and by client IP, never by whether an account exists.
 */
const POLICIES = {
  // Password failures: per address and IP, per IP, and per address from anywhere (forged IPs
  // cannot lift that one; it never locks a person out, who can still sign in by e-mail link).
  "login:address+ip": { points: 5, duration: 15 * 60 },
  "login:ip": { points: 50, duration: 60 * 60 },
  "login:address": { points: 30, duration: 60 * 60 },
  "signup:ip": { points: 10, duration: 60 * 60 },
  "reset:ip": { points: 10, duration: 60 * 60 },
  "reset:address": { points: 3, duration: 60 * 60 },
  "link:address": { points: 5, duration: 15 * 60 },
} as const;

export type Policy = keyof typeof POLICIES;

const state = globalThis as unknown as { __paritasAuthLimits?: Map<Policy, RateLimiterMemory> };

function limiter(policy: Policy): RateLimiterMemory {
  const all = (state.__paritasAuthLimits ??= new Map());
  let l = all.get(policy);
  if (!l) all.set(policy, (l = new RateLimiterMemory({ keyPrefix: policy, ...POLICIES[policy] })));
  return l;
}

/**
 * The client address. Next.js passes X-Forwarded-For on as received; behind a reverse proxy the
 * rightmost entry is the one the proxy saw. Without a proxy it can be forged, which is why one
 * of the password limits counts by address alone.
 */
export function clientIp(headers: Headers | Record<string, unknown>): string {
  const get = (name: string) => (headers instanceof Headers ? headers.get(name) : headers[name]);
  const forwarded = get("x-forwarded-for");
  const last = typeof forwarded === "string" ? forwarded.split(",").pop()?.trim() : undefined;
  const real = get("x-real-ip");
  return last || (typeof real === "string" && real) || "unknown";
}

const loginKeys = (address: string, ip: string): [Policy, string][] => [
  ["login:address+ip", `${address}|${ip}`],
  ["login:ip", ip],
  ["login:address", address],
];

/** Seconds until password sign-in for this address from this IP is allowed again after too many failures; 0 when it is now. */
export async function loginLockSeconds(address: string, ip: string): Promise<number> {
  let wait = 0;
  for (const [policy, key] of loginKeys(address, ip)) {
    const res = await limiter(policy).get(key);
    if (res && res.consumedPoints >= POLICIES[policy].points) wait = Math.max(wait, 1, Math.ceil(res.msBeforeNext / 1000));
  }
  return wait;
}

/** True when password sign-in for this address from this IP has failed too often lately. */
export const loginLocked = async (address: string, ip: string) => (await loginLockSeconds(address, ip)) > 0;

export async function recordLoginFailure(address: string, ip: string): Promise<void> {
  // Past the limit the attempt is refused; the failure has been counted all the same.
  for (const [policy, key] of loginKeys(address, ip)) await attempt(policy, key);
}

/** A right password clears the failures of that address from that IP (not the IP's or the address's totals). */
export async function clearLoginFailures(address: string, ip: string): Promise<void> {
  await limiter("login:address+ip").delete(`${address}|${ip}`);
}

/** Take one from the policy's budget for `key`: null when allowed, else the refusal (with the wait). */
async function attempt(policy: Policy, key: string): Promise<RateLimiterRes | null> {
  try {
    await limiter(policy).consume(key);
    return null;
  } catch (e) {
    if (e instanceof RateLimiterRes) return e;
    throw e;
  }
}

/** Take one from the policy's budget for `key`; false when it is used up. */
export const take = async (policy: Policy, key: string) => (await attempt(policy, key)) === null;

/** Take one from the policy's budget for `key`, or throw a 429 problem with Retry-After. */
export async function takeOrRefuse(policy: Policy, key: string): Promise<void> {
  const refused = await attempt(policy, key);
  if (!refused) return;
  const retry = String(Math.max(1, Math.ceil(refused.msBeforeNext / 1000)));
  throw new ApiError("rate-limited", `Too many attempts from here. Try again in ${retry} s.`, { headers: { "retry-after": retry } });
}

/** Forget all counters (tests). */
export function resetAuthLimits(): void {
  state.__paritasAuthLimits = undefined;
}
