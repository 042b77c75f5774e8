"use client";

import Link from "next/link";
import { useEffect, useRef, useState, type FormEvent } from "react";
import { AuthForm, Field, Submit } from "../fields";
import { Sheet } from "../intro";
import { looksLikeEmail, postJson } from "../post";

export function ResetRequestForm({ devMailbox }: { devMailbox: boolean }) {
  const [email, setEmail] = useState("");
  const [error, setError] = useState<string | undefined>();
  const [failure, setFailure] = useState<string | null>(null);
  const [sentTo, setSentTo] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const emailRef = useRef<HTMLInputElement>(null);
  const doneRef = useRef<HTMLHeadingElement>(null);

  useEffect(() => {
    if (sentTo) doneRef.current?.focus();
  }, [sentTo]);

  async function submit(e: FormEvent) {
    e.preventDefault();
    const address = email.trim();
    setFailure(null);
    if (!looksLikeEmail(address)) {
      setError("Enter the e-mail address of your account.");
      emailRef.current?.focus();
      return;
    }
    setError(undefined);
    setBusy(true);
    const out = await postJson("/api/console/auth/reset-request", { email: address });
    setBusy(false);
    if (out.ok) return setSentTo(address);
    if (out.fields.email) {
      setError(out.fields.email);
      emailRef.current?.focus();
    } else setFailure(out.detail);
  }

  if (sentTo) {
    return (
      <Sheet>
        <h2 ref={doneRef} tabIndex={-1} className="text-lg font-semibold focus:outline-none">
          Look for our message
        </h2>
        <p className="mt-2 text-ink-2">
          If <strong className="font-medium break-all text-ink">{sentTo}</strong> belongs to an account, a link to
          choose a new password is on its way. It works once, within one hour.
        </p>
        {devMailbox ? (
          <p className="mt-4 rounded-md border border-dashed border-rule bg-sunken px-3.5 py-2.5 text-sm text-ink-2">
            This server delivers mail to a local stand-in. Read it in the <Link href="/console/dev/mailbox">development mailbox</Link>.
          </p>
        ) : null}
        <button type="button" onClick={() => setSentTo(null)} className="mt-5 text-sm font-medium text-accent hover:underline">
          Use another address
        </button>
      </Sheet>
    );
  }

  return (
    <Sheet>
      <AuthForm onSubmit={submit} busy={busy} failure={failure}>
        <Field
          ref={emailRef}
          label="E-mail"
          type="email"
          name="email"
          autoComplete="email"
          inputMode="email"
          value={email}
          onChange={(e) => setEmail(e.target.value)}
          error={error}
          disabled={busy}
        />
        <div className="mt-5">
          <Submit busy={busy} busyLabel="Sending…">
            Mail me a reset link
          </Submit>
        </div>
      </AuthForm>
    </Sheet>
  );
}
