"use client";

import { panel } from "@/components/console/ui";
import { columnGroups, positionsLegend, type DecodeLayout, type DecodedWord } from "@/lib/console-client/decode-rows";

/** Words drawn, and positions drawn over all of them, at most; the response panel below has everything. */
const MAX_WORDS = 64;
const MAX_POSITIONS = 4096;

const mark = "rounded-sm font-semibold underline decoration-2 underline-offset-2 outline outline-1 -outline-offset-1 outline-current";

function Row({ label, symbols, from, to, marked, erased }: { label: string; symbols: string[]; from: number; to: number; marked: Set<number>; erased?: Set<number> }) {
  const cells = [];
  for (let p = from; p < to; p++) {
    const s = symbols[p];
    const isErased = erased?.has(p);
    cells.push(
      <span key={p} data-position={p} data-corrected={marked.has(p) && s !== undefined ? "" : undefined} className={`text-center ${s !== undefined && marked.has(p) ? mark : ""}`}>
        {s === undefined ? "" : isErased ? "?" : s}
      </span>,
    );
  }
  return (
    <>
      <span className="pr-2 text-ink-2">{label}</span>
      {cells}
    </>
  );
}

function Columns({
  w,
  cellWidth,
  groups,
  marked,
  erased,
  className,
}: {
  w: DecodedWord;
  cellWidth: string;
  groups: { from: number; to: number }[];
  marked: Set<number>;
  erased: Set<number>;
  className: string;
}) {
  return (
    <div aria-hidden="true" className={`${className} flex-wrap gap-x-6 gap-y-3 font-mono text-[0.8125rem] leading-6`}>
      {groups.map(({ from, to }) => (
        <div key={from} className="grid" style={{ gridTemplateColumns: `max-content repeat(${to - from}, ${cellWidth})` }}>
          <span className="pr-2 text-[0.6875rem] text-ink-2">position</span>
          {Array.from({ length: to - from }, (_, i) => from + i).map((p) => (
            <span key={p} className={`text-center text-[0.6875rem] ${marked.has(p) ? "font-semibold text-ink underline decoration-2" : "text-ink-2"}`}>
              {p}
            </span>
          ))}
          {w.received ? <Row label="received" symbols={w.received} from={from} to={to} marked={marked} erased={erased} /> : null}
          <Row label="corrected" symbols={w.codeword} from={from} to={to} marked={marked} />
          <Row label="message" symbols={w.message} from={from} to={to} marked={new Set()} />
        </div>
      ))}
    </div>
  );
}

function Word({ w, cellWidth, groupSize }: { w: DecodedWord; cellWidth: string; groupSize: { narrow: number; wide: number } }) {
  const marked = new Set(w.corrected);
  const erased = new Set(w.erased);
  const n = w.codeword.length;
  const status = w.failure ? `decoder failure${w.reason ? `: ${w.reason}` : ""}` : w.corrected.length ? `${w.corrected.length} corrected` : "no corrections";
  const headingId = `decoded-word-${w.index}`;
  return (
    <div role="group" aria-labelledby={headingId} className="flex min-w-0 flex-col gap-2" data-decoded-word={w.index}>
      <h3 id={headingId} className="text-sm font-medium">
        <code className="font-mono">words[{w.index}]</code> <span className={w.failure ? "text-caution-ink" : "text-ink-2"}>· {status}</span>
      </h3>
      <p className="text-xs text-ink-2">
        <span data-legend="corrected">{positionsLegend("corrected", w.corrected)}</span>
        {w.erased.length ? <span> · {positionsLegend("erased", w.erased)} (shown as ?)</span> : null}
        {w.crc ? (
          <span>
            {" "}
            · CRC carried <code className="font-mono">{w.crc.received}</code>, computed <code className="font-mono">{w.crc.computed}</code>
          </span>
        ) : null}
        {!w.received ? <span> · the received word is in the request (it does not line up position by position)</span> : null}
      </p>
      {/* The same three words as text for screen readers; the grid below is for the eye. */}
      <p className="sr-only">
        {w.received ? `received ${w.received.join(" ")}; ` : ""}corrected codeword {w.codeword.join(" ")}; message {w.message.join(" ")}.
      </p>
      {/* Narrow screens get shorter groups, so that a group with its labels fits 390 px; only one of the two is shown. */}
      <Columns w={w} cellWidth={cellWidth} groups={columnGroups(n, groupSize.narrow)} marked={marked} erased={erased} className="flex sm:hidden" />
      <Columns w={w} cellWidth={cellWidth} groups={columnGroups(n, groupSize.wide)} marked={marked} erased={erased} className="hidden sm:flex" />
    </div>
  );
}

/** A /decode response read word by word: received, corrected and message side by side, corrected positions boxed and underlined and listed. */
export function DecodeView({ layout }: { layout: DecodeLayout }) {
  const widest = Math.max(1, ...layout.words.flatMap((w) => [...w.codeword, ...(w.received ?? [])].map((s) => s.length)));
  // Position numbers reach two or three digits: every column is wide enough for its number.
  const longest = Math.max(0, ...layout.words.map((w) => w.codeword.length));
  const digits = Math.max(widest, String(Math.max(0, longest - 1)).length);
  const cellWidth = `calc(${digits}ch + 0.375rem)`;
  // Up to three digits, 8 columns and their labels fit 390 px; wider symbols (GF(2^16)) take 4.
  const groupSize = digits <= 3 ? { narrow: 8, wide: 16 } : { narrow: 4, wide: 8 };
  const shown: DecodedWord[] = [];
  let positions = 0;
  for (const w of layout.words.slice(0, MAX_WORDS)) {
    positions += w.codeword.length;
    if (positions > MAX_POSITIONS) break;
    shown.push(w);
  }
  return (
    <section aria-labelledby="decoded-heading" className={`${panel} flex flex-col gap-4 p-4`}>
      <div>
        <h2 id="decoded-heading" className="text-sm font-medium">
          Decoded words{layout.name ? ` · ${layout.name}` : ""}
        </h2>
        <p className="mt-1 text-xs text-ink-2">
          One column per position, counted from 0. Corrected positions are boxed and underlined, and listed above each word; the message row counts its own positions from 0.
        </p>
      </div>
      {shown.map((w) => (
        <Word key={w.index} w={w} cellWidth={cellWidth} groupSize={groupSize} />
      ))}
      {layout.words.length > shown.length ? (
        <p className="text-xs text-ink-2">
          {shown.length ? `The first ${shown.length} of ${layout.words.length} words` : "The words are too long to lay out here"}; the response below has all of them.
        </p>
      ) : null}
    </section>
  );
}
