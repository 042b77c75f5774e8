import erfc from "@stdlib/math-base-special-erfc";
import { describe, expect, it } from "vitest";
import { InputError } from "@/lib/core/errors";
import { bisect, gaussLegendre, integrate, log1mexp } from "@/lib/core/numeric";

describe("bisect", () => {
  it("finds √2 as the root of x² − 2 (Math.SQRT2)", () => {
    expect(Math.abs(bisect((x) => x * x - 2, 0, 2, 1e-14, 200) - Math.SQRT2)).toBeLessThan(1e-14);
    // Decreasing functions too: the root of 1 − x³ is 1.
    expect(Math.abs(bisect((x) => 1 - x ** 3, -5, 7, 1e-13, 200) - 1)).toBeLessThan(1e-13);
  });

  it("returns an endpoint that is already a root, and refuses brackets without a sign change", () => {
    expect(bisect((x) => x, 0, 1, 1e-12, 100)).toBe(0);
    expect(() => bisect((x) => x * x + 1, -1, 1, 1e-12, 100)).toThrow(InputError);
    expect(() => bisect(() => Number.NaN, -1, 1, 1e-12, 100)).toThrow(InputError);
  });

  it("stops after maxIter", () => {
    let calls = 0;
    bisect(
      (x) => {
        calls++;
        return x - 0.3;
      },
      0,
      1,
      0,
      10,
    );
    expect(calls).toBe(12);
  });
});

describe("Gauss–Legendre nodes", () => {
  it("2 points are ±1/√3 with weights 1 (Abramowitz & Stegun, table 25.4)", () => {
    const { nodes, weights } = gaussLegendre(2);
    expect(nodes[0]).toBeCloseTo(-1 / Math.sqrt(3), 15);
    expect(nodes[1]).toBeCloseTo(1 / Math.sqrt(3), 15);
    expect(weights[0]).toBeCloseTo(1, 15);
    expect(weights[1]).toBeCloseTo(1, 15);
  });

  it("20 points integrate x^m exactly up to degree 39: ∫ x^m over [−1, 1] = 2/(m + 1) for even m", () => {
    const { nodes, weights } = gaussLegendre(20);
    for (let m = 0; m <= 39; m++) {
      let s = 0;
      for (let i = 0; i < 20; i++) s += weights[i]! * nodes[i]! ** m;
      const exact = m % 2 === 0 ? 2 / (m + 1) : 0;
      expect(Math.abs(s - exact)).toBeLessThan(1e-14);
    }
    // Degree 40 is the first the rule misses.
    let s40 = 0;
    for (let i = 0; i < 20; i++) s40 += weights[i]! * nodes[i]! ** 40;
    expect(Math.abs(s40 - 2 / 41)).toBeGreaterThan(1e-12);
  });
});

describe("integrate", () => {
  it("∫₀^π sin = 2 and ∫₀¹ eˣ = e − 1 (calculus)", () => {
    expect(Math.abs(integrate(Math.sin, 0, Math.PI).value - 2)).toBeLessThan(1e-14);
    expect(Math.abs(integrate(Math.exp, 0, 1).value - (Math.E - 1))).toBeLessThan(1e-14);
  });

  it("resolves a narrow peak: ∫₀¹ e^{−10⁶(x − 0.3)²} dx = √π/1000 · (1 − ½erfc(700) − ½erfc(300)) (@stdlib erfc)", () => {
    const exact = (Math.sqrt(Math.PI) / 1000) * (1 - 0.5 * erfc(700) - 0.5 * erfc(300));
    const r = integrate((x) => Math.exp(-1e6 * (x - 0.3) ** 2), 0, 1, { relTol: 1e-12 });
    expect(Math.abs(r.value - exact) / exact).toBeLessThan(1e-12);
    expect(r.absError).toBeLessThan(1e-11 * exact);
  });

  it("stops at maxPanels on an integrand it cannot resolve and reports a large error estimate", () => {
    // A jump at 1/3 never falls on a panel edge, so every split leaves a panel that straddles it.
    const r = integrate((x) => (x < 1 / 3 ? 0 : 1), 0, 1, { relTol: 1e-15, maxPanels: 8 });
    expect(Math.abs(r.value - 2 / 3)).toBeLessThan(0.05);
    expect(r.absError).toBeGreaterThan(1e-6);
  });
});

describe("log1mexp", () => {
  it("equals ln(1 − eˣ) where the direct form is safe, and keeps digits where it is not", () => {
    for (const x of [-0.1, -0.5, -1, -3, -20]) expect(Math.abs(log1mexp(x) - Math.log(1 - Math.exp(x)))).toBeLessThan(1e-14);
    // ln(1 − e^{−1e-20}) = ln(1e-20 − …) ≈ ln(1e-20); ln(1 − e^{−800}) ≈ −e^{−800} rounds to −0.
    expect(Math.abs(log1mexp(-1e-20) - Math.log(1e-20))).toBeLessThan(1e-13);
    expect(log1mexp(-800)).toBe(-0);
    expect(log1mexp(0)).toBe(-Infinity);
    expect(log1mexp(-Infinity) === 0).toBe(true);
  });
});
