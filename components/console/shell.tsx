"use client";

import { signOut } from "next-auth/react";
import Link from "next/link";
import { useParams, usePathname, useRouter } from "next/navigation";
import { useId, useState, type ComponentType, type ReactNode } from "react";
import { Mark } from "@/components/mark";
import { mayOpen, useMe, type Section } from "@/lib/console-client/hooks";
import type { Role } from "@/lib/console-client/types";
import { RoleBadge } from "./badges";
import { IconBench, IconBilling, IconClaims, IconExit, IconKey, IconLedger, IconMenu, IconMeter, IconPeople, IconSimulations, IconSummary } from "./icons";
import { selectBase } from "./ui";
import { forgetBenchCredentials } from "@/lib/console-client/try-key";

interface NavItem {
  section: Section;
  /** Path segment below /console/{org}; "" for the summary. */
  segment: string;
  label: string;
  hint: string;
  Icon: ComponentType<{ className?: string }>;
}

/** The console's sections, in the order a new organisation needs them. */
export const NAV: NavItem[] = [
  { section: "overview", segment: "", label: "Summary", hint: "plan, this month, shortcuts", Icon: IconSummary },
  { section: "try", segment: "try", label: "Bench", hint: "run any endpoint", Icon: IconBench },
  { section: "claims", segment: "claims", label: "Claims", hint: "verdicts by firmware label", Icon: IconClaims },
  { section: "simulations", segment: "simulations", label: "Simulations", hint: "error-rate curves, run as jobs", Icon: IconSimulations },
  { section: "keys", segment: "keys", label: "Keys", hint: "create, rotate, revoke", Icon: IconKey },
  { section: "usage", segment: "usage", label: "Meter", hint: "units by day, endpoint, key", Icon: IconMeter },
  { section: "billing", segment: "billing", label: "Billing", hint: "plan, invoices, payment", Icon: IconBilling },
  { section: "members", segment: "members", label: "People", hint: "members, roles, invitations", Icon: IconPeople },
  { section: "audit", segment: "audit", label: "Ledger", hint: "who changed what", Icon: IconLedger },
];

export const sectionsFor = (role: Role | undefined) => NAV.filter((n) => mayOpen(n.section, role));

function currentSegment(pathname: string, org: string | undefined): string {
  if (!org) return "";
  const prefix = `/console/${org}`;
  if (!pathname.startsWith(prefix)) return "";
  return pathname.slice(prefix.length).split("/").filter(Boolean)[0] ?? "";
}

function OrgSwitcher({ current }: { current: string | undefined }) {
  const me = useMe();
  const router = useRouter();
  const pathname = usePathname();
  const id = useId();
  const orgs = me.data?.orgs ?? [];
  if (me.isPending) return <p className="text-sm text-ink-2">Loading organisations…</p>;
  if (orgs.length === 0) return <p className="text-sm text-ink-2">No organisation yet</p>;
  const known = orgs.some((o) => o.slug === current);

  function go(slug: string) {
    const target = orgs.find((o) => o.slug === slug);
    if (!target) return;
    // Stay in the same section when the role there allows it; otherwise land on the summary.
    const seg = currentSegment(pathname, current);
    const item = NAV.find((n) => n.segment === seg);
    const keep = item && mayOpen(item.section, target.role) ? seg : "";
    router.push(`/console/${slug}${keep ? `/${keep}` : ""}`);
  }

  return (
    <div>
      <label htmlFor={id} className="block text-xs font-medium tracking-wide text-ink-2 uppercase">
        Organisation
      </label>
      <select id={id} className={`${selectBase} mt-1 font-medium`} value={known ? current : ""} onChange={(e) => go(e.target.value)}>
        {!known ? (
          <option value="" disabled>
            Choose…
          </option>
        ) : null}
        {orgs.map((o) => (
          <option key={o.slug} value={o.slug}>
            {o.name}
          </option>
        ))}
      </select>
    </div>
  );
}

function Account() {
  const me = useMe();
  const [leaving, setLeaving] = useState(false);
  return (
    <div className="flex flex-col gap-2 border-t border-rule pt-4 text-sm">
      <p className="min-w-0">
        <span className="block text-xs text-ink-2">Signed in as</span>
        <span className="block truncate font-medium" title={me.data?.user.email}>
          {me.data ? (me.data.user.name ?? me.data.user.email) : "…"}
        </span>
        {me.data?.user.name ? <span className="block truncate text-xs text-ink-2">{me.data.user.email}</span> : null}
      </p>
      <button
        type="button"
        className="inline-flex w-fit items-center gap-2 rounded-md px-2 py-1.5 text-ink-2 hover:bg-sunken hover:text-ink disabled:opacity-60"
        disabled={leaving}
        onClick={() => {
          setLeaving(true);
          forgetBenchCredentials();
          void signOut({ callbackUrl: "/signin" });
        }}
      >
        <IconExit className="h-4 w-4" />
        {leaving ? "Signing out…" : "Sign out"}
      </button>
    </div>
  );
}

function SectionNav({ org, role, onNavigate }: { org: string; role: Role | undefined; onNavigate?: () => void }) {
  const pathname = usePathname();
  const seg = currentSegment(pathname, org);
  const items = sectionsFor(role);
  return (
    <ul className="flex flex-col gap-0.5">
      {items.map(({ segment, label, hint, Icon }) => {
        const active = seg === segment;
        return (
          <li key={label}>
            <Link
              href={`/console/${org}${segment ? `/${segment}` : ""}`}
              aria-current={active ? "page" : undefined}
              onClick={onNavigate}
              className={[
                "group relative flex items-center gap-3 rounded-md py-2 pr-2 pl-3 no-underline",
                active ? "bg-surface font-semibold text-ink shadow-sm" : "text-ink-2 hover:bg-surface/70 hover:text-ink",
              ].join(" ")}
            >
              <span aria-hidden="true" className={`absolute inset-y-1.5 left-0 w-1 rounded-full ${active ? "bg-brass" : "bg-transparent"}`} />
              <Icon className="h-5 w-5 shrink-0" />
              <span className="flex min-w-0 flex-col leading-tight">
                <span>{label}</span>
                <span className="truncate text-xs font-normal text-ink-2">{hint}</span>
              </span>
            </Link>
          </li>
        );
      })}
    </ul>
  );
}

/**
 * The signed-in frame: a rail with the organisation switcher, the sections the role may open and
 * the account; on narrow screens the rail folds into a bar with a sections button.
 */
export function ConsoleShell({ children }: { children: ReactNode }) {
  const params = useParams<{ org?: string }>();
  const org = typeof params.org === "string" ? params.org : undefined;
  const me = useMe();
  const role = me.data?.orgs.find((o) => o.slug === org)?.role;
  const [open, setOpen] = useState(false);
  const navId = useId();

  return (
    <div className="mx-auto w-full max-w-[90rem] px-4 pt-4 pb-10 sm:px-6 lg:grid lg:grid-cols-[16rem_minmax(0,1fr)] lg:gap-8 lg:pt-8">
      <aside aria-label="Console" className="mb-6 rounded-xl border border-rule bg-sunken/60 p-4 lg:sticky lg:top-6 lg:mb-0 lg:self-start">
        <div className="flex items-center justify-between gap-3">
          <Link href="/console" className="flex items-center gap-2 text-ink no-underline">
            <Mark className="h-3.5 w-auto" />
            <span className="font-semibold tracking-tight">Console</span>
          </Link>
          {role ? <RoleBadge role={role} /> : null}
        </div>
        <div className="mt-4">
          <OrgSwitcher current={org} />
        </div>
        {org && role ? (
          <nav aria-label="Console sections" className="mt-4">
            <button
              type="button"
              className="flex w-full items-center justify-between gap-2 rounded-md border border-ink-2/50 bg-surface px-3 py-2 text-sm font-medium lg:hidden"
              aria-expanded={open}
              aria-controls={navId}
              onClick={() => setOpen((v) => !v)}
            >
              <span className="flex items-center gap-2">
                <IconMenu className="h-4 w-4" />
                Sections
              </span>
              <span className="text-xs font-normal text-ink-2">{open ? "hide" : "show"}</span>
            </button>
            <div id={navId} className={`${open ? "mt-2 block" : "hidden"} lg:block`}>
              <SectionNav org={org} role={role} onNavigate={() => setOpen(false)} />
            </div>
          </nav>
        ) : null}
        <div className={`mt-4 ${open || !org || !role ? "block" : "hidden"} lg:block`}>
          <Account />
        </div>
      </aside>
      <div className="min-w-0">{children}</div>
    </div>
  );
}
