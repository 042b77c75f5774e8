import type { Metadata } from "next";
import Link from "next/link";
import { Intro } from "../intro";
import { SignUpForm } from "./sign-up-form";

export const metadata: Metadata = { title: "Create an account" };

export default function SignUpPage() {
  return (
    <>
      <Intro label="Console" title="Create an account">
        An account lets you sign in to the console. To use an organisation&apos;s keys and usage, one of its owners
        invites you; until then the console has no organisation to show.
      </Intro>
      <SignUpForm />
      <p className="mt-6 text-sm text-ink-2">
        Already have an account? <Link href="/signin">Sign in</Link>.
      </p>
    </>
  );
}
