import type { KeyMode, KeyState, Role } from "@/lib/console-client/types";

const STATE = {
  active: { label: "active", cls: "border-accent/40 bg-accent-soft text-accent", mark: "●" },
  expiring: { label: "expiring", cls: "border-caution-rule bg-caution-bg text-caution-ink", mark: "◐" },
  expired: { label: "expired", cls: "border-rule bg-sunken text-ink-2", mark: "○" },
  revoked: {
    label: "revoked",
    cls: "border-[#a3261c]/40 bg-[#f7e1dd] text-[#7a1d14] dark:border-[#f08a7e]/40 dark:bg-[#3a1714] dark:text-[#f5b4ab]",
    mark: "⊘",
  },
} as const satisfies Record<KeyState, { label: string; cls: string; mark: string }>;

const pill = "inline-flex items-center gap-1 rounded-full border px-2 py-px text-xs font-medium whitespace-nowrap";

/** A key's state: a word and a shape, never colour alone. */
export function KeyStateBadge({ state }: { state: KeyState }) {
  const s = STATE[state];
  return (
    <span className={`${pill} ${s.cls}`}>
      <span aria-hidden="true">{s.mark}</span>
      {s.label}
    </span>
  );
}

export function ModeBadge({ mode }: { mode: KeyMode }) {
  return mode === "live" ? (
    <span className={`${pill} border-brass bg-brass/20 font-mono text-ink`}>live</span>
  ) : (
    <span className={`${pill} border-dashed border-ink-2/60 font-mono text-ink-2`}>test</span>
  );
}

const ROLE_CLS: Record<Role, string> = {
  owner: "border-ink/30 bg-ink text-paper",
  developer: "border-accent/40 bg-accent-soft text-accent",
  billing: "border-brass/70 bg-brass/15 text-ink",
};

export function RoleBadge({ role }: { role: Role }) {
  return <span className={`${pill} ${ROLE_CLS[role]}`}>{role}</span>;
}
