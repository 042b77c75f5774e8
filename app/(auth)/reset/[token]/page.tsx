import type { Metadata } from "next";
import Link from "next/link";
import { Intro } from "../../intro";
import { NewPasswordForm } from "./new-password-form";

// The token is in the address: never send it on to another site as a referrer.
export const metadata: Metadata = { title: "Choose a new password", referrer: "no-referrer" };

export default async function ResetConfirmPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  return (
    <>
      <Intro label="Password" title="Choose a new password">
        Pick a password of at least 10 characters. Once it is set, this link stops working.
      </Intro>
      <NewPasswordForm token={token} />
      <p className="mt-6 text-sm text-ink-2">
        Link no longer valid? <Link href="/reset">Ask for a new one</Link>.
      </p>
    </>
  );
}
