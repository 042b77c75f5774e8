import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { devMailboxEnabled } from "@/fakes/mailbox";
import { MailboxView } from "./mailbox-view";

export const metadata: Metadata = { title: "Development mailbox" };
// Whether the mailbox exists is the server's setting at request time, not at build time.
export const dynamic = "force-dynamic";

/** /console/dev/mailbox — what the fake SMTP server received; development and demo only. */
export default function DevMailboxPage() {
  if (!devMailboxEnabled()) notFound();
  return (
    <div className="mx-auto max-w-4xl px-5 pt-10 pb-16 sm:px-8 sm:pt-14">
      <p className="font-mono text-xs font-medium tracking-wide text-accent uppercase">Development</p>
      <h1 className="mt-3 text-3xl font-semibold tracking-tight">Mailbox</h1>
      <p className="mt-3 max-w-2xl text-ink-2">
        On this server, outgoing mail goes to a local stand-in SMTP server instead of real inboxes. Every message it
        received is below, newest first, for every address, so anyone who can open this page can follow the links
        in them. It is off in production.
      </p>
      <MailboxView />
    </div>
  );
}
