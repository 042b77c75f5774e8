"use client";

import { useMutation, useQueryClient } from "@tanstack/react-query";
import { useId, useState } from "react";
import { Dialog, DialogActions } from "@/components/console/dialog";
import { ProblemView } from "@/components/console/problem-view";
import { buttonPrimary, buttonSecondary, errorText, hintBase, inputBase } from "@/components/console/ui";
import { consoleApi } from "@/lib/console-client/api";
import { formatDateTime, formatRelative } from "@/lib/console-client/format";
import { toProblem } from "@/lib/console-client/problem";
import { queryKeys } from "@/lib/console-client/query-keys";
import type { KeyRecord, RotatedKey } from "@/lib/console-client/types";
import { RevealKey } from "./reveal-key";

const MAX_OVERLAP = 720;
const CHOICES = [
  { id: "0", hours: 0, label: "No overlap", help: "The old key stops at once." },
  { id: "1", hours: 1, label: "1 hour", help: "Enough for a single deploy." },
  { id: "24", hours: 24, label: "24 hours", help: "A day to update every job." },
  { id: "168", hours: 168, label: "7 days", help: "For keys spread over many systems." },
  { id: "custom", hours: null, label: "Custom", help: `0 to ${MAX_OVERLAP} hours.` },
] as const;

/** Replace a key by a new one with the same name, scopes and mode; the old one keeps working for the overlap. */
export function RotateKeyDialog({ org, target, onClose }: { org: string; target: KeyRecord | null; onClose: () => void }) {
  const qc = useQueryClient();
  const [choice, setChoice] = useState<(typeof CHOICES)[number]["id"]>("24");
  const [custom, setCustom] = useState("48");
  const [result, setResult] = useState<(RotatedKey & { endsNow: boolean }) | null>(null);
  const customId = useId();
  const groupName = useId();

  const customHours = Number(custom);
  const customValid = custom.trim() !== "" && Number.isInteger(customHours) && customHours >= 0 && customHours <= MAX_OVERLAP;
  const hours = choice === "custom" ? (customValid ? customHours : null) : Number(choice);

  const rotate = useMutation({
    mutationFn: (overlapHours: number) => consoleApi.rotateKey(org, target!.id, overlapHours),
    onSuccess: (res) => {
      setResult({ ...res, endsNow: Date.parse(res.previous.expiresAt) <= Date.now() + 1000 });
      void qc.invalidateQueries({ queryKey: queryKeys.keys(org) });
    },
  });

  function close() {
    setResult(null);
    setChoice("24");
    setCustom("48");
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
            if (hours !== null) rotate.mutate(hours);
          }}
        >
          <fieldset>
            <legend className="text-sm font-medium">Overlap</legend>
            <div className="mt-2 grid gap-2 sm:grid-cols-2">
              {CHOICES.map((c) => (
                <label key={c.id} className="flex items-start gap-2 rounded-md border border-ink-2/40 p-3 text-sm has-[:checked]:border-accent has-[:checked]:bg-accent-soft/50">
                  <input
                    type="radio"
                    name={groupName}
                    value={c.id}
                    checked={choice === c.id}
                    onChange={() => setChoice(c.id)}
                    className="mt-1 h-4 w-4 accent-accent"
                    data-autofocus={choice === c.id ? true : undefined}
                  />
                  <span>
                    <span className="font-medium">{c.label}</span>
                    <span className="block text-ink-2">{c.help}</span>
                  </span>
                </label>
              ))}
            </div>
          </fieldset>
          {choice === "custom" ? (
            <div className="mt-3">
              <label htmlFor={customId} className="text-sm font-medium">
                Overlap in hours
              </label>
              <input
                id={customId}
                type="number"
                min={0}
                max={MAX_OVERLAP}
                step={1}
                inputMode="numeric"
                value={custom}
                onChange={(e) => setCustom(e.target.value)}
                className={`${inputBase} mt-1 max-w-[10rem]`}
                aria-invalid={customValid ? undefined : true}
                aria-describedby={`${customId}-hint`}
              />
              <p id={`${customId}-hint`} className={customValid ? hintBase : errorText}>
                {customValid ? `Whole hours, 0 to ${MAX_OVERLAP} (30 days).` : `Enter whole hours from 0 to ${MAX_OVERLAP}.`}
              </p>
            </div>
          ) : null}
          {target?.expiresAt ? (
            <p className={`${hintBase} mt-3`}>This key already ends {formatDateTime(target.expiresAt)}; the overlap never extends it.</p>
          ) : null}
          {rotate.isError ? (
            <div className="mt-4">
              <ProblemView problem={toProblem(rotate.error)} compact />
            </div>
          ) : null}
          <DialogActions>
            <button type="button" className={buttonSecondary} onClick={close}>
              Cancel
            </button>
            <button type="submit" className={buttonPrimary} disabled={hours === null || rotate.isPending}>
              {rotate.isPending ? "Rotating…" : "Rotate key"}
            </button>
          </DialogActions>
        </form>
      )}
    </Dialog>
  );
}
