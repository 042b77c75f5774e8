import nodemailer, { type Transporter } from "nodemailer";

/**
 * Outgoing mail over SMTP. Development and tests point at the local fake SMTP server in fakes/
 * (PARITAS_SMTP_URL, default smtp://127.0.0.1:2525); production changes only that setting.
 */
export interface Mail {
  to: string;
  subject: string;
  text: string;
  html?: string;
}

export const mailFrom = () => process.env.PARITAS_MAIL_FROM ?? "Paritas <no-reply@paritas.example>";
export const smtpUrl = () => process.env.PARITAS_SMTP_URL ?? "smtp://127.0.0.1:2525";

const state = globalThis as unknown as { __paritasMail?: { url: string; transport: Transporter } };

function transport(): Transporter {
  const url = smtpUrl();
  if (!state.__paritasMail || state.__paritasMail.url !== url) state.__paritasMail = { url, transport: nodemailer.createTransport(url) };
  return state.__paritasMail.transport;
}

export async function sendMail(mail: Mail): Promise<void> {
  const info = await transport().sendMail({ from: mailFrom(), ...mail });
  // The server can accept the message yet refuse the recipient; that is a failure to deliver too.
  if (info.rejected.length > 0) throw new Error(`the mail server refused ${info.rejected.length} recipient(s)`);
}
