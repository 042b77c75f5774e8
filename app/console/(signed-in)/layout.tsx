import type { ReactNode } from "react";
import { ConsoleShell } from "@/components/console/shell";
import { redirect } from "next/navigation";
import { pageSession } from "./session";

/**
 * Sign-in required for every console page (the dev mailbox lives outside this group on purpose:
 * it must work before anyone can sign in). proxy.ts redirects a visitor without a session to
 * /signin?callbackUrl=<the page> before this runs; a session that ended in between still renders
 * nothing and goes to sign-in (a layout does not know the page's path, so back to the console's start).
 * Every console route checks the session and role again.
 */
export default async function SignedInLayout({ children }: { children: ReactNode }) {
  const session = await pageSession();
  if (!session) redirect("/signin?callbackUrl=%2Fconsole");
  return <ConsoleShell>{children}</ConsoleShell>;
}
