"use client";

import { signIn } from "next-auth/react";
import { useEffect, useId, useRef, useState, type FormEvent, type ReactNode } from "react";
import { consoleFetch, setReauthHandler } from "@/lib/console-client/fetcher";
import { useMe } from "@/lib/console-client/hooks";
import { toProblem, type ProblemError } from "@/lib/console-client/problem";
import { Dialog, DialogActions } from "./dialog";
import { ProblemView } from "./problem-view";
import { buttonPrimary, buttonSecondary, errorText, inputBase, labelBase } from "./ui";

interface Pending {
  promise: Promise<boolean>;
  resolve: (confirmed: boolean) => void;
}

/**
 * Answers every `reauth-required` refusal of the console's fetcher with one password dialog;
 * the refused request is repeated once the password is confirmed. Calls refused while the dialog
 * is open wait for the same answer.
 */
export function ReauthProvider({ children }: { children: ReactNode }) {
  const [asking, setAsking] = useState(false);
  const pending = useRef<Pending | null>(null);

  useEffect(
    () =>
      setReauthHandler(() => {
        if (!pending.current) {
          let resolve: (confirmed: boolean) => void = () => {};
          const promise = new Promise<boolean>((r) => (resolve = r));
          pending.current = { promise, resolve };
          setAsking(true);
        }
        return pending.current.promise;
      }),
    [],
  );

  function finish(confirmed: boolean) {
    pending.current?.resolve(confirmed);
    pending.current = null;
    setAsking(false);
  }

  return (
    <>
      {children}
      {asking ? <ReauthDialog onFinish={finish} /> : null}
    </>
  );
}

function ReauthDialog({ onFinish }: { onFinish: (confirmed: boolean) => void }) {
  const id = useId();
  const me = useMe();
  const [password, setPassword] = useState("");
  const [busy, setBusy] = useState(false);
  const [problem, setProblem] = useState<ProblemError | null>(null);
  const [link, setLink] = useState<"idle" | "sending" | "sent" | "refused">("idle");
  const fieldError = problem?.errors?.find((e) => e.pointer === "/password")?.message;
  const email = me.data?.user.email;

  // The other way to confirm: a sign-in link to the person's own address. Following it signs them in
  // afresh, which counts as a confirmation, and brings them back to this page to repeat the action.
  async function sendLink() {
    if (!email) return;
    setLink("sending");
    const res = await signIn<"email">("email", { email, redirect: false, callbackUrl: window.location.pathname + window.location.search });
    setLink(res?.ok && !res.error ? "sent" : "refused");
  }

  async function submit(e: FormEvent) {
    e.preventDefault();
    setBusy(true);
    setProblem(null);
    try {
      await consoleFetch("/api/console/auth/confirm", { method: "POST", body: { password } });
      onFinish(true);
    } catch (err) {
      setProblem(toProblem(err));
      setBusy(false);
    }
  }

  return (
    <Dialog
      open
      onClose={() => onFinish(false)}
      title="Your password, once more"
      description="Live keys, ownership transfers and removing someone else need a password entered recently in this session. Enter yours and the action goes ahead."
    >
      <form onSubmit={submit} noValidate>
        <label htmlFor={`${id}-password`} className={labelBase}>
          Password
        </label>
        <input
          id={`${id}-password`}
          name="password"
          type="password"
          autoComplete="current-password"
          required
          className={`${inputBase} mt-1`}
          value={password}
          onChange={(e) => setPassword(e.target.value)}
          aria-invalid={fieldError ? true : undefined}
          aria-describedby={fieldError ? `${id}-error` : undefined}
          data-autofocus
        />
        {fieldError ? (
          <p id={`${id}-error`} role="alert" className={errorText}>
            {fieldError}
          </p>
        ) : problem ? (
          <div role="alert" className="mt-3">
            <ProblemView problem={problem} compact />
          </div>
        ) : null}
        <p className="mt-4 text-sm text-ink-2" aria-live="polite">
          {link === "sent" ? (
            <>
              A sign-in link is on its way to <strong className="text-ink">{email}</strong>. Following it signs you in again, which counts as confirming; then repeat the action.
            </>
          ) : link === "refused" ? (
            "No link was sent: too many were asked for lately. Wait a few minutes, or use your password."
          ) : (
            <>
              No password, or rather use your mail?{" "}
              <button type="button" className="font-medium text-accent underline underline-offset-2 disabled:opacity-60" onClick={() => void sendLink()} disabled={!email || link === "sending"}>
                {link === "sending" ? "Sending…" : "E-mail me a sign-in link"}
              </button>
            </>
          )}
        </p>
        <DialogActions>
          <button type="button" className={buttonSecondary} onClick={() => onFinish(false)}>
            Cancel
          </button>
          <button type="submit" className={buttonPrimary} disabled={busy || password === ""}>
            {busy ? "Checking…" : "Confirm and continue"}
          </button>
        </DialogActions>
      </form>
    </Dialog>
  );
}
