import { createHash } from "node:crypto";
import { testCards } from "./cards";
import type { Price, Session, Store } from "./state";

/** The hosted payment page: plain HTML of our own, no script, a form that posts back to /pay/:id. */

const esc = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

/** Minor units as a decimal amount (two-decimal currencies, which is all the stand-in is used with). */
const money = (minor: number, currency: string) => `${(minor / 100).toFixed(2)} ${currency.toUpperCase()}`;

function describe(price: Price): string {
  if (price.billing_scheme === "tiered") {
    let below = 0;
    const parts = (price.tiers ?? []).map((t) => {
      const range = t.up_to === null ? `above ${below.toLocaleString("en-US")}` : `${(below + 1).toLocaleString("en-US")}–${t.up_to.toLocaleString("en-US")}`;
      below = t.up_to ?? below;
      return `units ${range}: ${t.unit_amount === 0 ? "included" : `${money(t.unit_amount, price.currency)} each`}`;
    });
    return `metered, billed at the end of the month — ${parts.join("; ")}`;
  }
  return `${money(price.unit_amount ?? 0, price.currency)} a month`;
}

const STYLE = `
body{font-family:system-ui,sans-serif;max-width:32rem;margin:2rem auto;padding:0 1rem;line-height:1.5;color:#1d2433}
label{display:block;margin-top:.75rem}input{font:inherit;padding:.35rem;width:100%;box-sizing:border-box}
button{font:inherit;margin-top:1rem;padding:.5rem 1.5rem}#payment-error{color:#a01818;border:1px solid #a01818;padding:.5rem}
.note{font-size:.9rem;color:#4a5468}
`;
const STYLE_HASH = createHash("sha256").update(STYLE).digest("base64");

/**
 * The payment pages' policy: nothing loads (no script at all), the one style block by hash, never framed. The
 * card form posts to this server, which answers a good card with a redirect to the merchant's success URL;
 * browsers hold that redirect to form-action too, so its origin is allowed beside 'self'.
 */
export function pageSecurityHeaders(session?: Session): Record<string, string> {
  const back = session ? ` ${new URL(session.success_url).origin}` : "";
  return {
    "content-security-policy": `default-src 'none'; style-src 'sha256-${STYLE_HASH}'; img-src 'self'; form-action 'self'${back}; base-uri 'none'; frame-ancestors 'none'`,
    "x-content-type-options": "nosniff",
    "referrer-policy": "no-referrer",
    "x-frame-options": "DENY",
  };
}

function shell(title: string, body: string): string {
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>${esc(title)}</title>
<style>${STYLE}</style></head><body>
<h1>Local billing stand-in — test payment</h1>
${body}
</body></html>`;
}

const back = (session: Session) => (session.cancel_url ? `<p><a id="back" href="${esc(session.cancel_url)}">Back</a></p>` : "");

export function paymentPage(store: Store, session: Session, error?: string): string {
  const items = session._line_items
    .map((it) => {
      const price = store.state.prices[it.price];
      if (!price) return "";
      const name = price.nickname ?? store.state.products[price.product]?.name ?? price.id;
      return `<li>${esc(name)}${it.quantity && it.quantity > 1 ? ` × ${it.quantity}` : ""}: ${esc(describe(price))}</li>`;
    })
    .join("\n");
  const cards = testCards.map((c) => `<li><code>${c.number}</code> — ${esc(c.says)}</li>`).join("\n");
  return shell(
    "Test payment",
    `<p class="note">No real money moves here: this page belongs to a local stand-in used in development and tests.</p>
<h2>You are subscribing to</h2>
<ul>${items}</ul>
${error ? `<p id="payment-error" role="alert">${esc(error)}</p>` : ""}
<form method="post" action="/pay/${esc(session.id)}">
<label for="card-number">Card number</label><input id="card-number" name="number" inputmode="numeric" autocomplete="off" required>
<label for="card-expiry">Expiry (MM/YY)</label><input id="card-expiry" name="expiry" placeholder="MM/YY" autocomplete="off" required>
<label for="card-cvc">CVC</label><input id="card-cvc" name="cvc" inputmode="numeric" autocomplete="off" required>
<button type="submit" id="pay" name="pay">Pay</button>
</form>
<h2>Test cards</h2>
<ul class="note">${cards}</ul>
<p class="note">Any future expiry date and any three digits for the CVC.</p>
${back(session)}`,
  );
}

export function closedPage(session: Session): string {
  const why = session.status === "complete" ? "This payment has already been completed." : "This payment session has expired.";
  return shell("Payment closed", `<p id="session-closed">${why} Nothing more can be paid here.</p>\n${back(session)}`);
}

export const notFoundPage = () => shell("Not found", "<p>There is no payment session at this address.</p>");
