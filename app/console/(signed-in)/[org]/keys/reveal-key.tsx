"use client";

import { useEffect, useId, useRef, useState, type ReactNode } from "react";
import { CopyButton } from "@/components/console/copy-button";
import { DialogActions } from "@/components/console/dialog";
import { IconWarn } from "@/components/console/icons";
import { buttonPrimary } from "@/components/console/ui";

/** The plaintext of a new key, on screen once: copy it, confirm it is stored, and it is gone from the page. */
export function RevealKey({ secret, children, onDone }: { secret: string; children?: ReactNode; onDone: () => void }) {
  const [stored, setStored] = useState(false);
  const fieldId = useId();
  const checkId = useId();
  const field = useRef<HTMLInputElement>(null);
  // The dialog stays open while its content turns into this: put focus on the key, not on the page behind.
  useEffect(() => field.current?.focus(), []);
  return (
    <div className="flex flex-col gap-4">
      <div role="alert" className="flex gap-3 rounded-lg border border-caution-rule border-l-[6px] bg-caution-bg px-4 py-3 text-caution-ink">
        <IconWarn className="mt-0.5 h-5 w-5 shrink-0" />
        <p className="text-sm">
          <strong className="font-semibold">You won&apos;t see this key again.</strong> Paritas keeps only a hash of it. Copy it into
          your secret store or CI settings now; if it is lost, rotate it.
        </p>
      </div>
      <div>
        <label htmlFor={fieldId} className="text-sm font-medium">
          The new key
        </label>
        <div className="mt-1 flex flex-col gap-2 sm:flex-row sm:items-center">
          <input
            id={fieldId}
            readOnly
            value={secret}
            spellCheck={false}
            autoComplete="off"
            ref={field}
            onFocus={(e) => e.currentTarget.select()}
            className="block w-full min-w-0 rounded-md border border-ink-2/60 bg-code-bg px-3 py-2 font-mono text-sm text-code-ink"
          />
          <CopyButton text={secret} label="Copy key" />
        </div>
      </div>
      {children}
      <div className="flex items-start gap-2 text-sm">
        <input id={checkId} type="checkbox" checked={stored} onChange={(e) => setStored(e.target.checked)} className="mt-1 h-4 w-4 accent-accent" />
        <label htmlFor={checkId}>I have stored the key somewhere safe.</label>
      </div>
      <DialogActions>
        <button type="button" className={buttonPrimary} disabled={!stored} onClick={onDone}>
          Done — hide the key
        </button>
      </DialogActions>
    </div>
  );
}
