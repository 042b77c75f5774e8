"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { useId } from "react";
import { useForm, useWatch } from "react-hook-form";
import { z } from "zod";
import { ProblemView } from "@/components/console/problem-view";
import { buttonPrimary, errorText, hintBase, inputBase, labelBase, panel, selectBase } from "@/components/console/ui";
import { consoleApi } from "@/lib/console-client/api";
import { formatDateTime } from "@/lib/console-client/format";
import { isProblem, toProblem } from "@/lib/console-client/problem";
import { queryKeys } from "@/lib/console-client/query-keys";

const schema = z.object({
  email: z.string().trim().toLowerCase().pipe(z.email("Enter an e-mail address.")),
  role: z.enum(["owner", "developer", "billing"]),
});
type In = z.input<typeof schema>;
type Out = z.output<typeof schema>;

const ROLE_HELP = {
  developer: "keys of their own, the bench, usage",
  billing: "usage, plan and invoices; no keys",
  owner: "everything, including people and keys of everyone",
} as const;

/** Owners invite by e-mail; the link in the mail is valid for seven days and works once. */
export function InviteForm({ org }: { org: string }) {
  const qc = useQueryClient();
  const emailId = useId();
  const roleId = useId();
  const { register, handleSubmit, reset, setError, formState, control } = useForm<In, unknown, Out>({
    resolver: zodResolver(schema),
    defaultValues: { email: "", role: "developer" },
  });
  const invite = useMutation({
    mutationFn: (v: Out) => consoleApi.invite(org, v),
    onSuccess: () => {
      reset({ email: "", role: "developer" });
      void qc.invalidateQueries({ queryKey: queryKeys.members(org) });
    },
    onError: (err) => {
      for (const e of isProblem(err, 422) ? (err.errors ?? []) : []) {
        const f = e.pointer.split("/")[1];
        if (f === "email" || f === "role") setError(f, { type: "server", message: e.message });
      }
    },
  });
  const errors = formState.errors;
  const role = useWatch({ control, name: "role" }) ?? "developer";

  return (
    <section aria-labelledby="invite-heading" className={`${panel} p-4 sm:p-5`}>
      <h2 id="invite-heading" className="font-semibold">
        Invite someone
      </h2>
      <form noValidate onSubmit={handleSubmit((v) => invite.mutate(v))} className="mt-3 grid gap-3 sm:grid-cols-[minmax(0,1fr)_14rem_auto] sm:items-start">
        <div>
          <label htmlFor={emailId} className={labelBase}>
            E-mail
          </label>
          <input
            id={emailId}
            type="email"
            autoComplete="off"
            placeholder="name@example.com"
            className={`${inputBase} mt-1`}
            aria-invalid={errors.email ? true : undefined}
            aria-describedby={errors.email ? `${emailId}-err` : undefined}
            {...register("email")}
          />
          {errors.email ? (
            <p id={`${emailId}-err`} className={errorText}>
              {errors.email.message}
            </p>
          ) : null}
        </div>
        <div>
          <label htmlFor={roleId} className={labelBase}>
            Role
          </label>
          <select id={roleId} className={`${selectBase} mt-1`} aria-describedby={`${roleId}-hint`} {...register("role")}>
            {(["developer", "billing", "owner"] as const).map((r) => (
              <option key={r} value={r}>
                {r}
              </option>
            ))}
          </select>
          <p id={`${roleId}-hint`} className={hintBase}>
            {ROLE_HELP[role]}
          </p>
        </div>
        <div className="sm:pt-6">
          <button type="submit" className={`${buttonPrimary} w-full sm:w-auto`} disabled={invite.isPending}>
            {invite.isPending ? "Sending…" : "Send invitation"}
          </button>
        </div>
      </form>
      <div aria-live="polite">
        {invite.isSuccess ? (
          <p className="mt-3 text-sm">
            Invitation sent to <strong className="font-medium">{invite.data.invitation.email}</strong> as {invite.data.invitation.role}. The link
            works once, until {formatDateTime(invite.data.invitation.expiresAt)}.
          </p>
        ) : null}
      </div>
      {invite.isError && !isProblem(invite.error, 422) ? (
        <div role="alert" className="mt-3">
          <ProblemView problem={toProblem(invite.error)} compact />
        </div>
      ) : null}
    </section>
  );
}
