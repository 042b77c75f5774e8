import { ApiError } from "./objects";
import type { CardBehaviour, PaymentMethod } from "./state";

/**
 * The test cards, with the numbers and outcomes the provider documents for its test mode. Real card
 * numbers are taken straight by the payment-method endpoint here (there is no browser-side
 * tokenisation in a local stand-in); only brand, last four digits and expiry are kept.
 */
export const testCards: { number: string; behaviour: CardBehaviour; says: string }[] = [
  { number: "4242424242424242", behaviour: "ok", says: "always succeeds" },
  { number: "4000000000000002", behaviour: "declined", says: "always declined" },
  { number: "4000000000000341", behaviour: "declines_charges", says: "attaches, then every charge is declined" },
];

const cardList = testCards.map((c) => `${c.number} (${c.says})`).join(", ");

export const declined = () =>
  new ApiError(402, "card_error", "card_declined", "Your card was declined.", undefined, { decline_code: "generic_decline" });

/** Checks a card and tells how it will behave; the number itself goes no further. */
export function readCard(number: string, expMonth: number, expYear: number, cvc: string): { card: PaymentMethod["card"]; behaviour: CardBehaviour } {
  const digits = number.replace(/[\s-]/g, "");
  const known = testCards.find((c) => c.number === digits);
  if (!known) throw new ApiError(402, "card_error", "incorrect_number", `Only the test cards work here: ${cardList}.`, "card[number]");
  if (!(expMonth >= 1 && expMonth <= 12)) throw new ApiError(402, "card_error", "invalid_expiry_month", "The expiry month must be 1 to 12.", "card[exp_month]");
  const now = new Date();
  const year = expYear < 100 ? 2000 + expYear : expYear;
  if (year < now.getUTCFullYear() || (year === now.getUTCFullYear() && expMonth < now.getUTCMonth() + 1)) {
    throw new ApiError(402, "card_error", "invalid_expiry_year", "The card has expired.", "card[exp_year]");
  }
  if (!/^\d{3,4}$/.test(cvc)) throw new ApiError(402, "card_error", "invalid_cvc", "The CVC must be 3 or 4 digits.", "card[cvc]");
  return {
    card: { brand: digits.startsWith("4") ? "visa" : "mastercard", last4: digits.slice(-4), exp_month: expMonth, exp_year: year },
    behaviour: known.behaviour,
  };
}
