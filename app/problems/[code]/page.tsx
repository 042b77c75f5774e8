import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { problemTypes, type ProblemCode } from "@/lib/api/errors";
import { CodeBlock } from "@/components/code-block";
import { InlineCode } from "@/components/inline-code";
import { PageShell } from "@/components/site-chrome";

type Props = { params: Promise<{ code: string }> };

function isProblemCode(code: string): code is ProblemCode {
  return Object.hasOwn(problemTypes, code);
}

export function generateStaticParams(): { code: ProblemCode }[] {
  return (Object.keys(problemTypes) as ProblemCode[]).map((code) => ({ code }));
}

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const { code } = await params;
  if (!isProblemCode(code)) return { title: "Unknown problem type" };
  return {
    title: `${problemTypes[code].status} ${code}`,
    description: problemTypes[code].title,
  };
}

/** A sample body with the shape problemResponse() in lib/api/errors.ts produces. */
function exampleBody(code: ProblemCode): string {
  const p = problemTypes[code];
  const body: Record<string, unknown> = {
    type: `/problems/${code}`,
    title: p.title,
    status: p.status,
    detail: "A sentence about this particular request.",
    instance: "<request id>",
  };
  if (code === "validation-failed") {
    body.errors = [{ pointer: "/p", message: "Expected a probability between 0 and 1" }];
  }
  // The limit problems carry the `limit` member that problemResponse() adds for them.
  if (code === "work-limit") {
    body.detail = "Decoding 64 words (t = 4000 over n = 65535) would need 1.06e11 work units; one call allows 4.29e9. This code allows at most 1 word per call; split the batch.";
    body.errors = [{ pointer: "/words", message: body.detail }];
    body.limit = { quantity: "Decoding 64 words (t = 4000 over n = 65535)", requested: 106_000_000_000, allowed: 2 ** 32, unit: "work units" };
  }
  if (code === "deadline-exceeded") body.limit = { quantity: "time", allowed: 15000, unit: "ms" };
  if (code === "memory-limit") body.limit = { quantity: "memory", allowed: 512, unit: "MiB" };
  return JSON.stringify(body, null, 2);
}

export default async function ProblemPage({ params }: Props) {
  const { code } = await params;
  if (!isProblemCode(code)) notFound();
  const p = problemTypes[code];
  const others = (Object.keys(problemTypes) as ProblemCode[]).filter((c) => c !== code);

  return (
    <PageShell>
      <nav aria-label="Breadcrumb" className="text-sm text-ink-2">
        <ol className="flex flex-wrap items-center gap-1.5">
          <li>
            <Link href="/problems">Problem types</Link>
          </li>
          <li aria-hidden="true">/</li>
          <li aria-current="page" className="font-mono">
            {code}
          </li>
        </ol>
      </nav>

      <header className="mt-6 flex items-start gap-4">
        <span className="mt-1 shrink-0 rounded-md border border-rule bg-sunken px-2.5 py-1 font-mono text-lg font-medium tabular-nums">
          {p.status}
        </span>
        <div>
          <h1 className="text-2xl leading-snug font-semibold tracking-tight sm:text-3xl">{p.title}</h1>
          <p className="mt-1 font-mono text-sm break-all text-ink-2">type: /problems/{code}</p>
        </div>
      </header>

      <section aria-labelledby="fix-heading" className="mt-8">
        <h2 id="fix-heading" className="text-lg font-semibold">
          What to do
        </h2>
        <p className="mt-2 text-ink-2">
          <InlineCode text={p.help} />
        </p>
      </section>

      <section aria-labelledby="example-heading" className="mt-8">
        <h2 id="example-heading" className="text-lg font-semibold">
          What the response looks like
        </h2>
        <p className="mt-2 mb-4 text-ink-2">
          Status <span className="font-mono">{p.status}</span>, content type{" "}
          <code className="pa-code">application/problem+json</code>, and an{" "}
          <code className="pa-code">X-Request-Id</code> header equal to{" "}
          <code className="pa-code">instance</code>.
          {code === "validation-failed"
            ? " Each entry of errors names a field by JSON pointer (RFC 6901)."
            : ""}
        </p>
        <CodeBlock label="application/problem+json">{exampleBody(code)}</CodeBlock>
      </section>

      <section aria-labelledby="others-heading" className="mt-10 border-t border-rule pt-6">
        <h2 id="others-heading" className="text-sm font-semibold text-ink-2">
          Other problem types
        </h2>
        <ul className="mt-3 flex flex-wrap gap-2">
          {others.map((c) => (
            <li key={c}>
              <Link
                href={`/problems/${c}`}
                className="inline-block rounded border border-rule bg-surface px-2 py-1 font-mono text-xs text-ink no-underline hover:bg-sunken"
              >
                {problemTypes[c].status} {c}
              </Link>
            </li>
          ))}
        </ul>
      </section>
    </PageShell>
  );
}
