import type { ProblemBody } from "@/lib/console-client/problem";
import { InlineCode } from "@/components/inline-code";
import { dangerText } from "./ui";

/**
 * RFC 9457 problem details as a card: title and status, detail, each field error with its JSON
 * pointer, the request id and a link to the page that explains the problem type.
 */
export function ProblemView({ problem, compact = false }: { problem: ProblemBody; compact?: boolean }) {
  const typeLink = problem.type.startsWith("/problems/") ? problem.type : null;
  return (
    <div className="rounded-lg border border-[#a3261c]/50 border-l-[6px] border-l-[#a3261c] bg-surface px-4 py-3 dark:border-[#f08a7e]/50 dark:border-l-[#f08a7e]">
      <p className="flex flex-wrap items-baseline gap-x-2 font-semibold">
        {problem.status ? <span className={`font-mono text-sm ${dangerText}`}>{problem.status}</span> : null}
        <span>{problem.title}</span>
      </p>
      {problem.detail ? (
        <p className="mt-1 text-sm text-ink-2">
          <InlineCode text={problem.detail} />
        </p>
      ) : null}
      {problem.errors && problem.errors.length > 0 ? (
        <ul className="mt-2 flex flex-col gap-1 text-sm" aria-label="Field errors">
          {problem.errors.map((e, i) => (
            <li key={`${e.pointer}-${i}`} className="flex flex-wrap gap-x-2">
              <code className="pa-code text-xs">{e.pointer || "/"}</code>
              <span>
                <InlineCode text={e.message} />
              </span>
            </li>
          ))}
          {problem.omittedErrors ? (
            <li className="text-ink-2">
              …and {problem.omittedErrors.toLocaleString("en")} more {problem.omittedErrors === 1 ? "field error" : "field errors"} not listed; fix these and send again to see them.
            </li>
          ) : null}
        </ul>
      ) : null}
      {!compact && (problem.instance || typeLink) ? (
        <p className="mt-2 flex flex-wrap gap-x-4 text-xs text-ink-2">
          {problem.instance ? (
            <span>
              request <code className="font-mono">{problem.instance}</code>
            </span>
          ) : null}
          {typeLink ? <a href={typeLink}>About this problem</a> : null}
        </p>
      ) : null}
    </div>
  );
}
