import type { Metadata } from "next";
import Link from "next/link";
import { devMailboxEnabled } from "@/fakes/mailbox";
import { Intro, Sheet } from "../../intro";

export const metadata: Metadata = { title: "Check your inbox" };
// The development mailbox link depends on the server's settings at request time.
export const dynamic = "force-dynamic";

type Search = Promise<Record<string, string | string[] | undefined>>;
const one = (v: string | string[] | undefined) => (Array.isArray(v) ? v[0] : v);

/** Where next-auth (verifyRequest) and the sign-up page send people after a link has been mailed. */
export default async function CheckMailPage({ searchParams }: { searchParams: Search }) {
  const q = await searchParams;
  const to = one(q.to);
  const afterSignUp = one(q.from) === "signup";
  return (
    <>
      <Intro label={afterSignUp ? "Almost there" : "Link sent"} title="Check your inbox">
        {to ? (
          <>
            A message is on its way to <strong className="font-medium break-all text-ink">{to}</strong>.
          </>
        ) : (
          "A message with your link is on its way."
        )}
      </Intro>
      <Sheet>
        <ol className="list-decimal space-y-2 pl-5 text-ink-2 marker:font-mono marker:text-accent">
          <li>Open the message from Paritas; it can take a minute, and may land among junk mail.</li>
          <li>Follow its link within 30 minutes. It works once, in any browser.</li>
          {afterSignUp ? (
            <li>The link confirms your address and signs you in. From then on your password works too.</li>
          ) : (
            <li>You are signed in and taken to the console.</li>
          )}
        </ol>
        {devMailboxEnabled() ? (
          <p className="mt-5 rounded-md border border-dashed border-rule bg-sunken px-3.5 py-2.5 text-sm text-ink-2">
            This server sends mail to a local stand-in, not to real inboxes. Read it in the{" "}
            <Link href="/console/dev/mailbox">development mailbox</Link>.
          </p>
        ) : null}
      </Sheet>
      <p className="mt-6 text-sm text-ink-2">
        Nothing arrived? <Link href="/signin">Ask for another link</Link>, or check the address for typing mistakes.
      </p>
    </>
  );
}
