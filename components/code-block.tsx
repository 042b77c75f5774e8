import type { ReactNode } from "react";

/** A dark, horizontally scrollable code panel with an optional caption (file name, language). */
export function CodeBlock({ label, children }: { label?: string; children: ReactNode }) {
  return (
    <figure className="overflow-hidden rounded-lg border border-rule bg-code-bg text-code-ink shadow-sm">
      {label ? (
        <figcaption className="flex items-center gap-2 border-b border-white/10 px-4 py-2 font-mono text-xs text-code-dim">
          <span aria-hidden="true" className="inline-block h-2 w-2 rounded-full bg-code-key" />
          {label}
        </figcaption>
      ) : null}
      <pre
        tabIndex={0}
        className="overflow-x-auto px-4 py-4 font-mono text-[0.8125rem] leading-relaxed sm:text-sm"
      >
        <code>{children}</code>
      </pre>
    </figure>
  );
}
