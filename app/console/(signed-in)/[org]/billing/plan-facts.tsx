import type { ReactNode } from "react";
import type { PlanView } from "@/lib/billing/views";
import { formatInt } from "@/lib/console-client/format";
import { countWords, powerOfTwo, unitPriceWords } from "./words";

/** 2^k bits, with the exponent as a superscript. */
export function PowerBits({ bits }: { bits: number }) {
  const k = powerOfTwo(bits);
  return k !== null ? (
    <span className="whitespace-nowrap">
      2<sup>{k}</sup> bits
    </span>
  ) : (
    <span>{formatInt(bits)} bits</span>
  );
}

/** What a plan includes: live and test allowances, what happens past the allowance, the simulation budget. */
export function PlanFacts({ plan, compact = false }: { plan: PlanView; compact?: boolean }) {
  const rows: [string, ReactNode][] = [
    ["Live units a month", formatInt(plan.includedUnits)],
    ["Past the allowance", plan.overagePerUnit === null ? "stops at the allowance" : `${unitPriceWords(plan.overagePerUnit)} beyond it`],
    ["Test units a month", formatInt(plan.testUnits)],
    [
      "Bits per simulation",
      <>
        <PowerBits bits={plan.maxBitsPerJob} /> <span className="text-ink-2">(about {countWords(plan.maxBitsPerJob)})</span>
      </>,
    ],
    ["Jobs at once", formatInt(plan.maxActiveJobs)],
  ];
  return (
    <dl className={`grid grid-cols-[minmax(0,auto)_minmax(0,1fr)] gap-x-4 gap-y-1 ${compact ? "text-sm" : ""}`}>
      {rows.map(([term, value]) => (
        <div key={term} className="contents">
          <dt className="text-ink-2">{term}</dt>
          <dd className="min-w-0 text-right sm:text-left">{value}</dd>
        </div>
      ))}
    </dl>
  );
}
