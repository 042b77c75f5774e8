/**
 * The messages Paritas sends, each as plain text and a small HTML version. The wording never
 * depends on whether the address has an account, so a message cannot tell a third party that.
 */
export interface MailContent {
  subject: string;
  text: string;
  html: string;
}

const escapeHtml = (s: string) =>
  s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;").replace(/'/g, "&#39;");

const minutes = (seconds: number) => `${Math.round(seconds / 60)} minutes`;

/** One message layout: a heading, paragraphs, one button-like link and the link written out. */
function layout(m: { heading: string; before: string[]; action: string; url: string; after: string[] }): string {
  const p = (t: string) => `<p style="margin:0 0 14px;line-height:1.55">${escapeHtml(t)}</p>`;
  const url = escapeHtml(m.url);
  return `<!doctype html>
<html lang="en"><body style="margin:0;padding:24px;background:#f4f2ea;color:#161b22;font-family:system-ui,sans-serif;font-size:15px">
<div style="max-width:520px;margin:0 auto;background:#fbfaf6;border:1px solid #d6d1c2;border-radius:8px;padding:24px">
<p style="margin:0 0 18px;font-family:ui-monospace,monospace;font-size:12px;letter-spacing:.06em;color:#0d6657">PARITAS</p>
<h1 style="margin:0 0 14px;font-size:20px">${escapeHtml(m.heading)}</h1>
${m.before.map(p).join("\n")}
<p style="margin:20px 0"><a href="${url}" style="display:inline-block;background:#0d6657;color:#ffffff;text-decoration:none;padding:10px 18px;border-radius:6px;font-weight:600">${escapeHtml(m.action)}</a></p>
<p style="margin:0 0 14px;font-size:13px;color:#474e58">Or paste this address into your browser:<br><span style="word-break:break-all">${url}</span></p>
${m.after.map(p).join("\n")}
</div></body></html>`;
}

function compose(subject: string, m: Parameters<typeof layout>[0]): MailContent {
  const text = [...m.before, `${m.action}:`, m.url, "", ...m.after].join("\n\n").replace(/\n{3,}/g, "\n\n");
  return { subject, text: `${text}\n\n— Paritas\n`, html: layout(m) };
}

/** The e-mail sign-in link; it also confirms the address of an account just signed up for. */
export function signInLinkMail(p: { url: string; validForSeconds: number }): MailContent {
  return compose("Your Paritas sign-in link", {
    heading: "Sign in to Paritas",
    before: [
      `Follow the link below to open the Paritas console. It works once, for the next ${minutes(p.validForSeconds)}.`,
      "If you have just created an account, the same link confirms your address; your password works from then on.",
    ],
    action: "Sign in",
    url: p.url,
    after: [
      "If you already had an account, nothing about it has changed: your password is the same as before.",
      "If you did not ask for this, ignore the message; nobody can use the link without this mailbox.",
    ],
  });
}

/** The link that lets the owner of an address choose a new password. */
export function passwordResetMail(p: { url: string; validForSeconds: number }): MailContent {
  return compose("Choose a new Paritas password", {
    heading: "Choose a new password",
    before: [`Someone — hopefully you — asked to set a new password for this address. The link works once, for the next ${minutes(p.validForSeconds)}.`],
    action: "Choose a new password",
    url: p.url,
    after: ["If you did not ask for this, ignore the message: your password stays as it is."],
  });
}
