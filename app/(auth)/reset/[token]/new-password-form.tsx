"use client";

import Link from "next/link";
import { useEffect, useRef, useState, type FormEvent } from "react";
import { AuthForm, PasswordField, Submit } from "../../fields";
import { Sheet } from "../../intro";
import { postJson } from "../../post";

export function NewPasswordForm({ token }: { token: string }) {
  const [password, setPassword] = useState("");
  const [repeat, setRepeat] = useState("");
  const [errors, setErrors] = useState<{ password?: string; repeat?: string }>({});
  const [failure, setFailure] = useState<{ text: string; expired: boolean } | null>(null);
  const [done, setDone] = useState(false);
  const [busy, setBusy] = useState(false);
  const passwordRef = useRef<HTMLInputElement>(null);
  const repeatRef = useRef<HTMLInputElement>(null);
  const doneRef = useRef<HTMLHeadingElement>(null);

  useEffect(() => {
    if (done) doneRef.current?.focus();
  }, [done]);

  async function submit(e: FormEvent) {
    e.preventDefault();
    setFailure(null);
    const local = {
      password: password.length >= 10 ? undefined : "Use at least 10 characters.",
      repeat: repeat === password ? undefined : "The two entries differ. Type the same password twice.",
    };
    setErrors(local);
    if (local.password) return passwordRef.current?.focus();
    if (local.repeat) return repeatRef.current?.focus();
    setBusy(true);
    const out = await postJson("/api/console/auth/reset-confirm", { token, password });
    setBusy(false);
    if (out.ok) return setDone(true);
    if (out.fields.password) {
      setErrors({ password: out.fields.password });
      return passwordRef.current?.focus();
    }
    setFailure({ text: out.detail, expired: out.status === 410 });
  }

  if (done) {
    return (
      <Sheet>
        <h2 ref={doneRef} tabIndex={-1} className="text-lg font-semibold focus:outline-none">
          New password set
        </h2>
        <p className="mt-2 text-ink-2">From now on, sign in with the password you just chose.</p>
        <Link
          href="/signin?notice=password-changed"
          className="mt-5 inline-flex w-full items-center justify-center rounded-md bg-accent px-4 py-2.5 font-medium text-accent-ink no-underline shadow-sm hover:brightness-110"
        >
          Go to sign-in
        </Link>
      </Sheet>
    );
  }

  return (
    <Sheet>
      <AuthForm
        onSubmit={submit}
        busy={busy}
        failure={
          failure ? (
            <>
              {failure.text} {failure.expired ? <Link href="/reset">Ask for a new link.</Link> : null}
            </>
          ) : null
        }
      >
        <PasswordField
          ref={passwordRef}
          label="New password"
          name="password"
          autoComplete="new-password"
          value={password}
          onChange={(e) => setPassword(e.target.value)}
          error={errors.password}
          disabled={busy}
          hint="At least 10 characters."
        />
        <PasswordField
          ref={repeatRef}
          className="mt-4"
          label="The same again"
          name="repeat"
          autoComplete="new-password"
          value={repeat}
          onChange={(e) => setRepeat(e.target.value)}
          error={errors.repeat}
          disabled={busy}
        />
        <div className="mt-6">
          <Submit busy={busy} busyLabel="Saving…">
            Set new password
          </Submit>
        </div>
      </AuthForm>
    </Sheet>
  );
}
