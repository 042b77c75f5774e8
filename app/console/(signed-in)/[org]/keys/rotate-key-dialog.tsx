"use client";

import { useMutation, useQueryClient } from "@tanstack/react-query";
import { useEffect, useId, useState } from "react";
import { Dialog, DialogActions } from "@/components/console/dialog";
import { ProblemView } from "@/components/console/problem-view";
import { buttonPrimary, buttonSecondary, errorText, hintBase, inputBase, labelBase, selectBase } from "@/components/console/ui";
import { consoleApi } from "@/lib/console-client/api";
import { formatDateTime, formatRelative } from "@/lib/console-client/format";
import { MAX_OVERLAP_MINUTES, oldKeyEndsAt } from "@/lib/console/overlap";
import { toProblem } from "@/lib/console-client/problem";
import { queryKeys } from "@/lib/console-client/query-keys";
import type { KeyRecord, RotatedKey } from "@/lib/console-client/types";
import { RevealKey } from "./reveal-key";

const UNITS = [
  { id: "minutes", minutes: 1, singular: "minute" },
  { id: "hours", minutes: 60, singular: "hour" },
  { id: "days", minutes: 24 * 60, singular: "day" },
] as const;
type Unit = (typeof UNITS)[number]["id"];
const DEFAULT_AMOUNT = "24";
const DEFAULT_UNIT: Unit = "hours";
const BOUNDS = `0 to 7 days (${MAX_OVERLAP_MINUTES} minutes, ${MAX_OVERLAP_MINUTES / 60} hours)`;

/** The overlap in minutes, or null when the amount is not a whole number within the bounds. */
function overlapMinutesOf(amount: string, unit: Unit): number | null {
  const n = Number(amount);
  if (amount.trim() === "" || !Number.isInteger(n) || n < 0) return null;
  const minutes = n * UNITS.find((u) => u.id === unit)!.minutes;
  return minutes <= MAX_OVERLAP_MINUTES ? minutes : null;
}

/** The clock the preview reads, advanced every 15 s while the dialog is open so "stops at" stays true. */
function useNow(active: boolean): Date {
  const [now, setNow] = useState(() => new Date());
  useEffect(() => {
    if (!active) return;
    const tick = () => setNow(new Date());
    // The dialog stays mounted while closed: read the clock again as soon as it opens.
    const first = setTimeout(tick, 0);
    const every = setInterval(tick, 15_000);
    return () => {
      clearTimeout(first);
      clearInterval(every);
    };
  }, [active]);
  return now;
}

/** Replace a key by a new one with the same name, scopes and mode; the old one keeps working for the overlap. */
export function RotateKeyDialog({ org, target, onClose }: { org: string; target: KeyRecord | null; onClose: () => void }) {
  const qc = useQueryClient();
  const [amount, setAmount] = useState(DEFAULT_AMOUNT);
  const [unit, setUnit] = useState<Unit>(DEFAULT_UNIT);
  const [result, setResult] = useState<(RotatedKey & { endsNow: boolean }) | null>(null);
  const amountId = useId();
  const unitId = useId();
  const now = useNow(target !== null && !result);

  const minutes = overlapMinutesOf(amount, unit);
  const endsAt = minutes === null ? null : oldKeyEndsAt(now, minutes, target?.expiresAt ?? null);
  const cutByOwnEnd = endsAt !== null && target?.expiresAt === endsAt && minutes !== 0;

  const rotate = useMutation({
    mutationFn: (overlapMinutes: number) => consoleApi.rotateKey(org, target!.id, overlapMinutes),
    onSuccess: (res) => {
      setResult({ ...res, endsNow: Date.parse(res.previous.expiresAt) <= Date.now() + 1000 });
      void qc.invalidateQueries({ queryKey: queryKeys.keys(org) });
    },
  });

  function close() {
    setResult(null);
    setAmount(DEFAULT_AMOUNT);
    setUnit(DEFAULT_UNIT);
    rotate.reset();
    onClose();
  }

  return (
    <Dialog
      open={target !== null}
      onClose={close}
      dismissible={!result}
      title={result ? "The replacement key" : `Rotate ${target?.name ?? "key"}`}
      description={
        result ? undefined : (
          <>
            A new key with the same name, scopes and mode replaces <code className="font-mono">{target?.prefix}…</code>. Choose how long the
            old one keeps working, so running jobs can switch over.
          </>
        )
      }
    >
      {result ? (
        <RevealKey secret={result.key} onDone={close}>
          <p className="text-sm text-ink-2">
            {result.endsNow ? (
              <>
                The old key <code className="font-mono">{target?.prefix}…</code> stopped working now.
              </>
            ) : (
              <>
                The old key <code className="font-mono">{target?.prefix}…</code> keeps working until{" "}
                <strong className="font-medium text-ink">{formatDateTime(result.previous.expiresAt)}</strong> ({formatRelative(result.previous.expiresAt)}); it is
                listed as expiring until then.
              </>
            )}
          </p>
        </RevealKey>
      ) : (
        <form
          noValidate
          onSubmit={(e) => {
            e.preventDefault();
            if (minutes !== null) rotate.mutate(minutes);
          }}
        >
          <div className="flex flex-wrap items-end gap-2">
            <div>
              <label htmlFor={amountId} className={labelBase}>
                Overlap
              </label>
              <input
                id={amountId}
                type="number"
                min={0}
                step={1}
                inputMode="numeric"
                value={amount}
                onChange={(e) => setAmount(e.target.value)}
                className={`${inputBase} mt-1 w-28`}
                aria-invalid={minutes === null ? true : undefined}
                aria-describedby={`${amountId}-hint ${amountId}-preview`}
                data-autofocus
              />
            </div>
            <div>
              <label htmlFor={unitId} className={labelBase}>
                Unit
              </label>
              <select id={unitId} value={unit} onChange={(e) => setUnit(e.target.value as Unit)} className={`${selectBase} mt-1`}>
                {UNITS.map((u) => (
                  <option key={u.id} value={u.id}>
                    {u.id}
                  </option>
                ))}
              </select>
            </div>
          </div>
          <p id={`${amountId}-hint`} className={minutes === null ? errorText : hintBase}>
            {minutes === null ? `Enter a whole number of ${unit}, ${BOUNDS}.` : `How long the old key keeps working: ${BOUNDS}; 0 stops it at once.`}
          </p>
          <p id={`${amountId}-preview`} className="mt-3 text-sm text-ink-2" aria-live="polite">
            {endsAt === null ? null : minutes === 0 ? (
              <>The old key stops working as soon as you rotate.</>
            ) : (
              <>
                The old key stops working at <strong className="font-medium text-ink">{formatDateTime(endsAt)}</strong> ({formatRelative(endsAt, now.getTime())})
                {cutByOwnEnd ? ", its own end: the overlap never extends a key" : ""}.
              </>
            )}
          </p>
          {rotate.isError ? (
            <div className="mt-4">
              <ProblemView problem={toProblem(rotate.error)} compact />
            </div>
          ) : null}
          <DialogActions>
            <button type="button" className={buttonSecondary} onClick={close}>
              Cancel
            </button>
            <button type="submit" className={buttonPrimary} disabled={minutes === null || rotate.isPending}>
              {rotate.isPending ? "Rotating…" : "Rotate key"}
            </button>
          </DialogActions>
        </form>
      )}
    </Dialog>
  );
}
