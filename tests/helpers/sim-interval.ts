import binomialCdf from "@stdlib/stats-base-dists-binomial-cdf";

/** p where the decreasing function f(p) crosses `target`, by bisection on [0, 1]. */
function solve(f: (p: number) => number, target: number): number {
  let lo = 0;
  let hi = 1;
  for (let i = 0; i < 200; i++) {
    const mid = (lo + hi) / 2;
    if (f(mid) > target) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/**
 * Two-sided Clopper–Pearson interval for x successes in n trials at confidence `conf` (Clopper & Pearson
 * 1934): the p where P(X ≥ x) and P(X ≤ x) equal (1 − conf)/2, found by bisection on @stdlib's binomial cdf.
 */
export function clopperPearson(x: number, n: number, conf: number): [number, number] {
  const a = (1 - conf) / 2;
  const lower = x === 0 ? 0 : solve((p) => binomialCdf(x - 1, n, p), 1 - a);
  const upper = x === n ? 1 : solve((p) => binomialCdf(x, n, p), a);
  return [lower, upper];
}
