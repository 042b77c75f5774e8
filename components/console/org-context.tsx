"use client";

import Link from "next/link";
import { createContext, useContext, type ReactNode } from "react";
import { mayOpen, useOrg, type Section } from "@/lib/console-client/hooks";
import type { OrgSummary } from "@/lib/console-client/types";
import { Empty, LoadError, Loading, NotForRole } from "./states";

const OrgContext = createContext<OrgSummary | null>(null);

/** The org of the page, as /me reports it; only available under <OrgGate>. */
export function useCurrentOrg(): OrgSummary {
  const org = useContext(OrgContext);
  if (!org) throw new Error("useCurrentOrg outside <OrgGate>");
  return org;
}

/** Renders the org's pages once /me confirms the user is a member; otherwise says why not. */
export function OrgGate({ slug, children }: { slug: string; children: ReactNode }) {
  const { org, me } = useOrg(slug);
  if (me.isPending) return <Loading label="Loading the organisation" />;
  if (me.isError) return <LoadError error={me.error} onRetry={() => void me.refetch()} what="your organisations" />;
  if (!org) {
    return (
      <Empty title="No such organisation here" action={<Link href="/console">Back to the console</Link>}>
        <p>
          You are not a member of an organisation called <code className="pa-code">{slug}</code>, or it does not exist.
        </p>
      </Empty>
    );
  }
  return <OrgContext.Provider value={org}>{children}</OrgContext.Provider>;
}

/** A section's content for the roles that may open it; for the others, a note instead of a request the server would refuse. */
export function SectionGate({
  section,
  heading,
  deniedTitle,
  denied,
  children,
}: {
  section: Section;
  /** Shown above the note when the role may not open the section (the section draws its own otherwise). */
  heading?: ReactNode;
  deniedTitle: string;
  denied?: ReactNode;
  children: ReactNode;
}) {
  const org = useCurrentOrg();
  if (!mayOpen(section, org.role)) {
    return (
      <div className="flex flex-col gap-6">
        {heading}
        <NotForRole title={deniedTitle}>{denied}</NotForRole>
      </div>
    );
  }
  return <>{children}</>;
}
