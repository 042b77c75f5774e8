import type { Metadata } from "next";
import Link from "next/link";
import { devMailboxEnabled } from "@/fakes/mailbox";
import { Intro } from "../intro";
import { ResetRequestForm } from "./reset-request-form";

export const metadata: Metadata = { title: "Reset your password" };
export const dynamic = "force-dynamic";

export default function ResetRequestPage() {
  return (
    <>
      <Intro label="Password" title="Reset your password">
        Give the address of your account and we mail you a link to choose a new password.
      </Intro>
      <ResetRequestForm devMailbox={devMailboxEnabled()} />
      <p className="mt-6 text-sm text-ink-2">
        Remembered it? <Link href="/signin">Back to sign-in</Link>.
      </p>
    </>
  );
}
