import { ApiError } from "./errors";

/**
 * Work: every math endpoint estimates, before doing anything, the elementary operations a request causes
 * (a table lookup, a GF(2^m) multiply, a 32-bit word of a bit vector, a limb of a big integer). The estimate
 * decides where the request runs and what it costs; the formulas sit beside each family and endpoint.
 * One work unit is calibrated to roughly a nanosecond of one core here (npm run bench prints the ratio).
 */
export const workLimits = {
  /** Up to this much work runs on the event loop (about a millisecond); more goes to the worker pool. */
  inline: 2 ** 20,
  /** More than this is refused before it starts (422 work-limit): a few seconds of one core. */
  max: 2 ** 32,
  /** One compute unit per started 2^22 work units (about 4 ms), at least one per call. */
  perUnit: 2 ** 22,
};

/** Compute units for an estimated amount of work: 1 per started `perUnit`, at least 1. */
export const unitsFor = (work: number): number => Math.max(1, Math.ceil(work / workLimits.perUnit));

const fmt = (v: number) => (v >= 1e6 ? v.toExponential(2).replace("e+", "e") : String(Math.round(v)));

/**
 * The work-limit problem: `quantity` needed `requested` (in `unit`) where one call allows `allowed`;
 * `advice` says how to ask for less (the nearest allowed request). `pointer` locates the field to change.
 */
export function refuse(quantity: string, requested: number, allowed: number, unit: string, advice: string, pointer?: string): ApiError {
  const detail = `${quantity} would need ${fmt(requested)} ${unit}; one call allows ${fmt(allowed)}. ${advice}`;
  return new ApiError("work-limit", detail, {
    limit: { quantity, requested, allowed, unit },
    ...(pointer !== undefined ? { errors: [{ pointer, message: detail }] } : {}),
  });
}

/** Throw the work-limit problem when `work` is beyond the per-call maximum. */
export function checkWork(work: number, advice: string): void {
  if (!(work <= workLimits.max)) throw refuse("The request's work", work, workLimits.max, "work units", advice);
}

/** The reference's paragraph on an endpoint's work rule and the cost it implies. */
export function describeWork(rule: string): string {
  return (
    `**Work and cost.** ${rule.charAt(0).toUpperCase()}${rule.slice(1)} A call estimated at up to 2^20 work units runs at once; a larger one runs on the worker pool with a deadline; ` +
    `one beyond 2^32 is refused (422 \`work-limit\`) before anything is computed, naming the quantity and the nearest allowed request. ` +
    `Cost: 1 compute unit per started 2^22 work units, at least 1 (\`X-Compute-Units\`).`
  );
}
