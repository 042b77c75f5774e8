import expm1 from "@stdlib/math-base-special-expm1";
import log1p from "@stdlib/math-base-special-log1p";
import { InputError } from "./errors";

/** Bisection for a root of f in [lo, hi] where f(lo) and f(hi) differ in sign; stops when the bracket is narrower than tol (Burden & Faires, Numerical Analysis, §2.1). */
export function bisect(f: (x: number) => number, lo: number, hi: number, tol: number, maxIter: number): number {
  let flo = f(lo);
  const fhi = f(hi);
  if (flo === 0) return lo;
  if (fhi === 0) return hi;
  if (Math.sign(flo) === Math.sign(fhi) || Number.isNaN(flo) || Number.isNaN(fhi)) {
    throw new InputError(`no sign change of the function between ${lo} and ${hi}`);
  }
  for (let i = 0; i < maxIter && hi - lo > tol; i++) {
    const mid = lo + (hi - lo) / 2;
    const fmid = f(mid);
    if (fmid === 0) return mid;
    if (Math.sign(fmid) === Math.sign(flo)) {
      lo = mid;
      flo = fmid;
    } else {
      hi = mid;
    }
  }
  return lo + (hi - lo) / 2;
}

/** Nodes and weights of n-point Gauss–Legendre quadrature on [−1, 1], by Newton's method on the Legendre recurrence (Press et al., Numerical Recipes, 3rd ed., §4.6). */
export function gaussLegendre(n: number): { nodes: Float64Array; weights: Float64Array } {
  const nodes = new Float64Array(n);
  const weights = new Float64Array(n);
  for (let i = 0; i < Math.ceil(n / 2); i++) {
    // Tricomi's initial guess for the i-th root, then Newton to full precision.
    let x = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let dp = 0;
    for (let iter = 0; iter < 100; iter++) {
      let p0 = 1;
      let p1 = x;
      for (let j = 2; j <= n; j++) {
        const p2 = ((2 * j - 1) * x * p1 - (j - 1) * p0) / j;
        p0 = p1;
        p1 = p2;
      }
      dp = (n * (x * p1 - p0)) / (x * x - 1);
      const dx = p1 / dp;
      x -= dx;
      if (Math.abs(dx) < 1e-16) break;
    }
    const w = 2 / ((1 - x * x) * dp * dp);
    nodes[i] = -x;
    nodes[n - 1 - i] = x;
    weights[i] = w;
    weights[n - 1 - i] = w;
  }
  return { nodes, weights };
}

const GL = gaussLegendre(20);

function gl20(f: (x: number) => number, a: number, b: number): number {
  const half = (b - a) / 2;
  const mid = a + half;
  let s = 0;
  for (let i = 0; i < GL.nodes.length; i++) s += GL.weights[i]! * f(mid + half * GL.nodes[i]!);
  return s * half;
}

/** Adaptive Gauss–Legendre quadrature of f on [a, b]: a panel is split until its 20-point rule agrees with the sum over its halves within its share of the tolerance (Davis & Rabinowitz, Methods of Numerical Integration, 2nd ed., 1984). */
export function integrate(
  f: (x: number) => number,
  a: number,
  b: number,
  opts: { relTol?: number; absTol?: number; maxPanels?: number } = {},
): { value: number; absError: number } {
  const relTol = opts.relTol ?? 1e-13;
  const absTol = opts.absTol ?? 0;
  const maxPanels = opts.maxPanels ?? 4096;
  // A first pass sets the scale for the relative tolerance of every panel.
  const first = gl20(f, a, b);
  const tol = Math.max(absTol, relTol * Math.abs(first));
  let value = 0;
  let absError = 0;
  let panels = 1;
  const stack: { a: number; b: number; whole: number }[] = [{ a, b, whole: first }];
  while (stack.length > 0) {
    const panel = stack.pop()!;
    const m = panel.a + (panel.b - panel.a) / 2;
    const left = gl20(f, panel.a, m);
    const right = gl20(f, m, panel.b);
    const diff = Math.abs(left + right - panel.whole);
    const share = (tol * (panel.b - panel.a)) / (b - a);
    // Differences at rounding level cannot shrink by splitting further.
    const noise = 16 * Number.EPSILON * Math.abs(left + right);
    if (diff <= Math.max(share, noise) || panels >= maxPanels) {
      value += left + right;
      absError += diff;
    } else {
      panels++;
      stack.push({ a: m, b: panel.b, whole: right });
      stack.push({ a: panel.a, b: m, whole: left });
    }
  }
  return { value, absError };
}

/** ln(1 − eˣ) for x ≤ 0 without cancellation (Mächler 2012, "Accurately computing log(1 − exp(−|a|))"). */
export function log1mexp(x: number): number {
  return x > -Math.LN2 ? Math.log(-expm1(x)) : log1p(-Math.exp(x));
}
