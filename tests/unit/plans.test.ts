import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { chargeFor, formatMoney, periodOf, PLANS, projectUnits } from "@/lib/billing/plans";

/**
 * The catalogue's pure functions. Months are checked against the Gregorian calendar rule (30 days hath
 * September…, February 29 days in years divisible by 4 except centuries not divisible by 400); money against the
 * platform's ICU currency formatting (Intl.NumberFormat en-US, USD); charges and projections by hand from the
 * plan's own figures.
 */

const DAY = 86_400_000;

/** Days in month `m` (0-based) of year `y`, by the Gregorian rule. */
function daysIn(y: number, m: number): number {
  if (m === 1) return (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0 ? 29 : 28;
  return [3, 5, 8, 10].includes(m) ? 30 : 31;
}

describe("periodOf: the calendar month in UTC", () => {
  it("known months: a leap February, a century that is not leap, one that is, and December rolling over", () => {
    expect(periodOf(new Date("2024-02-29T23:59:59.999Z"))).toEqual({ start: new Date("2024-02-01T00:00:00Z"), end: new Date("2024-03-01T00:00:00Z") });
    expect(periodOf(new Date("2100-02-10T12:00:00Z")).end.getTime() - periodOf(new Date("2100-02-10T12:00:00Z")).start.getTime()).toBe(28 * DAY);
    expect(periodOf(new Date("2000-02-10T12:00:00Z")).end.getTime() - periodOf(new Date("2000-02-10T12:00:00Z")).start.getTime()).toBe(29 * DAY);
    expect(periodOf(new Date("2026-12-31T23:59:59.999Z"))).toEqual({ start: new Date("2026-12-01T00:00:00Z"), end: new Date("2027-01-01T00:00:00Z") });
    // The first instant of a month belongs to it, not to the month before.
    expect(periodOf(new Date("2027-01-01T00:00:00Z")).start).toEqual(new Date("2027-01-01T00:00:00Z"));
  });

  it("any instant lies in [start, end), start is the 1st at 00:00 UTC, and the length is the month's days", () => {
    fc.assert(
      fc.property(fc.date({ min: new Date("1970-01-01T00:00:00Z"), max: new Date("2400-12-31T23:59:59Z"), noInvalidDate: true }), (at) => {
        const { start, end } = periodOf(at);
        expect(start.getTime()).toBeLessThanOrEqual(at.getTime());
        expect(at.getTime()).toBeLessThan(end.getTime());
        expect(start.toISOString()).toBe(`${at.toISOString().slice(0, 7)}-01T00:00:00.000Z`);
        expect(end.getTime() - start.getTime()).toBe(daysIn(at.getUTCFullYear(), at.getUTCMonth()) * DAY);
      }),
    );
  });
});

describe("chargeFor: fee plus overage, in cents", () => {
  it("by hand from each plan's figures", () => {
    // Lantern: no fee and no overage price, whatever the usage.
    expect(chargeFor(PLANS.lantern, 7_000)).toEqual({ fee: 0, includedUnits: 5_000, overageUnits: 2_000, overage: 0, total: 0 });
    // Beacon at 45,000 units: $39 + 5,000 × 2 ¢ = 3,900 + 10,000 = 13,900 ¢.
    expect(chargeFor(PLANS.beacon, 45_000)).toEqual({ fee: 3_900, includedUnits: 40_000, overageUnits: 5_000, overage: 10_000, total: 13_900 });
    // Beacon exactly at its allowance, and one unit past it.
    expect(chargeFor(PLANS.beacon, 40_000).total).toBe(3_900);
    expect(chargeFor(PLANS.beacon, 40_001).total).toBe(3_902);
    // Lighthouse under its allowance: the fee only; one past it: 24,900 + 1.
    expect(chargeFor(PLANS.lighthouse, 12_345)).toEqual({ fee: 24_900, includedUnits: 12_345, overageUnits: 0, overage: 0, total: 24_900 });
    expect(chargeFor(PLANS.lighthouse, 400_001).total).toBe(24_901);
    expect(chargeFor(PLANS.beacon, 0)).toEqual({ fee: 3_900, includedUnits: 0, overageUnits: 0, overage: 0, total: 3_900 });
  });

  it("included + overage units = units, and total = fee + overage units × price, for any usage", () => {
    fc.assert(
      fc.property(fc.constantFrom(PLANS.lantern, PLANS.beacon, PLANS.lighthouse), fc.integer({ min: 0, max: 1e9 }), (plan, units) => {
        const c = chargeFor(plan, units);
        expect(c.includedUnits + c.overageUnits).toBe(units);
        expect(c.total).toBe(plan.monthlyFee + c.overageUnits * (plan.overagePerUnit ?? 0));
        expect(Number.isInteger(c.total)).toBe(true);
      }),
    );
  });
});

describe("projectUnits: the month's total at the rate so far", () => {
  const december = periodOf(new Date("2026-12-15T00:00:00Z"));

  it("by hand: December has 31 days", () => {
    // 9 days in with 900 units: 900 × 31 / 9 = 3,100.
    expect(projectUnits(900, december, new Date("2026-12-10T00:00:00Z"))).toBe(3_100);
    // 2 hours in with 1 unit: 1 × (31 × 24) / 2 = 372.
    expect(projectUnits(1, december, new Date("2026-12-01T02:00:00Z"))).toBe(372);
    // 3 days in with 10 units: 10 × 31 / 3 = 103.33… → 104 (rounded up).
    expect(projectUnits(10, december, new Date("2026-12-04T00:00:00Z"))).toBe(104);
  });

  it("under an hour in, and at or after the end, the projection is what was used", () => {
    expect(projectUnits(50, december, new Date("2026-12-01T00:59:59.999Z"))).toBe(50);
    expect(projectUnits(50, december, new Date("2027-01-01T00:00:00Z"))).toBe(50);
    expect(projectUnits(50, december, new Date("2027-02-01T00:00:00Z"))).toBe(50);
  });
});

describe("formatMoney: cents as dollars", () => {
  const icu = new Intl.NumberFormat("en-US", { style: "currency", currency: "USD" });

  it("known amounts", () => {
    expect(formatMoney(3_900)).toBe("$39.00");
    expect(formatMoney(2)).toBe("$0.02");
    expect(formatMoney(0)).toBe("$0.00");
    expect(formatMoney(123_456_789)).toBe("$1,234,567.89");
    expect(formatMoney(-105)).toBe("−$1.05");
  });

  it("agrees with ICU's en-US currency format for any amount (the minus sign written as U+2212)", () => {
    fc.assert(
      fc.property(fc.integer({ min: -1e13, max: 1e13 }), (cents) => {
        expect(formatMoney(cents)).toBe(icu.format(cents / 100).replace("-", "−"));
      }),
    );
  });
});
