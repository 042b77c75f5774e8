import { RateLimiterMemory, RateLimiterRes } from "rate-limiter-flexible";
import { ApiError } from "./errors";

/**
 * Per-key request rate, with rate-limiter-flexible's memory store: the API is served by one
 * Node process, counters need not outlive a restart, and a store write per request in SQLite
 * would double the write load of metering. Scale-out replaces this with its Redis store.
 */
export const RATE_WINDOW_SECONDS = 60;
export const rateLimitPerWindow = () => Number(process.env.PARITAS_RATE_LIMIT_PER_MINUTE ?? 600);

const POLICY = "per-key";
const state = globalThis as unknown as { __paritasLimiter?: { points: number; limiter: RateLimiterMemory } };

function limiter(): RateLimiterMemory {
  const points = rateLimitPerWindow();
  if (!state.__paritasLimiter || state.__paritasLimiter.points !== points) {
    state.__paritasLimiter = { points, limiter: new RateLimiterMemory({ points, duration: RATE_WINDOW_SECONDS }) };
  }
  return state.__paritasLimiter.limiter;
}

/** RateLimit and RateLimit-Policy fields (IETF draft-ietf-httpapi-ratelimit-headers). */
function headers(res: RateLimiterRes, points: number): Record<string, string> {
  const reset = Math.max(0, Math.ceil(res.msBeforeNext / 1000));
  return {
    "ratelimit-policy": `"${POLICY}";q=${points};w=${RATE_WINDOW_SECONDS}`,
    ratelimit: `"${POLICY}";r=${Math.max(0, res.remainingPoints)};t=${reset}`,
  };
}

/** Take one request from the key's window; returns the headers to send, or throws a 429 problem. */
export async function consumeRate(keyId: number): Promise<Record<string, string>> {
  const points = rateLimitPerWindow();
  try {
    const res = await limiter().consume(String(keyId));
    return headers(res, points);
  } catch (rej) {
    if (!(rej instanceof RateLimiterRes)) throw rej;
    const h = headers(rej, points);
    const retry = String(Math.max(1, Math.ceil(rej.msBeforeNext / 1000)));
    throw new ApiError("rate-limited", `This key may make ${points} requests per ${RATE_WINDOW_SECONDS} s. Retry in ${retry} s.`, {
      headers: { ...h, "retry-after": retry },
    });
  }
}

/** Forget all counters (tests). */
export function resetRateLimits(): void {
  state.__paritasLimiter = undefined;
}
