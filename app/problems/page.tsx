import type { Metadata } from "next";
import Link from "next/link";
import { problemTypes, type ProblemCode } from "@/lib/api/errors";
import { PageShell } from "@/components/site-chrome";

export const metadata: Metadata = {
  title: "Problem types",
  description: "Every RFC 9457 problem type the Paritas API answers with, and what to do about each.",
};

export default function ProblemsIndex() {
  const codes = Object.keys(problemTypes) as ProblemCode[];
  return (
    <PageShell>
      <p className="font-mono text-xs font-medium tracking-wide text-accent uppercase">Errors</p>
      <h1 className="mt-3 text-3xl font-semibold tracking-tight sm:text-4xl">Problem types</h1>
      <p className="mt-4 text-lg text-ink-2">
        When a request fails, the API answers with{" "}
        <code className="pa-code">application/problem+json</code> as described in RFC 9457. The
        body&apos;s <code className="pa-code">type</code> member is the path of one of the pages
        below; its <code className="pa-code">instance</code> is the request id to quote when you
        report a failure.
      </p>

      <div className="mt-8 overflow-hidden rounded-lg border border-rule bg-surface">
        <table className="w-full border-collapse text-left text-sm">
          <caption className="sr-only">Problem types, by HTTP status</caption>
          <thead className="bg-sunken text-ink-2">
            <tr>
              <th scope="col" className="w-20 px-4 py-2.5 font-medium">
                Status
              </th>
              <th scope="col" className="px-4 py-2.5 font-medium">
                Type and title
              </th>
            </tr>
          </thead>
          <tbody>
            {codes.map((code) => {
              const p = problemTypes[code];
              return (
                <tr key={code} className="border-t border-rule align-top">
                  <td className="px-4 py-3 font-mono tabular-nums text-ink-2">{p.status}</td>
                  <td className="px-4 py-3">
                    <Link href={`/problems/${code}`} className="font-mono text-[0.8125rem] font-medium">
                      /problems/{code}
                    </Link>
                    <span className="mt-0.5 block text-ink-2">{p.title}</span>
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
    </PageShell>
  );
}
