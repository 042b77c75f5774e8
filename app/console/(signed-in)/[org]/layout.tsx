import type { ReactNode } from "react";
import { OrgGate } from "@/components/console/org-context";

export default async function OrgLayout({ children, params }: { children: ReactNode; params: Promise<{ org: string }> }) {
  const { org } = await params;
  return <OrgGate slug={org}>{children}</OrgGate>;
}
