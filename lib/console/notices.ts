import type { Org, Role } from "@/db/schema";
import { sendMail, type Mail } from "@/lib/mail/send";
import { logError } from "@/lib/api/redact";

/**
 * Send mails without holding up the response, after the transaction that caused them has committed.
 * A mail that fails is logged (recipient and subject only: an invitation's text holds its token) and dropped:
 * the change it reports has happened either way.
 */
export function deliver(mails: Mail[]): void {
  for (const mail of mails) {
    void (async () => {
      try {
        await sendMail(mail);
      } catch (e) {
        logError(`mail "${mail.subject}" to ${mail.to} failed`, e instanceof Error ? e.message : e);
      }
    })();
  }
}

const utc = (iso: string) => `${iso.slice(0, 16).replace("T", " ")} UTC`;

export function invitationMail(m: { to: string; org: Pick<Org, "name">; role: Role; invitedBy: string; link: string; expiresAt: string }): Mail {
  return {
    to: m.to,
    subject: `Join ${m.org.name} on Paritas`,
    text: [
      `${m.invitedBy} invited you to ${m.org.name} on Paritas, with the role ${m.role}.`,
      "",
      `Accept the invitation: ${m.link}`,
      "",
      `The link works once, for ${m.to} only, until ${utc(m.expiresAt)}.`,
      "If you did not expect this invitation, ignore this message.",
    ].join("\n"),
  };
}

export type KeyEvent =
  | { kind: "created"; prefix: string; name: string; mode: string }
  | { kind: "rotated"; prefix: string; name: string; mode: string; newPrefix: string; oldKeyEndsAt: string }
  | { kind: "revoked"; prefix: string; name: string; mode: string };

function keyEventLines(e: KeyEvent, orgName: string, by: string): string[] {
  const what = `the ${e.mode} key "${e.name}" (${e.prefix}…)`;
  switch (e.kind) {
    case "created":
      return [`${by} created ${what} in ${orgName}.`];
    case "revoked":
      return [`${by} revoked ${what} in ${orgName}. Calls with it are refused from now on.`];
    case "rotated":
      return [`${by} rotated ${what} in ${orgName}. The new key starts with ${e.newPrefix}…`, `The old key works until ${utc(e.oldKeyEndsAt)}.`];
  }
}

/** One notice to each owner about a change to an API key; never the key itself, only its visible prefix. */
export function keyNotices(owners: string[], org: Pick<Org, "name">, by: string, e: KeyEvent): Mail[] {
  const text = [...keyEventLines(e, org.name, by), "", "If this was not expected, revoke the key in the console and review the audit log."].join("\n");
  return owners.map((to) => ({ to, subject: `Paritas: key ${e.prefix}… ${e.kind} in ${org.name}`, text }));
}
