"use client";

import { signIn } from "next-auth/react";
import { useRouter } from "next/navigation";
import { useRef, useState, type FormEvent } from "react";
import { AuthForm, Field, PasswordField, Submit } from "../fields";
import { Sheet } from "../intro";
import { looksLikeEmail, postJson, showCheckMail } from "../post";

type Fields = { name?: string; email?: string; password?: string };

export function SignUpForm() {
  const router = useRouter();
  const [values, setValues] = useState({ name: "", email: "", password: "" });
  const [errors, setErrors] = useState<Fields>({});
  const [failure, setFailure] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const nameRef = useRef<HTMLInputElement>(null);
  const emailRef = useRef<HTMLInputElement>(null);
  const passwordRef = useRef<HTMLInputElement>(null);

  const set = (k: keyof typeof values) => (e: { target: { value: string } }) => setValues((v) => ({ ...v, [k]: e.target.value }));

  /** Show field errors and put the cursor in the first one. */
  function showErrors(errs: Fields) {
    setErrors(errs);
    const first = errs.name ? nameRef : errs.email ? emailRef : errs.password ? passwordRef : null;
    first?.current?.focus();
  }

  async function submit(e: FormEvent) {
    e.preventDefault();
    setFailure(null);
    const input = { name: values.name.trim(), email: values.email.trim(), password: values.password };
    const local: Fields = {
      name: input.name ? undefined : "Enter your name.",
      email: looksLikeEmail(input.email) ? undefined : "Enter an e-mail address you can read mail at.",
      password: input.password.length >= 10 ? undefined : "Use at least 10 characters.",
    };
    if (local.name || local.email || local.password) return showErrors(local);
    showErrors({});
    setBusy(true);
    const out = await postJson("/api/console/auth/signup", input);
    if (!out.ok) {
      setBusy(false);
      if (Object.keys(out.fields).length > 0) return showErrors(out.fields);
      return setFailure(out.detail);
    }
    // The address is confirmed by following a sign-in link, which next-auth mails now.
    const link = await signIn<"email">("email", { email: input.email, redirect: false, callbackUrl: "/console" });
    if (link?.error) {
      setBusy(false);
      return setFailure("The account is set up, but the confirmation link could not be sent. Ask for one on the sign-in page.");
    }
    showCheckMail(router, new URLSearchParams({ from: "signup", to: input.email }));
  }

  return (
    <Sheet>
      <AuthForm onSubmit={submit} busy={busy} failure={failure}>
        <Field ref={nameRef} label="Name" name="name" autoComplete="name" value={values.name} onChange={set("name")} error={errors.name} disabled={busy} />
        <Field
          ref={emailRef}
          className="mt-4"
          label="E-mail"
          type="email"
          name="email"
          autoComplete="email"
          inputMode="email"
          value={values.email}
          onChange={set("email")}
          error={errors.email}
          disabled={busy}
          hint="We send a link to confirm it."
        />
        <PasswordField
          ref={passwordRef}
          className="mt-4"
          label="Password"
          name="password"
          autoComplete="new-password"
          value={values.password}
          onChange={set("password")}
          error={errors.password}
          disabled={busy}
          hint="At least 10 characters. A few unrelated words make a strong one."
        />
        <div className="mt-6">
          <Submit busy={busy} busyLabel="Creating…">
            Create account
          </Submit>
        </div>
      </AuthForm>
    </Sheet>
  );
}
