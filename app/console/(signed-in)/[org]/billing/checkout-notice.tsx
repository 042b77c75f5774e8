"use client";

import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useSearchParams } from "next/navigation";
import { useEffect, useState } from "react";
import { isPaid, type PlanId } from "@/lib/billing/plans";
import { IconCheck } from "@/components/console/icons";
import { billingApi, billingKeys } from "./billing-api";

/** How long the page waits for the provider's confirmation after a checkout, polling once a second. */
const CONFIRM_WAIT_MS = 20_000;
const storageKey = (org: string) => `paritas.checkout.${org}`;

interface PendingCheckout {
  from: PlanId;
  to: PlanId;
}

/** Remembered across the trip to the payment page, so the return knows which plan to wait for. */
export function rememberCheckout(org: string, c: PendingCheckout) {
  try {
    sessionStorage.setItem(storageKey(org), JSON.stringify(c));
  } catch {
    // Storage refused (private mode): the return then waits for any paid plan instead.
  }
}

function forget(org: string) {
  try {
    sessionStorage.removeItem(storageKey(org));
  } catch {
    // Nothing was stored.
  }
}

function recalled(org: string): PendingCheckout | null {
  try {
    const raw = sessionStorage.getItem(storageKey(org));
    return raw ? (JSON.parse(raw) as PendingCheckout) : null;
  } catch {
    return null;
  }
}

const note = "flex items-start gap-3 rounded-lg border border-l-[6px] px-4 py-3";

/** After the payment page: what happened, and for a payment, the wait until the provider confirms the new plan. */
function CheckoutDone({ org }: { org: string }) {
  const qc = useQueryClient();
  const [expected] = useState(() => recalled(org));
  const [timedOut, setTimedOut] = useState(false);
  // The plan the confirmation named: kept once seen, so a later change on this page does not restart the wait.
  const [confirmed, setConfirmed] = useState<string | null>(null);
  const overview = useQuery({
    queryKey: billingKeys.overview(org),
    queryFn: ({ signal }) => billingApi.overview(org, signal),
    refetchInterval: confirmed || timedOut ? false : 1_000,
  });
  const plan = overview.data?.plan;
  const arrived = plan !== undefined && (expected ? plan.id === expected.to : isPaid(plan));

  useEffect(() => {
    const t = setTimeout(() => setTimedOut(true), CONFIRM_WAIT_MS);
    return () => clearTimeout(t);
  }, []);
  // Set while rendering (React's pattern for state derived from a change), not in an effect.
  if (arrived && confirmed === null) setConfirmed(plan.name);
  useEffect(() => {
    if (confirmed === null) return;
    forget(org);
    // The change of plan may have issued an invoice.
    void qc.invalidateQueries({ queryKey: billingKeys.all(org) });
  }, [confirmed, org, qc]);

  if (confirmed !== null) {
    return (
      <div role="status" className={`${note} border-accent/50 border-l-accent bg-accent-soft`}>
        <IconCheck className="mt-0.5 h-5 w-5 shrink-0 text-accent" />
        <p className="font-medium">You are now on {confirmed}.</p>
      </div>
    );
  }
  return (
    <div role="status" className={`${note} border-rule border-l-brass bg-surface`}>
      <div>
        <p className="font-medium">Payment accepted. Your plan changes as soon as the billing provider confirms it.</p>
        <p className="mt-1 text-sm text-ink-2">
          {timedOut ? "No confirmation has arrived yet. Reload this page in a minute; nothing more is needed from you." : "Checking for the confirmation…"}
        </p>
      </div>
    </div>
  );
}

function CheckoutCancelled({ org }: { org: string }) {
  useEffect(() => forget(org), [org]);
  return (
    <div role="status" className={`${note} border-rule border-l-ink-2 bg-surface`}>
      <p className="font-medium">Nothing was charged; your plan is unchanged.</p>
    </div>
  );
}

/** The notice the billing page shows on its return from the provider (?checkout=done or ?checkout=cancelled). */
export function CheckoutNotice({ org }: { org: string }) {
  const outcome = useSearchParams().get("checkout");
  if (outcome === "done") return <CheckoutDone org={org} />;
  if (outcome === "cancelled") return <CheckoutCancelled org={org} />;
  return null;
}
