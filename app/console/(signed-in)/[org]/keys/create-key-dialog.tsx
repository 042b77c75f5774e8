"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { useId, useState } from "react";
import { useForm, useWatch } from "react-hook-form";
import { z } from "zod";
import { Dialog, DialogActions } from "@/components/console/dialog";
import { ProblemView } from "@/components/console/problem-view";
import { buttonPrimary, buttonSecondary, errorText, hintBase, inputBase, labelBase } from "@/components/console/ui";
import { allScopes, type Scope } from "@/lib/api/scopes";
import { consoleApi } from "@/lib/console-client/api";
import { formatDateTime } from "@/lib/console-client/format";
import { isProblem, toProblem } from "@/lib/console-client/problem";
import { queryKeys } from "@/lib/console-client/query-keys";
import { PUBLIC_SCOPES, type IssuedKey } from "@/lib/console-client/types";
import { RevealKey } from "./reveal-key";

const form = z
  .object({
    name: z.string().trim().min(1, "Give the key a name, e.g. the job that uses it.").max(80, "At most 80 characters."),
    scopes: z.array(z.enum(allScopes as [Scope, ...Scope[]])).min(1, "Give the key at least one scope."),
    mode: z.enum(["test", "live"]),
    expiry: z.enum(["never", "at"]),
    expiresAt: z.string(),
  })
  .superRefine((v, ctx) => {
    if (v.expiry !== "at") return;
    const t = Date.parse(v.expiresAt);
    if (!v.expiresAt || Number.isNaN(t)) ctx.addIssue({ code: "custom", path: ["expiresAt"], message: "Pick a date and time." });
    else if (t <= Date.now() + 60_000) ctx.addIssue({ code: "custom", path: ["expiresAt"], message: "Pick a moment in the future." });
  });

type FormIn = z.input<typeof form>;

const defaults: FormIn = { name: "", scopes: ["compute"], mode: "test", expiry: "never", expiresAt: "" };

/** Create a key: name, scopes, test or live, an optional end; then the key, shown once. */
export function CreateKeyDialog({ org, open, onClose }: { org: string; open: boolean; onClose: () => void }) {
  const qc = useQueryClient();
  const [issued, setIssued] = useState<IssuedKey | null>(null);
  const ids = { name: useId(), expires: useId(), scopes: useId(), mode: useId(), expiry: useId() };
  const { register, handleSubmit, control, reset, setError, formState } = useForm<FormIn>({ resolver: zodResolver(form), defaultValues: defaults });
  const create = useMutation({
    mutationFn: (v: FormIn) =>
      consoleApi.createKey(org, {
        name: v.name.trim(),
        scopes: v.scopes,
        mode: v.mode,
        expiresAt: v.expiry === "at" ? new Date(v.expiresAt).toISOString() : null,
      }),
    onSuccess: (res) => {
      setIssued(res);
      void qc.invalidateQueries({ queryKey: queryKeys.keys(org) });
    },
    onError: (err) => {
      if (!isProblem(err, 422)) return;
      for (const e of err.errors ?? []) {
        const field = e.pointer.split("/")[1];
        if (field === "name" || field === "scopes" || field === "mode" || field === "expiresAt") setError(field, { type: "server", message: e.message });
      }
    },
  });

  function close() {
    setIssued(null);
    reset(defaults);
    create.reset();
    onClose();
  }

  const expiry = useWatch({ control, name: "expiry" });
  const errors = formState.errors;

  return (
    <Dialog open={open} onClose={close} title={issued ? "Your new key" : "Create a key"} dismissible={!issued} description={issued ? undefined : "A key lets a script or a job call the public API for this organisation. Its first word names its mode, so a stray key tells you at once whether it reaches production."}>
      {issued ? (
        <RevealKey secret={issued.key} onDone={close}>
          <p className="text-sm text-ink-2">
            <strong className="font-medium text-ink">{issued.record.name}</strong> · <code className="font-mono">{issued.record.prefix}…</code> ·{" "}
            {issued.record.mode} · {issued.record.scopes.join(", ")}
            {issued.record.expiresAt ? ` · ends ${formatDateTime(issued.record.expiresAt)}` : " · no end date"}
          </p>
        </RevealKey>
      ) : (
        <form noValidate onSubmit={handleSubmit((v) => create.mutate(v))} className="flex flex-col gap-5">
          <div>
            <label htmlFor={ids.name} className={labelBase}>
              Name
            </label>
            <input
              id={ids.name}
              className={`${inputBase} mt-1`}
              autoComplete="off"
              placeholder="ci-nightly"
              data-autofocus
              aria-invalid={errors.name ? true : undefined}
              aria-describedby={errors.name ? `${ids.name}-err` : undefined}
              {...register("name")}
            />
            {errors.name ? (
              <p id={`${ids.name}-err`} className={errorText}>
                {errors.name.message}
              </p>
            ) : null}
          </div>

          <fieldset aria-describedby={errors.scopes ? `${ids.scopes}-err` : undefined}>
            <legend className={labelBase}>Scopes</legend>
            <div className="mt-1 flex flex-col gap-2">
              {PUBLIC_SCOPES.map((s) => (
                <label key={s.id} className="flex items-start gap-2 text-sm">
                  <input type="checkbox" value={s.id} className="mt-1 h-4 w-4 accent-accent" {...register("scopes")} />
                  <span>
                    <code className="font-mono font-medium">{s.id}</code>
                    <span className="block text-ink-2">{s.help}</span>
                  </span>
                </label>
              ))}
            </div>
            {errors.scopes ? (
              <p id={`${ids.scopes}-err`} className={errorText}>
                {errors.scopes.message}
              </p>
            ) : null}
          </fieldset>

          <fieldset>
            <legend className={labelBase}>Mode</legend>
            <div className="mt-1 grid gap-2 sm:grid-cols-2">
              {(
                [
                  ["test", "Test", "For trying things out and CI experiments."],
                  ["live", "Live", "For production jobs; usage is billed."],
                ] as const
              ).map(([value, label, help]) => (
                <label key={value} className="flex items-start gap-2 rounded-md border border-ink-2/40 p-3 text-sm has-[:checked]:border-accent has-[:checked]:bg-accent-soft/50">
                  <input type="radio" value={value} className="mt-1 h-4 w-4 accent-accent" {...register("mode")} />
                  <span>
                    <span className="font-medium">{label}</span>
                    <span className="block text-ink-2">{help}</span>
                    <span className="block text-ink-2">
                      Its key starts <code className="font-mono">{value}.prt1.</code>
                    </span>
                  </span>
                </label>
              ))}
            </div>
          </fieldset>

          <fieldset>
            <legend className={labelBase}>End</legend>
            <div className="mt-1 flex flex-col gap-2 text-sm">
              <label className="flex items-center gap-2">
                <input type="radio" value="never" className="h-4 w-4 accent-accent" {...register("expiry")} />
                No end date (revoke or rotate it when needed)
              </label>
              <label className="flex items-center gap-2">
                <input type="radio" value="at" className="h-4 w-4 accent-accent" {...register("expiry")} />
                Stops working at a set time
              </label>
            </div>
            {expiry === "at" ? (
              <div className="mt-2 pl-6">
                <label htmlFor={ids.expires} className="sr-only">
                  Stops working at
                </label>
                <input
                  id={ids.expires}
                  type="datetime-local"
                  className={`${inputBase} max-w-xs`}
                  aria-invalid={errors.expiresAt ? true : undefined}
                  aria-describedby={`${ids.expires}-hint${errors.expiresAt ? ` ${ids.expires}-err` : ""}`}
                  {...register("expiresAt")}
                />
                <p id={`${ids.expires}-hint`} className={hintBase}>
                  In your local time.
                </p>
                {errors.expiresAt ? (
                  <p id={`${ids.expires}-err`} className={errorText}>
                    {errors.expiresAt.message}
                  </p>
                ) : null}
              </div>
            ) : null}
          </fieldset>

          {create.isError && !isProblem(create.error, 422) ? <ProblemView problem={toProblem(create.error)} compact /> : null}
          {create.isError && isProblem(create.error, 422) ? (
            <p role="alert" className={errorText}>
              The server refused some fields; see the messages above.
            </p>
          ) : null}

          <DialogActions>
            <button type="button" className={buttonSecondary} onClick={close}>
              Cancel
            </button>
            <button type="submit" className={buttonPrimary} disabled={create.isPending}>
              {create.isPending ? "Creating…" : "Create key"}
            </button>
          </DialogActions>
        </form>
      )}
    </Dialog>
  );
}
