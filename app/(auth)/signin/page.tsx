import type { Metadata } from "next";
import Link from "next/link";
import { Intro } from "../intro";
import { SignInForms } from "./sign-in-forms";

export const metadata: Metadata = { title: "Sign in" };

type Search = Promise<Record<string, string | string[] | undefined>>;
const one = (v: string | string[] | undefined) => (Array.isArray(v) ? v[0] : v);

/** /signin — also next-auth's error page: it arrives here with ?error=<code>. */
export default async function SignInPage({ searchParams }: { searchParams: Search }) {
  const q = await searchParams;
  return (
    <>
      <Intro label="Console" title="Sign in to Paritas">
        Use your password, or have a one-time link sent to your inbox.
      </Intro>
      <SignInForms error={one(q.error)} callbackUrl={one(q.callbackUrl)} notice={one(q.notice)} />
      <p className="mt-6 text-sm text-ink-2">
        New here? <Link href="/signup">Create an account</Link>. An owner can then invite you to their organisation.
      </p>
    </>
  );
}
