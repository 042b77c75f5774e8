import Link from "next/link";
import { Caution } from "@/components/caution";
import { CodeBlock } from "@/components/code-block";
import { isLive, LANDING_ENDPOINTS, LANDING_OUTCOMES, PLANNED_FAMILIES, SHIPPED_FAMILIES } from "./landing";

export default function Home() {
  return (
    <>
      {/* ---- Opening ---- */}
      <section aria-labelledby="intro-heading" className="pa-grid border-b border-rule">
        <div className="mx-auto grid max-w-6xl gap-12 px-5 pt-14 pb-16 sm:px-8 sm:pt-20 sm:pb-20 lg:grid-cols-[minmax(0,7fr)_minmax(0,5fr)] lg:items-center">
          <div>
            <p className="font-mono text-xs font-medium tracking-wide text-accent uppercase">
              REST API · versioned under /api/v1
            </p>
            <h1
              id="intro-heading"
              className="mt-4 max-w-3xl text-[2.125rem] leading-[1.15] font-semibold tracking-tight text-balance sm:text-5xl"
            >
              Channel-coding math, callable from your build.
            </h1>
            <p className="mt-6 max-w-2xl text-lg text-ink-2">
              Paritas is a hosted API for the arithmetic of error-correcting codes. Firmware, DSP and
              link engineers call it from CI to hold their encoders and decoders against a bit-exact
              reference and to compute error probabilities, bounds, channel capacity and the distance
              to the Shannon limit — without keeping a private pile of scripts in sync. Verdicts on
              error-rate claims, test planning and simulations are on the way.
            </p>
            <div className="mt-8 flex flex-col gap-3 sm:flex-row sm:items-center">
              <a
                href="/docs"
                className="inline-flex items-center justify-center rounded-md bg-accent px-5 py-2.5 font-medium text-accent-ink no-underline shadow-sm hover:brightness-110"
              >
                Open the API reference
              </a>
              <Link
                href="/console"
                className="inline-flex items-center justify-center gap-2 rounded-md border border-rule bg-surface px-5 py-2.5 font-medium text-ink no-underline hover:bg-sunken"
              >
                Sign in to the console
              </Link>
            </div>
          </div>
          <SyndromeFigure />
        </div>
      </section>

      {/* ---- Outcomes ---- */}
      <section aria-labelledby="outcomes-heading" className="mx-auto max-w-6xl px-5 pt-16 sm:px-8">
        <h2 id="outcomes-heading" className="text-2xl font-semibold tracking-tight">
          What a build can settle
        </h2>
        <p className="mt-2 max-w-2xl text-ink-2">
          Each check is one HTTP call, so it runs on every commit rather than once before a
          release. Anything random is seeded, and the seed comes back in the response: the same seed
          gives the same numbers on every machine.
        </p>
        <ul className="mt-8 grid gap-4 sm:grid-cols-2">
          {LANDING_OUTCOMES.map((o) => (
            <li key={o.title} className="flex flex-col rounded-lg border border-rule bg-surface p-5">
              <h3 className="flex items-baseline gap-2 text-lg font-semibold">
                <span aria-hidden="true" className="inline-block h-2.5 w-2.5 shrink-0 rounded-sm bg-brass" />
                {o.title}
              </h3>
              <p className="mt-2 flex-1 text-ink-2">{o.body}</p>
              <p className="mt-4 flex items-center gap-2">
                <code className="pa-code text-xs">{o.endpoint}</code>
                {isLive(o.endpoint) ? null : <Planned />}
              </p>
            </li>
          ))}
        </ul>
      </section>

      {/* ---- First request ---- */}
      <section
        aria-labelledby="first-request-heading"
        className="mx-auto mt-16 grid max-w-6xl gap-8 px-5 sm:px-8 lg:grid-cols-[minmax(0,5fr)_minmax(0,7fr)] lg:items-start"
      >
        <div>
          <h2 id="first-request-heading" className="text-2xl font-semibold tracking-tight">
            A first request
          </h2>
          <p className="mt-3 text-ink-2">
            Ask for the capacity of a binary symmetric channel that flips 11 % of its bits. The
            answer is close to half a bit per channel use, since{" "}
            <span className="whitespace-nowrap">1 − H₂(0.11) ≈ 0.50</span>.
          </p>
          <p className="mt-3 text-ink-2">
            Replace <code className="pa-code">&lt;key&gt;</code> with one of your API keys and{" "}
            <code className="pa-code">$PARITAS_URL</code> with the address of your Paritas host.
            Requests and responses are JSON. A failed call returns RFC 9457 problem details, and
            the <code className="pa-code">type</code> of each one links to a{" "}
            <Link href="/problems">page that explains it</Link>.
          </p>
        </div>
        <CodeBlock label="shell">
          <span className="text-code-dim"># BSC capacity at p = 0.11</span>
          {"\n"}
          curl -sS -X POST \{"\n"}
          {"  "}<span className="text-code-str">&quot;$PARITAS_URL/api/v1/capacity&quot;</span> \{"\n"}
          {"  "}-H <span className="text-code-str">&quot;Authorization: Bearer &lt;key&gt;&quot;</span> \{"\n"}
          {"  "}-H <span className="text-code-str">&quot;Content-Type: application/json&quot;</span> \{"\n"}
          {"  "}-d <span className="text-code-str">&apos;{"{"}</span>
          <span className="text-code-key">&quot;channel&quot;</span>
          <span className="text-code-str">:&quot;bsc&quot;,</span>
          <span className="text-code-key">&quot;p&quot;</span>
          <span className="text-code-str">:0.11{"}"}&apos;</span>
        </CodeBlock>
      </section>

      {/* ---- Endpoints ---- */}
      <section aria-labelledby="endpoints-heading" className="mx-auto mt-16 max-w-6xl px-5 sm:px-8">
        <div className="flex flex-wrap items-baseline justify-between gap-x-6 gap-y-2">
          <h2 id="endpoints-heading" className="text-2xl font-semibold tracking-tight">
            The endpoints, in one line each
          </h2>
          <a href="/docs" className="text-sm font-medium">
            Every field and example in the API reference →
          </a>
        </div>
        <div className="mt-6 overflow-hidden rounded-lg border border-rule bg-surface">
          <table className="block w-full border-collapse text-left text-sm sm:table">
            <caption className="sr-only">Paritas API endpoints under /api/v1</caption>
            <thead className="hidden bg-sunken text-ink-2 sm:table-header-group">
              <tr>
                <th scope="col" className="px-4 py-2.5 font-medium">
                  Endpoint
                </th>
                <th scope="col" className="px-4 py-2.5 font-medium">
                  Does
                </th>
              </tr>
            </thead>
            <tbody className="block sm:table-row-group">
              {LANDING_ENDPOINTS.map(([method, path, does]) => (
                <tr key={path} className="block border-rule align-top not-first:border-t sm:table-row sm:border-t">
                  <td className="block px-4 pt-3 font-mono text-[0.8125rem] whitespace-nowrap sm:table-cell sm:py-2.5">
                    <span className="text-ink-2">{method}</span> {path}
                    {isLive(`${method} ${path}`) ? null : (
                      <>
                        {" "}
                        <Planned />
                      </>
                    )}
                  </td>
                  <td className="block px-4 pt-0.5 pb-3 text-ink-2 sm:table-cell sm:py-2.5">{does}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        <p className="mt-3 text-sm text-ink-2">
          Code families: {SHIPPED_FAMILIES.join(", ")}. Planned: {PLANNED_FAMILIES.join(", ")}.
        </p>
      </section>

      {/* ---- Console ---- */}
      <section aria-labelledby="console-heading" className="mx-auto mt-16 max-w-6xl px-5 sm:px-8">
        <div className="rounded-lg border border-rule p-6 sm:p-8">
          <h2 id="console-heading" className="text-2xl font-semibold tracking-tight">
            The console
          </h2>
          <p className="mt-3 max-w-3xl text-ink-2">
            A form for every endpoint that shows the response, the request as curl and as a typed
            TypeScript call; API keys you create, rotate with an overlap and revoke; members, roles
            and invitations; usage by day, endpoint and key; and the audit trail.{" "}
            <a href="/signin">Sign in</a> to use it.
          </p>
        </div>
      </section>

      {/* ---- Caution ---- */}
      <section className="mx-auto mt-10 max-w-6xl px-5 sm:px-8">
        <Caution />
      </section>
    </>
  );
}

/*
 * Hamming (7,4) with p1 = d1^d2^d4, p2 = d1^d3^d4, p3 = d2^d3^d4.
 * Sent 1011|010; bit 2 flips; received 1111|010 gives syndrome (1,0,1) = the column of d2.
 */
const sent = [1, 0, 1, 1, 0, 1, 0] as const;
const flipped = 1; // zero-based index of the bit the channel flips
const received = sent.map((b, i) => (i === flipped ? 1 - b : b));

function BitRow({ label, bits, mark }: { label: string; bits: readonly number[]; mark?: number }) {
  return (
    <div className="flex items-center gap-3">
      <span className="w-20 shrink-0 text-right font-mono text-xs text-ink-2">{label}</span>
      <div className="flex gap-1">
        {bits.map((b, i) => (
          <span
            key={i}
            className={[
              "flex h-9 w-8 items-center justify-center rounded font-mono text-base",
              i === mark
                ? "border-2 border-dashed border-caution-rule bg-caution-bg text-caution-ink"
                : i < 4
                  ? "border border-rule bg-surface text-ink"
                  : "border border-brass/60 bg-brass/15 text-ink",
              i === 4 ? "ml-2" : "",
            ].join(" ")}
          >
            {b}
          </span>
        ))}
      </div>
    </div>
  );
}

function SyndromeFigure() {
  return (
    <figure className="hidden max-w-lg rounded-xl border border-rule bg-surface/85 p-6 shadow-sm md:block lg:max-w-none">
      <div aria-hidden="true" className="flex flex-col gap-2.5">
        <div className="flex gap-3">
          <span className="w-20 shrink-0" />
          <div className="flex gap-1 font-mono text-[0.6875rem] text-ink-2">
            <span className="w-[8.75rem]">data</span>
            <span className="ml-2">parity</span>
          </div>
        </div>
        <BitRow label="sent" bits={sent} />
        <BitRow label="received" bits={received} mark={flipped} />
        <div className="flex items-center gap-3 pt-1">
          <span className="w-20 shrink-0 text-right font-mono text-xs text-ink-2">syndrome</span>
          <span className="font-mono text-sm">
            <span className="rounded bg-sunken px-1.5 py-0.5">101</span>
            <span className="text-ink-2"> → bit 2 flipped, corrected</span>
          </span>
        </div>
      </div>
      <figcaption className="mt-5 border-t border-rule pt-4 text-sm text-ink-2">
        <span className="sr-only">
          Example: the codeword 1011 010 is sent, the channel flips bit 2, 1111 010 arrives, and
          the syndrome 101 points at bit 2.{" "}
        </span>
        Hamming (7,4): three parity bits locate any single flipped bit. The same decode runs
        behind <code className="pa-code text-xs">POST /decode</code>, for every code family.
      </figcaption>
    </figure>
  );
}

/** A marker for what the landing page describes but the API does not serve yet. */
function Planned() {
  return <span className="rounded-full border border-dashed border-rule px-2 py-px font-sans text-xs font-medium text-ink-2">planned</span>;
}
