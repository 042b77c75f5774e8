"use client";

import { useEffect, useId, useLayoutEffect, useRef, type ReactNode } from "react";
import { IconClose } from "./icons";

/**
 * A modal on the native <dialog> element: the browser traps focus, makes the rest of the page
 * inert, closes on Escape and returns focus to the control that opened it.
 * `dismissible={false}` keeps Escape from closing it (while a key is on screen, say).
 * Mark the control that should take focus first with `data-autofocus`.
 */
export function Dialog({
  open,
  onClose,
  title,
  description,
  children,
  dismissible = true,
  wide = false,
}: {
  open: boolean;
  onClose: () => void;
  title: string;
  description?: ReactNode;
  children: ReactNode;
  dismissible?: boolean;
  wide?: boolean;
}) {
  const ref = useRef<HTMLDialogElement>(null);
  const titleId = useId();
  const descId = useId();

  useEffect(() => {
    const d = ref.current;
    if (!d) return;
    if (open && !d.open) {
      d.showModal();
      // The browser focuses the first control (the close button); a dialog can name a better start.
      d.querySelector<HTMLElement>("[data-autofocus]")?.focus();
    }
    if (!open && d.open) d.close();
  }, [open]);

  // Unmounted while open: close first, so the browser hands focus back to the opener.
  useLayoutEffect(() => {
    const d = ref.current;
    return () => {
      if (d?.open) d.close();
    };
  }, []);

  return (
    <dialog
      ref={ref}
      aria-labelledby={titleId}
      aria-describedby={description ? descId : undefined}
      onCancel={(e) => {
        e.preventDefault();
        if (dismissible) onClose();
      }}
      className={`m-auto max-h-[calc(100dvh-2rem)] w-[calc(100vw-2rem)] overflow-y-auto rounded-xl border border-rule bg-surface p-0 text-ink shadow-xl backdrop:bg-[#0b0f13]/55 ${wide ? "max-w-2xl" : "max-w-lg"}`}
    >
      {open ? (
        <div className="flex flex-col">
          <div className="flex items-start justify-between gap-4 border-b border-rule px-5 pt-4 pb-3">
            <div>
              <h2 id={titleId} className="text-lg font-semibold tracking-tight">
                {title}
              </h2>
              {description ? (
                <div id={descId} className="mt-0.5 text-sm text-ink-2">
                  {description}
                </div>
              ) : null}
            </div>
            {dismissible ? (
              <button type="button" onClick={onClose} className="-mr-1 rounded-md p-1 text-ink-2 hover:bg-sunken hover:text-ink" aria-label="Close">
                <IconClose className="h-5 w-5" />
              </button>
            ) : null}
          </div>
          <div className="px-5 py-4">{children}</div>
        </div>
      ) : null}
    </dialog>
  );
}

/** The row of buttons at the foot of a dialog. */
export function DialogActions({ children }: { children: ReactNode }) {
  return <div className="mt-5 flex flex-col-reverse gap-2 sm:flex-row sm:justify-end">{children}</div>;
}
