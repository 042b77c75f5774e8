"use client";

import { useQuery } from "@tanstack/react-query";
import { Suspense, type ReactNode } from "react";
import { IconWarn } from "@/components/console/icons";
import { SectionGate, useCurrentOrg } from "@/components/console/org-context";
import { PageHeader } from "@/components/console/page-header";
import { LoadError, Loading } from "@/components/console/states";
import { panel } from "@/components/console/ui";
import { FREE_PLAN, formatMoney, isPaid, PLANS } from "@/lib/billing/plans";
import type { BillingOverview } from "@/lib/billing/views";
import { formatDay, formatInt } from "@/lib/console-client/format";
import { billingApi, billingKeys } from "./billing-api";
import { CheckoutNotice } from "./checkout-notice";
import { InvoicesTable } from "./invoices-table";
import { PlanChoices } from "./plan-choices";
import { PlanFacts } from "./plan-facts";
import { UsageMeter } from "./usage-meter";
import { cardWords, meterWords, periodDays, subscriptionWords, unitPriceWords } from "./words";

const day = (iso: string, short = false) => formatDay(iso.slice(0, 10), short);

function Section({ id, title, aside, children }: { id: string; title: string; aside?: ReactNode; children: ReactNode }) {
  return (
    <section aria-labelledby={id} className="flex min-w-0 flex-col gap-3">
      <h2 id={id} className="text-lg font-semibold">
        {title} {aside ? <span className="text-sm font-normal text-ink-2">{aside}</span> : null}
      </h2>
      {children}
    </section>
  );
}

/** The last invoice could not be paid: when the organisation falls back to the free plan, and what to do. */
function PaymentFailed({ o }: { o: BillingOverview }) {
  const free = PLANS[FREE_PLAN];
  return (
    <div role="alert" className="flex gap-3 rounded-lg border border-caution-rule border-l-[6px] bg-caution-bg px-5 py-4 text-caution-ink">
      <IconWarn className="mt-0.5 h-5 w-5 shrink-0" />
      <div className="flex flex-col gap-1">
        <p className="font-semibold">The last payment failed.</p>
        <p className="text-sm">
          {o.plan.name} stays in place {o.payment.graceUntil ? <>until {day(o.payment.graceUntil)}</> : "for a few days"}. If the invoice is still unpaid then, the
          organisation moves to {free.name}: {formatInt(free.includedUnits)} live units a month, calls refused past them, and smaller simulations.
        </p>
        <p className="text-sm">An owner or billing admin can put a working card on file by choosing a paid plan again through checkout under Change plan.</p>
      </div>
    </div>
  );
}

function CurrentPlan({ o }: { o: BillingOverview }) {
  const p = o.plan;
  return (
    <div className={`${panel} grid gap-5 p-4 md:grid-cols-[minmax(0,1fr)_minmax(0,1fr)]`}>
      <div className="flex flex-col gap-2">
        <p className="flex flex-wrap items-baseline gap-x-3">
          <span className="text-2xl font-semibold">{p.name}</span>
          <span className="text-ink-2">{isPaid(p) ? `${formatMoney(p.monthlyFee)} a month` : "free"}</span>
        </p>
        <p className="text-sm text-ink-2">{p.summary}</p>
        <dl className="mt-1 grid grid-cols-[minmax(0,auto)_minmax(0,1fr)] gap-x-4 gap-y-1 text-sm">
          <dt className="text-ink-2">Subscription</dt>
          <dd>{subscriptionWords(o.subscriptionStatus)}</dd>
          <dt className="text-ink-2">Payment method</dt>
          <dd>{cardWords(o.payment.card)}</dd>
        </dl>
      </div>
      <div>
        <h3 className="mb-1 text-xs font-medium tracking-wide text-ink-2 uppercase">Included</h3>
        <PlanFacts plan={p} />
      </div>
    </div>
  );
}

function ThisMonth({ o }: { o: BillingOverview }) {
  const { live, test, plan, projectedInvoice: inv } = o;
  const resets = day(o.period.end);
  const over = Math.max(0, live.used - live.allowance);
  const spent = live.stopsAtAllowance && live.used >= live.allowance;
  return (
    <div className={`${panel} flex flex-col gap-5 p-4`}>
      <div className="flex flex-col gap-2">
        <h3 className="font-medium">Live keys</h3>
        <UsageMeter
          label="Live units this month"
          used={live.used}
          allowance={live.allowance}
          projected={live.projected}
          words={meterWords(live.used, live.allowance, live.projected, day(o.period.end, true).replace(" ", "\u00a0"))}
        />
        {live.projected > live.used ? (
          <p className="flex items-center gap-2 text-xs text-ink-2">
            <span aria-hidden="true" className="inline-block h-3 w-5 rounded-sm border border-rule bg-[repeating-linear-gradient(135deg,var(--color-accent)_0_2px,transparent_2px_6px)] opacity-60" />
            hatched: the rest of the month at the rate so far
          </p>
        ) : null}
        {spent ? (
          <p className="rounded-md border border-caution-rule bg-caution-bg px-3 py-2 text-sm font-medium text-caution-ink">
            The allowance is used up: calls with live keys are refused until the period resets on {resets}.
          </p>
        ) : over > 0 && plan.overagePerUnit !== null ? (
          <p className="text-sm">
            <span className="font-medium">{formatInt(over)} units over the allowance</span> so far: {formatMoney(over * plan.overagePerUnit)} at {unitPriceWords(plan.overagePerUnit)}, added to this month&rsquo;s invoice.
          </p>
        ) : null}
      </div>

      <div className="flex flex-col gap-1 border-t border-rule pt-4">
        <h3 className="font-medium">Projected invoice</h3>
        <p className="text-2xl font-semibold tabular-nums">{formatMoney(inv.total)}</p>
        <p className="text-sm text-ink-2">
          {inv.overageUnits > 0
            ? `${formatMoney(inv.fee)} fee + ${formatMoney(inv.overage)} for ${formatInt(inv.overageUnits)} units of overage, if usage goes on at the rate so far.`
            : isPaid(plan)
              ? "The monthly fee; no overage at the rate so far."
              : "Nothing: the free plan has no fee and stops at its allowance."}
        </p>
      </div>

      <div className="flex flex-col gap-2 border-t border-rule pt-4">
        <h3 className="font-medium">Test keys</h3>
        <UsageMeter label="Test units this month" used={test.used} allowance={test.allowance} words={`${formatInt(test.used)} of ${formatInt(test.allowance)} test units used`} />
        <p className="text-sm text-ink-2">Test keys never draw on paid units: past their allowance their calls are refused until {resets}.</p>
      </div>
    </div>
  );
}

function Billing({ org }: { org: string }) {
  const overview = useQuery({ queryKey: billingKeys.overview(org), queryFn: ({ signal }) => billingApi.overview(org, signal) });
  if (overview.isPending) return <Loading label="Loading the plan and usage" rows={5} />;
  if (overview.isError) return <LoadError error={overview.error} onRetry={() => void overview.refetch()} what="the plan and usage" />;
  const o = overview.data;
  const period = periodDays(o.period.start, o.period.end);
  return (
    <div className="flex flex-col gap-8">
      {o.payment.state === "failed" ? <PaymentFailed o={o} /> : null}
      <Section id="billing-plan" title="Plan">
        <CurrentPlan o={o} />
      </Section>
      <Section id="billing-month" title="This month" aside={`(${formatDay(period.first, true)} – ${formatDay(period.last, true)}, UTC)`}>
        <ThisMonth o={o} />
      </Section>
      <Section id="billing-change" title="Change plan">
        <PlanChoices org={org} overview={o} />
      </Section>
      <Section id="billing-invoices" title="Invoices">
        {o.providerConfigured ? (
          <InvoicesTable org={org} />
        ) : (
          <p className="text-sm text-ink-2">Invoices need the billing provider, which this installation has not configured; there are none to show.</p>
        )}
      </Section>
    </div>
  );
}

/** /console/{org}/billing: the plan, this month's usage against it, plan changes and invoices; owners and billing admins only. */
export function BillingView() {
  const org = useCurrentOrg();
  const header = <PageHeader eyebrow="Billing" title="Plan and invoices" />;
  return (
    <SectionGate
      section="billing"
      heading={header}
      deniedTitle="Billing is open to owners and billing admins"
      denied={<p>Ask an owner of {org.name} about the plan or an invoice.</p>}
    >
      <div className="flex flex-col gap-6">
        <PageHeader
          eyebrow="Billing"
          title="Plan and invoices"
          lead="What the organisation pays for, how much of this month's allowance its keys have used, and the invoices. Months are calendar months in UTC."
        />
        <Suspense fallback={null}>
          <CheckoutNotice org={org.slug} />
        </Suspense>
        <Billing org={org.slug} />
      </div>
    </SectionGate>
  );
}
