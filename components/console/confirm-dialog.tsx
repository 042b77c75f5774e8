"use client";

import { useMutation } from "@tanstack/react-query";
import type { ReactNode } from "react";
import { isProblem, toProblem } from "@/lib/console-client/problem";
import { Dialog, DialogActions } from "./dialog";
import { ProblemView } from "./problem-view";
import { buttonDanger, buttonPrimary, buttonSecondary } from "./ui";

/**
 * Ask before a change that is hard to undo; run it; keep the dialog open with the problem when the
 * server refuses (a 409 "last-owner" gets its own plain-words explanation).
 */
export function ConfirmDialog({
  open,
  title,
  children,
  confirmLabel,
  pendingLabel = "Working…",
  cancelLabel = "Cancel",
  danger = false,
  onConfirm,
  onDone,
  onClose,
}: {
  open: boolean;
  title: string;
  children: ReactNode;
  confirmLabel: string;
  pendingLabel?: string;
  cancelLabel?: string;
  danger?: boolean;
  onConfirm: () => Promise<unknown>;
  onDone?: () => void;
  onClose: () => void;
}) {
  const run = useMutation({ mutationFn: onConfirm, onSuccess: () => finish(true) });

  function finish(done: boolean) {
    run.reset();
    if (done) onDone?.();
    onClose();
  }

  const problem = run.isError ? toProblem(run.error) : null;
  return (
    <Dialog open={open} onClose={() => finish(false)} title={title}>
      <div className="text-sm">{children}</div>
      {problem ? (
        <div role="alert" className="mt-4 flex flex-col gap-2">
          {isProblem(problem, 409, "last-owner") ? (
            <p className="font-medium">An organisation always needs at least one owner. Make another member an owner first, then try again.</p>
          ) : null}
          <ProblemView problem={problem} compact />
        </div>
      ) : null}
      <DialogActions>
        <button type="button" className={buttonSecondary} onClick={() => finish(false)} data-autofocus>
          {problem ? "Close" : cancelLabel}
        </button>
        {problem && problem.status === 409 ? null : (
          <button type="button" className={danger ? buttonDanger : buttonPrimary} onClick={() => run.mutate()} disabled={run.isPending}>
            {run.isPending ? pendingLabel : confirmLabel}
          </button>
        )}
      </DialogActions>
    </Dialog>
  );
}
