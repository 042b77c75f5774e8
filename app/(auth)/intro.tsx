import type { ReactNode } from "react";

/** Heading block of an auth page: a small mono label, the title and one line of explanation. */
export function Intro({ label, title, children }: { label: string; title: string; children?: ReactNode }) {
  return (
    <header>
      <p className="font-mono text-xs font-medium tracking-wide text-accent uppercase">{label}</p>
      <h1 className="mt-3 text-3xl font-semibold tracking-tight">{title}</h1>
      {children ? <div className="mt-3 text-ink-2">{children}</div> : null}
    </header>
  );
}

/** The white sheet a form sits on. */
export function Sheet({ children, className = "" }: { children: ReactNode; className?: string }) {
  return <div className={`mt-8 rounded-lg border border-rule bg-surface p-5 shadow-sm sm:p-6 ${className}`}>{children}</div>;
}
