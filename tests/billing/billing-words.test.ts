import { describe, expect, it } from "vitest";
import { cardWords, countWords, meterWords, percentUsed, periodDays, powerOfTwo, subscriptionWords, unitPriceWords } from "@/app/console/(signed-in)/[org]/billing/words";

// The console's billing page says its figures through these; the expected strings are worked by hand.
describe("billing page words", () => {
  it("states a simulation budget as a power of two and in words", () => {
    // 2^34 = 17,179,869,184; 2^40 = 1,099,511,627,776; 2^44 = 17,592,186,044,416 (to three significant figures).
    expect([2 ** 34, 2 ** 40, 2 ** 44].map((bits) => [powerOfTwo(bits), countWords(bits)])).toEqual([
      [34, "17.2 billion"],
      [40, "1.1 trillion"],
      [44, "17.6 trillion"],
    ]);
    expect(powerOfTwo(3 * 2 ** 20)).toBeNull();
    expect(powerOfTwo(0)).toBeNull();
    expect(powerOfTwo(1)).toBe(0);
  });

  it("describes the card on file", () => {
    expect(cardWords({ brand: "visa", last4: "4242", expMonth: 4, expYear: 2030 })).toBe("Visa ending 4242, expires 04/2030");
    expect(cardWords(null)).toBe("No card on file");
  });

  it("prices a unit in cents or dollars", () => {
    expect(unitPriceWords(2)).toBe("2¢ a unit");
    expect(unitPriceWords(150)).toBe("$1.50 a unit");
  });

  it("says units used and the projection, and leaves the projection out when it adds nothing", () => {
    expect(meterWords(12_400, 40_000, 31_000, "1 Jan")).toBe("12,400 of 40,000 units used; at this rate 31,000 by 1 Jan");
    expect(meterWords(2_000, 2_000, 2_000, "1 Jan")).toBe("2,000 of 2,000 units used");
  });

  it("floors the share used, so 100 % means the allowance is spent", () => {
    expect(percentUsed(1_999, 2_000)).toBe(99);
    expect(percentUsed(2_000, 2_000)).toBe(100);
    expect(percentUsed(12_400, 40_000)).toBe(31);
  });

  it("reads the provider's subscription states", () => {
    expect(subscriptionWords("past_due")).toBe("payment overdue");
    expect(subscriptionWords(null)).toBe("none (free plan)");
    expect(subscriptionWords("some_new_state")).toBe("some new state");
  });

  it("turns an exclusive period end into the period's last day", () => {
    expect(periodDays("2026-12-01T00:00:00.000Z", "2027-01-01T00:00:00.000Z")).toEqual({ first: "2026-12-01", last: "2026-12-31" });
    expect(periodDays("2028-02-01T00:00:00.000Z", "2028-03-01T00:00:00.000Z")).toEqual({ first: "2028-02-01", last: "2028-02-29" });
  });
});
