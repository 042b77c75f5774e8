"use client";

import { useMutation, useQueryClient } from "@tanstack/react-query";
import { usePathname, useRouter } from "next/navigation";
import { useState } from "react";
import { ConfirmDialog } from "@/components/console/confirm-dialog";
import { ProblemView } from "@/components/console/problem-view";
import { buttonPrimary, buttonSecondary, panel } from "@/components/console/ui";
import { formatMoney, isPaid, type PlanId } from "@/lib/billing/plans";
import type { BillingOverview, PlanView } from "@/lib/billing/views";
import { formatDay, formatInt } from "@/lib/console-client/format";
import { toProblem } from "@/lib/console-client/problem";
import { billingApi, billingKeys } from "./billing-api";
import { PlanFacts, PowerBits } from "./plan-facts";
import { rememberCheckout } from "./checkout-notice";

/** What moving to the free plan changes, said before it happens. */
function DowngradeConfirmation({ org, overview, to, open, onClose }: { org: string; overview: BillingOverview; to: PlanView; open: boolean; onClose: () => void }) {
  const qc = useQueryClient();
  const router = useRouter();
  const pathname = usePathname();
  const from = overview.plan;
  const overageUnits = Math.max(0, overview.live.used - from.includedUnits);
  const overage = overageUnits * (from.overagePerUnit ?? 0);
  const resets = formatDay(overview.period.end.slice(0, 10));
  return (
    <ConfirmDialog
      open={open}
      onClose={onClose}
      title={`Move to ${to.name}?`}
      confirmLabel={`Move to ${to.name}`}
      pendingLabel="Moving…"
      onConfirm={async () => {
        const next = await billingApi.downgrade(org);
        qc.setQueryData(billingKeys.overview(org), next);
        await qc.invalidateQueries({ queryKey: billingKeys.all(org) });
        // A notice about an earlier checkout no longer describes the plan.
        router.replace(pathname, { scroll: false });
      }}
    >
      <p>
        {from.name}&rsquo;s subscription ends now and {to.name} takes over at once:
      </p>
      <ul className="mt-2 flex list-disc flex-col gap-1 pl-5">
        <li>
          The monthly allowance becomes {formatInt(to.includedUnits)} live units (from {formatInt(from.includedUnits)}) and {formatInt(to.testUnits)} test units.
        </li>
        <li>Calls stop at the allowance: past it, live keys are refused until the month ends instead of being billed for overage.</li>
        {overview.live.used >= to.includedUnits ? (
          <li className="font-medium">
            This month&rsquo;s {formatInt(overview.live.used)} live units are already past {to.name}&rsquo;s allowance, so live keys are refused until {resets}.
          </li>
        ) : null}
        <li>
          Simulations: at most <PowerBits bits={to.maxBitsPerJob} /> per job and {to.maxActiveJobs} job{to.maxActiveJobs === 1 ? "" : "s"} queued or running at once.
        </li>
        <li>
          {overageUnits > 0
            ? `The overage so far this month, ${formatInt(overageUnits)} units (${formatMoney(overage)}), is invoiced now.`
            : "Overage so far this month is invoiced now; there is none."}
        </li>
      </ul>
      <p className="mt-3 text-ink-2">You can move back to a paid plan at any time through checkout.</p>
    </ConfirmDialog>
  );
}

/** The catalogue as cards, the current plan marked; a paid plan goes through checkout, the free one through a confirmation. */
export function PlanChoices({ org, overview }: { org: string; overview: BillingOverview }) {
  const [downgradeTo, setDowngradeTo] = useState<PlanView | null>(null);
  const checkout = useMutation({
    mutationFn: (plan: Exclude<PlanId, "lantern">) => billingApi.checkout(org, plan),
    onSuccess: ({ url }, plan) => {
      rememberCheckout(org, { from: overview.plan.id, to: plan });
      window.location.href = url;
    },
  });
  const current = overview.plan.id;
  const canChange = overview.providerConfigured;

  return (
    <div className="flex flex-col gap-3">
      {!canChange ? (
        <p className="text-sm text-ink-2">Plan changes need the billing provider, which this installation has not configured. The plans below are for comparison.</p>
      ) : null}
      <ul className="grid gap-3 md:grid-cols-3">
        {overview.plans.map((p) => {
          const isCurrent = p.id === current;
          const busy = checkout.isPending && checkout.variables === p.id;
          return (
            <li key={p.id} className={`${panel} flex flex-col gap-3 p-4 ${isCurrent ? "border-accent ring-1 ring-accent" : ""}`} aria-current={isCurrent ? "true" : undefined}>
              <div className="flex flex-wrap items-baseline justify-between gap-2">
                <h3 className="text-lg font-semibold">{p.name}</h3>
                {isCurrent ? <span className="rounded-full bg-accent px-2 py-px text-xs font-medium text-accent-ink">current plan</span> : null}
              </div>
              <p className="text-2xl font-semibold tabular-nums">
                {isPaid(p) ? formatMoney(p.monthlyFee) : "Free"}
                {isPaid(p) ? <span className="text-sm font-normal text-ink-2"> a month</span> : null}
              </p>
              <p className="text-sm text-ink-2">{p.summary}</p>
              <PlanFacts plan={p} compact />
              {canChange && !isCurrent ? (
                <div className="mt-auto pt-1">
                  <button
                    type="button"
                    className={isPaid(p) ? buttonPrimary : buttonSecondary}
                    disabled={checkout.isPending}
                    onClick={() => (isPaid(p) ? checkout.mutate(p.id as Exclude<PlanId, "lantern">) : setDowngradeTo(p))}
                  >
                    {busy ? "Opening checkout…" : `Move to ${p.name}`}
                  </button>
                </div>
              ) : null}
            </li>
          );
        })}
      </ul>
      {canChange ? <p className="text-sm text-ink-2">A paid plan opens the billing provider&rsquo;s payment page; your plan changes once the payment is confirmed.</p> : null}
      {checkout.isError ? (
        <div role="alert">
          <ProblemView problem={toProblem(checkout.error)} compact />
        </div>
      ) : null}
      {downgradeTo ? <DowngradeConfirmation org={org} overview={overview} to={downgradeTo} open onClose={() => setDowngradeTo(null)} /> : null}
    </div>
  );
}
