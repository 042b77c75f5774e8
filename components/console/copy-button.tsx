"use client";

import { useEffect, useState } from "react";
import { IconCheck, IconCopy } from "./icons";
import { buttonSecondary, buttonSmall } from "./ui";

/** On the dark code panels. */
const onDark =
  "inline-flex items-center justify-center gap-2 rounded-md border border-white/30 px-2.5 py-1 text-[0.8125rem] font-medium whitespace-nowrap text-code-ink hover:bg-white/10";

/** Copies `text`; says so in a live region so screen-reader users hear it too. */
export function CopyButton({ text, label = "Copy", tone = "light" }: { text: string; label?: string; tone?: "light" | "dark" }) {
  const [state, setState] = useState<"idle" | "done" | "failed">("idle");
  useEffect(() => {
    if (state === "idle") return;
    const t = setTimeout(() => setState("idle"), 2500);
    return () => clearTimeout(t);
  }, [state]);

  async function copy() {
    try {
      await navigator.clipboard.writeText(text);
      setState("done");
    } catch {
      setState("failed");
    }
  }

  return (
    <span className="inline-flex items-center gap-2">
      <button type="button" onClick={copy} className={tone === "dark" ? onDark : `${buttonSecondary} ${buttonSmall}`}>
        {state === "done" ? <IconCheck className="h-4 w-4" /> : <IconCopy className="h-4 w-4" />}
        {state === "done" ? "Copied" : label}
      </button>
      <span role="status" aria-live="polite" className="sr-only">
        {state === "done" ? "Copied to the clipboard." : state === "failed" ? "Copying failed; select the text and copy it by hand." : ""}
      </span>
      {state === "failed" ? <span className={`text-xs ${tone === "dark" ? "text-code-dim" : "text-ink-2"}`}>Select and copy by hand.</span> : null}
    </span>
  );
}
