"use client";

import { useEffect, useId, useRef, useState, type FormEvent, type FormHTMLAttributes, type InputHTMLAttributes, type ReactNode, type Ref } from "react";

const inputClass =
  "block w-full rounded-md border bg-paper px-3 py-2 text-ink shadow-inner shadow-black/[0.03] placeholder:text-ink-2/70 disabled:opacity-60";

interface FieldProps extends Omit<InputHTMLAttributes<HTMLInputElement>, "id"> {
  label: string;
  error?: string;
  hint?: ReactNode;
  /** A control placed at the right of the label row (e.g. a link). */
  aside?: ReactNode;
  ref?: Ref<HTMLInputElement>;
}

/** A labelled input with its hint and its error, wired for screen readers (aria-invalid, aria-describedby). */
export function Field({ label, error, hint, aside, className = "", ref, ...input }: FieldProps) {
  const id = useId();
  const hintId = `${id}-hint`;
  const errorId = `${id}-error`;
  const describedBy = [hint ? hintId : null, error ? errorId : null].filter(Boolean).join(" ") || undefined;
  return (
    <div className={className}>
      <div className="flex items-baseline justify-between gap-3">
        <label htmlFor={id} className="text-sm font-medium text-ink">
          {label}
        </label>
        {aside}
      </div>
      <input
        ref={ref}
        id={id}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy}
        className={`${inputClass} mt-1.5 ${error ? "border-caution-rule" : "border-rule"}`}
        {...input}
      />
      {hint ? (
        <p id={hintId} className="mt-1.5 text-sm text-ink-2">
          {hint}
        </p>
      ) : null}
      {error ? (
        <p id={errorId} className="mt-1.5 text-sm font-medium text-caution-ink">
          {error}
        </p>
      ) : null}
    </div>
  );
}

/** A password field with a button that shows or hides what has been typed. */
export function PasswordField(props: Omit<FieldProps, "type">) {
  const [shown, setShown] = useState(false);
  return (
    <Field
      {...props}
      type={shown ? "text" : "password"}
      aside={
        <span className="flex items-baseline gap-3">
          {props.aside}
          <button
            type="button"
            onClick={() => setShown((s) => !s)}
            aria-pressed={shown}
            className="rounded px-1 text-sm font-medium text-accent hover:underline"
          >
            {shown ? "Hide" : "Show"}
            <span className="sr-only"> password</span>
          </button>
        </span>
      }
    />
  );
}

/** The form's main button; while the form is busy it says so and cannot be pressed twice. */
export function Submit({ busy, busyLabel, children, tone = "primary" }: { busy: boolean; busyLabel: string; children: ReactNode; tone?: "primary" | "quiet" }) {
  const look =
    tone === "primary"
      ? "bg-accent text-accent-ink shadow-sm hover:brightness-110"
      : "border border-rule bg-surface text-ink hover:bg-sunken";
  return (
    <button
      type="submit"
      disabled={busy}
      className={`inline-flex w-full items-center justify-center gap-2 rounded-md px-4 py-2.5 font-medium disabled:cursor-progress disabled:opacity-70 ${look}`}
    >
      {busy ? (
        <>
          <span aria-hidden="true" className="inline-block h-3.5 w-3.5 animate-spin rounded-full border-2 border-current border-r-transparent" />
          {busyLabel}
        </>
      ) : (
        children
      )}
    </button>
  );
}

/** A message about the whole form: errors are announced at once, notes politely. */
export function Notice({ tone, children, ref }: { tone: "error" | "note"; children: ReactNode; ref?: Ref<HTMLDivElement> }) {
  const look = tone === "error" ? "border-caution-rule bg-caution-bg text-caution-ink" : "border-accent/40 bg-accent-soft text-ink";
  return (
    <div ref={ref} tabIndex={-1} role={tone === "error" ? "alert" : "status"} className={`rounded-md border border-l-4 px-3.5 py-2.5 text-sm ${look}`}>
      {children}
    </div>
  );
}

interface AuthFormProps extends Omit<FormHTMLAttributes<HTMLFormElement>, "onSubmit" | "method"> {
  onSubmit: (e: FormEvent<HTMLFormElement>) => void;
  busy: boolean;
  /** A message about the whole form; when it appears, focus moves to it so it is heard at once. */
  failure?: ReactNode;
  /** Shown above the failure message (a heading and its lead). */
  heading?: ReactNode;
  children: ReactNode;
}

/**
 * The frame of every sign-in page form. method="post" matters: a form submitted before the page's
 * script has loaded must not put the password into the address bar (and the server's logs).
 */
export function AuthForm({ onSubmit, busy, failure, heading, children, ...rest }: AuthFormProps) {
  const alertRef = useRef<HTMLDivElement>(null);
  useEffect(() => {
    if (failure) alertRef.current?.focus();
  }, [failure]);
  return (
    <form method="post" noValidate onSubmit={onSubmit} aria-busy={busy} {...rest}>
      {heading}
      {failure ? (
        <div className={heading ? "mt-4" : "mb-4"}>
          <Notice tone="error" ref={alertRef}>
            {failure}
          </Notice>
        </div>
      ) : null}
      {children}
    </form>
  );
}
