"use client";

import { useMutation, useQueryClient } from "@tanstack/react-query";
import { Dialog, DialogActions } from "@/components/console/dialog";
import { ProblemView } from "@/components/console/problem-view";
import { buttonDanger, buttonSecondary } from "@/components/console/ui";
import { consoleApi } from "@/lib/console-client/api";
import { toProblem } from "@/lib/console-client/problem";
import { queryKeys } from "@/lib/console-client/query-keys";
import type { KeyRecord } from "@/lib/console-client/types";

/** Revoke at once, after saying what that does. */
export function RevokeKeyDialog({ org, target, onClose }: { org: string; target: KeyRecord | null; onClose: () => void }) {
  const qc = useQueryClient();
  const revoke = useMutation({
    mutationFn: () => consoleApi.revokeKey(org, target!.id),
    onSuccess: () => {
      void qc.invalidateQueries({ queryKey: queryKeys.keys(org) });
      close();
    },
  });

  function close() {
    revoke.reset();
    onClose();
  }

  return (
    <Dialog open={target !== null} onClose={close} title={`Revoke ${target?.name ?? "key"}?`}>
      <p className="text-sm">
        Every request with <code className="pa-code">{target?.prefix}…</code> fails from now on with 401. This cannot be undone; a job that
        still needs access needs a new key. Owners are told by e-mail.
      </p>
      {revoke.isError ? (
        <div className="mt-4">
          <ProblemView problem={toProblem(revoke.error)} compact />
        </div>
      ) : null}
      <DialogActions>
        <button type="button" className={buttonSecondary} onClick={close} data-autofocus>
          Keep the key
        </button>
        <button type="button" className={buttonDanger} onClick={() => revoke.mutate()} disabled={revoke.isPending}>
          {revoke.isPending ? "Revoking…" : "Revoke key"}
        </button>
      </DialogActions>
    </Dialog>
  );
}
