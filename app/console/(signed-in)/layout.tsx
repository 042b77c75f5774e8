import type { ReactNode } from "react";
import { ConsoleShell } from "@/components/console/shell";
import { SignInRedirect } from "@/components/console/sign-in-redirect";
import { pageSession } from "./session";

/**
 * Sign-in required for every console page (the dev mailbox lives outside this group on purpose:
 * it must work before anyone can sign in). Without a session nothing below renders; the visitor
 * goes to /signin?callbackUrl=<this page>. Every console route checks the session and role again.
 */
export default async function SignedInLayout({ children }: { children: ReactNode }) {
  const session = await pageSession();
  if (!session) return <SignInRedirect />;
  return <ConsoleShell>{children}</ConsoleShell>;
}
