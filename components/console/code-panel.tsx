import type { ReactNode } from "react";
import { CopyButton } from "./copy-button";

/** A dark code panel with a caption and a copy button (the site's CodeBlock, plus copying). */
export function CodePanel({ label, text, children, maxHeight }: { label: string; text: string; children?: ReactNode; maxHeight?: string }) {
  return (
    <figure className="overflow-hidden rounded-lg border border-rule bg-code-bg text-code-ink shadow-sm">
      <figcaption className="flex items-center justify-between gap-2 border-b border-white/10 py-1.5 pr-2 pl-4 font-mono text-xs text-code-dim">
        <span className="flex items-center gap-2">
          <span aria-hidden="true" className="inline-block h-2 w-2 rounded-full bg-code-key" />
          {label}
        </span>
        <CopyButton text={text} label={`Copy ${label}`} tone="dark" />
      </figcaption>
      {/* Scrollable, so it takes focus (keyboard scrolling); a focusable block needs a role that may carry its name. */}
      <pre
        tabIndex={0}
        role="region"
        aria-label={label}
        className="overflow-auto px-4 py-3 font-mono text-[0.8125rem] leading-relaxed"
        style={maxHeight ? { maxHeight } : undefined}
      >
        <code>{children ?? text}</code>
      </pre>
    </figure>
  );
}
