"use client";

import { useMutation, useQueryClient } from "@tanstack/react-query";
import { signOut } from "next-auth/react";
import Link from "next/link";
import { RoleBadge } from "@/components/console/badges";
import { IconMail } from "@/components/console/icons";
import { ProblemView } from "@/components/console/problem-view";
import { buttonPrimary, buttonSecondary, panel } from "@/components/console/ui";
import { consoleApi } from "@/lib/console-client/api";
import { useMe } from "@/lib/console-client/hooks";
import { toProblem } from "@/lib/console-client/problem";
import { queryKeys } from "@/lib/console-client/query-keys";

/** What each refusal means for the person holding the link. */
function advice(code: string, status: number): string {
  if (code === "invitation-mismatch") return "The invitation was sent to another address. Sign out and sign in with that address, or ask the owner to invite this one.";
  if (code === "already-member") return "You already belong to this organisation, so there is nothing to accept.";
  if (status === 410 || code === "gone") return "The link was used already, was withdrawn, or is more than seven days old. Ask an owner to send a new invitation.";
  if (status === 404) return "No invitation matches this link. Check that the whole link was copied, or ask for a new one.";
  return "The invitation could not be accepted.";
}

/** /console/invite/{token}: join an organisation by accepting the invitation the link carries. */
export function AcceptInvite({ token }: { token: string }) {
  const me = useMe();
  const qc = useQueryClient();
  const accept = useMutation({
    mutationFn: () => consoleApi.acceptInvitation(token),
    onSuccess: () => qc.invalidateQueries({ queryKey: queryKeys.me }),
  });
  const problem = accept.isError ? toProblem(accept.error) : null;

  return (
    <div className="mx-auto max-w-xl pt-2 lg:pt-6">
      <div className={`${panel} p-6`}>
        <div className="flex items-center gap-3">
          <span className="flex h-10 w-10 items-center justify-center rounded-full bg-accent-soft text-accent">
            <IconMail className="h-5 w-5" />
          </span>
          <h1 className="text-xl font-semibold tracking-tight">An invitation to an organisation</h1>
        </div>

        {accept.isSuccess ? (
          <div role="status" className="mt-5">
            <p className="text-lg">
              You are now a member of <strong>{accept.data.org.name}</strong> with the role <RoleBadge role={accept.data.role} />.
            </p>
            <p className="mt-4">
              <Link href={`/console/${accept.data.org.slug}`} className={buttonPrimary}>
                Open {accept.data.org.name}
              </Link>
            </p>
          </div>
        ) : (
          <>
            <p className="mt-4 text-ink-2">
              Accepting adds you to the organisation that sent this link, with the role the owner chose. Invitations are for one
              e-mail address: you are signed in as{" "}
              <strong className="font-medium text-ink">{me.data?.user.email ?? "…"}</strong>.
            </p>
            {problem ? (
              <div role="alert" className="mt-5 flex flex-col gap-3">
                <p className="font-medium">{advice(problem.code, problem.status)}</p>
                <ProblemView problem={problem} compact />
              </div>
            ) : null}
            <div className="mt-6 flex flex-wrap gap-2">
              {problem?.code === "already-member" ? (
                <Link href="/console" className={buttonPrimary}>
                  Go to the console
                </Link>
              ) : problem && (problem.status === 410 || problem.status === 404) ? null : (
                <button type="button" className={buttonPrimary} onClick={() => accept.mutate()} disabled={accept.isPending}>
                  {accept.isPending ? "Accepting…" : "Accept the invitation"}
                </button>
              )}
              {problem?.code === "invitation-mismatch" ? (
                <button type="button" className={buttonSecondary} onClick={() => void signOut({ callbackUrl: `/signin?callbackUrl=${encodeURIComponent(`/console/invite/${token}`)}` })}>
                  Sign in with another address
                </button>
              ) : (
                <Link href="/console" className={buttonSecondary}>
                  Not now
                </Link>
              )}
            </div>
          </>
        )}
      </div>
    </div>
  );
}
