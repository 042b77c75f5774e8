import type { ReactNode } from "react";

/** The heading of a console section: its name, one line on what it is for, and the section's main action. */
export function PageHeader({ title, lead, actions, eyebrow }: { title: string; lead?: ReactNode; actions?: ReactNode; eyebrow?: string }) {
  return (
    <header className="flex flex-col gap-3 border-b border-rule pb-5 sm:flex-row sm:items-end sm:justify-between">
      <div className="min-w-0">
        {eyebrow ? <p className="font-mono text-xs font-medium tracking-wide text-accent uppercase">{eyebrow}</p> : null}
        <h1 className="mt-1 text-2xl font-semibold tracking-tight sm:text-[1.75rem]">{title}</h1>
        {lead ? <p className="mt-1 max-w-3xl text-ink-2">{lead}</p> : null}
      </div>
      {actions ? <div className="flex shrink-0 flex-wrap gap-2">{actions}</div> : null}
    </header>
  );
}
