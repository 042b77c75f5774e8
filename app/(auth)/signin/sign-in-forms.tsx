"use client";

import { signIn } from "next-auth/react";
import Link from "next/link";
import { useRouter } from "next/navigation";
import { useRef, useState, type FormEvent } from "react";
import { AuthForm, Field, Notice, PasswordField, Submit } from "../fields";
import { looksLikeEmail, safeReturnPath, showCheckMail } from "../post";
import { Sheet } from "../intro";

/** next-auth's error codes, in our words; which form each belongs to decides where it is shown. */
const ERRORS: Record<string, { form: "password" | "link"; text: string }> = {
  CredentialsSignin: {
    form: "password",
    text: "That e-mail and password do not open an account. If you signed up a moment ago, follow the link we mailed you first.",
  },
  locked: {
    form: "password",
    text: "Password sign-in is paused for this address after several failed tries. Wait 15 minutes, or sign in with an e-mail link below.",
  },
  Verification: { form: "link", text: "That sign-in link has expired or has been used already. Ask for a fresh one below." },
  AccessDenied: { form: "link", text: "Several links went to this address just now. Wait a few minutes before asking for another." },
  EmailSignin: { form: "link", text: "The link could not be sent. Check the address and try again." },
};
const UNKNOWN = { form: "password" as const, text: "Sign-in did not go through. Try again." };

const NOTICES: Record<string, string> = {
  "password-changed": "Your new password is set. Sign in with it.",
};

export function SignInForms({ error, callbackUrl, notice }: { error?: string; callbackUrl?: string; notice?: string }) {
  const router = useRouter();
  const [email, setEmail] = useState("");
  const [password, setPassword] = useState("");
  const [busy, setBusy] = useState<"password" | "link" | null>(null);
  const initial = error ? (ERRORS[error] ?? UNKNOWN) : null;
  const [failure, setFailure] = useState<{ form: "password" | "link"; text: string } | null>(initial);
  const [fieldErrors, setFieldErrors] = useState<{ email?: string; password?: string; linkEmail?: string }>({});
  const emailRef = useRef<HTMLInputElement>(null);

  async function withPassword(e: FormEvent) {
    e.preventDefault();
    const errs = {
      email: looksLikeEmail(email.trim()) ? undefined : "Enter the e-mail address of your account.",
      password: password ? undefined : "Enter your password.",
    };
    setFieldErrors(errs);
    setFailure(null);
    if (errs.email || errs.password) {
      if (errs.email) emailRef.current?.focus();
      return;
    }
    setBusy("password");
    const target = safeReturnPath(callbackUrl);
    const res = await signIn<"credentials">("credentials", { email: email.trim(), password, redirect: false, callbackUrl: target });
    if (res?.ok && !res.error) {
      // A full load, so the pages read the fresh session cookie.
      window.location.assign(target);
      return;
    }
    setBusy(null);
    setPassword("");
    setFailure(ERRORS[res?.error ?? ""] ?? UNKNOWN);
  }

  async function withLink(e: FormEvent) {
    e.preventDefault();
    const address = email.trim();
    setFailure(null);
    if (!looksLikeEmail(address)) {
      setFieldErrors({ linkEmail: "Enter the address to send the link to." });
      return;
    }
    setFieldErrors({});
    setBusy("link");
    const res = await signIn<"email">("email", { email: address, redirect: false, callbackUrl: safeReturnPath(callbackUrl) });
    if (res?.ok && !res.error) {
      showCheckMail(router, new URLSearchParams({ to: address }));
      return;
    }
    setBusy(null);
    setFailure(ERRORS[res?.error ?? ""] ?? { form: "link", text: ERRORS.EmailSignin!.text });
  }

  const noticeText = notice ? NOTICES[notice] : undefined;

  return (
    <>
      {noticeText && !failure ? (
        <div className="mt-6">
          <Notice tone="note">{noticeText}</Notice>
        </div>
      ) : null}

      <Sheet>
        <AuthForm
          onSubmit={withPassword}
          busy={busy === "password"}
          aria-labelledby="password-heading"
          failure={failure?.form === "password" ? failure.text : null}
          heading={
            <h2 id="password-heading" className="text-lg font-semibold">
              With your password
            </h2>
          }
        >
          <Field
            ref={emailRef}
            className="mt-4"
            label="E-mail"
            type="email"
            name="email"
            autoComplete="username"
            inputMode="email"
            value={email}
            onChange={(e) => setEmail(e.target.value)}
            error={fieldErrors.email}
            disabled={busy !== null}
          />
          <PasswordField
            className="mt-4"
            label="Password"
            name="password"
            autoComplete="current-password"
            value={password}
            onChange={(e) => setPassword(e.target.value)}
            error={fieldErrors.password}
            disabled={busy !== null}
            aside={
              <Link href="/reset" className="text-sm">
                Forgot it?
              </Link>
            }
          />
          <div className="mt-5">
            <Submit busy={busy === "password"} busyLabel="Checking…">
              Sign in
            </Submit>
          </div>
        </AuthForm>

        <div className="my-6 flex items-center gap-3 text-xs tracking-wide text-ink-2 uppercase" aria-hidden="true">
          <span className="h-px flex-1 bg-rule" />
          or without a password
          <span className="h-px flex-1 bg-rule" />
        </div>

        <AuthForm
          onSubmit={withLink}
          busy={busy === "link"}
          aria-labelledby="link-heading"
          failure={failure?.form === "link" ? failure.text : null}
          heading={
            <>
              <h2 id="link-heading" className="text-lg font-semibold">
                With a link by e-mail
              </h2>
              <p className="mt-1 text-sm text-ink-2">
                We mail a link that signs you in once, within 30 minutes. An address new to Paritas gets an account on the way.
              </p>
            </>
          }
        >
          <Field
            className="mt-4"
            label="E-mail for the link"
            type="email"
            name="link-email"
            autoComplete="email"
            inputMode="email"
            value={email}
            onChange={(e) => setEmail(e.target.value)}
            error={fieldErrors.linkEmail}
            disabled={busy !== null}
          />
          <div className="mt-5">
            <Submit busy={busy === "link"} busyLabel="Sending…" tone="quiet">
              E-mail me a link
            </Submit>
          </div>
        </AuthForm>
      </Sheet>
    </>
  );
}
