"use client";

import { useQuery } from "@tanstack/react-query";
import { useState } from "react";
import { consoleFetch } from "@/lib/console-client/fetcher";

interface Message {
  id: string;
  to: string;
  from: string;
  subject: string;
  text: string;
  receivedAt: string;
}

const fetchMailbox = async () => (await consoleFetch<{ messages: Message[] }>("/api/console/dev/mailbox")).messages;

/** Message text with its web addresses as links (the text part; HTML parts are not rendered here). */
function Linked({ text }: { text: string }) {
  const parts = text.split(/(https?:\/\/[^\s<>"]+)/g);
  return (
    <>
      {parts.map((part, i) =>
        i % 2 === 1 ? (
          <a key={i} href={part} className="break-all">
            {part}
          </a>
        ) : (
          part
        ),
      )}
    </>
  );
}

const time = (iso: string) => new Date(iso).toLocaleString(undefined, { dateStyle: "medium", timeStyle: "medium" });

/** The mailbox, polled from /api/console/dev/mailbox (the console layout provides the query client). */
export function MailboxView() {
  const q = useQuery({ queryKey: ["dev-mailbox"], queryFn: fetchMailbox, refetchInterval: 3000 });
  const [open, setOpen] = useState<string | null>(null);

  if (q.isPending) return <p className="mt-8 text-ink-2" role="status">Opening the mailbox…</p>;
  if (q.isError) return <p className="mt-8 font-medium text-caution-ink" role="alert">The mailbox could not be read: {q.error.message}.</p>;

  const messages = q.data;
  const shown = open ?? messages[0]?.id ?? null;
  return (
    <div className="mt-8">
      <p className="text-sm text-ink-2" aria-live="polite">
        {messages.length === 0 ? "No messages yet. Ask for a sign-in link and it shows up here within seconds." : `${messages.length} message${messages.length === 1 ? "" : "s"}; checked every few seconds.`}
      </p>
      <ul className="mt-4 space-y-3">
        {messages.map((m) => {
          const expanded = m.id === shown;
          return (
            <li key={m.id} className="overflow-hidden rounded-lg border border-rule bg-surface">
              <h2>
                <button
                  type="button"
                  aria-expanded={expanded}
                  aria-controls={`msg-${m.id}`}
                  onClick={() => setOpen(expanded ? "" : m.id)}
                  className="flex w-full flex-col gap-0.5 px-4 py-3 text-left hover:bg-sunken sm:flex-row sm:items-baseline sm:justify-between sm:gap-4"
                >
                  <span className="font-medium">{m.subject || "(no subject)"}</span>
                  <span className="shrink-0 font-mono text-xs text-ink-2">
                    to {m.to} · <time dateTime={m.receivedAt}>{time(m.receivedAt)}</time>
                  </span>
                </button>
              </h2>
              {expanded ? (
                <div id={`msg-${m.id}`} className="border-t border-rule px-4 py-4">
                  <p className="font-mono text-xs text-ink-2">from {m.from}</p>
                  <pre className="mt-3 font-sans text-sm leading-relaxed break-words whitespace-pre-wrap">
                    <Linked text={m.text} />
                  </pre>
                </div>
              ) : null}
            </li>
          );
        })}
      </ul>
    </div>
  );
}
